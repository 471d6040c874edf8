// Writes a trace stream in the text format of docs/trace-format.md.
#pragma once

#include <ostream>

#include "trace/trace_source.h"

namespace tritsim {

// Drains `source` into `out`. Reading the result back and writing it again
// gives byte-identical text.
void WriteTrace(TraceSource& source, std::ostream& out);

}  // namespace tritsim
