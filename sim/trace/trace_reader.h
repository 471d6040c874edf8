// Reads a trace file (docs/trace-format.md) as a stream of records.
#pragma once

#include <memory>
#include <string>

#include "trace/trace_source.h"

namespace tritsim {

// Opens `path` and reads its header. Throws tritsim::Error (exit 3) naming
// the file (and line) if it is missing, unreadable or malformed. Later
// records are parsed and checked as next() reaches them.
std::unique_ptr<TraceSource> OpenTraceFile(const std::string& path);

}  // namespace tritsim
