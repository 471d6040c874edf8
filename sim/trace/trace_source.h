// A pull-based stream of trace records, so a long decode run never needs the
// whole trace in memory. Implemented by the trace builder (generating from a
// model) and by the trace reader (parsing a file).
#pragma once

#include <string>

#include "config/workload_config.h"
#include "trace/trace_op.h"

namespace tritsim {

// First record of every trace.
struct TraceHeader {
  int version = 1;          // trace format version (docs/trace-format.md)
  std::string model;        // model name, informational
  WorkloadConfig workload;  // the workload the trace was built for
};

struct TraceRecord {
  bool is_step = false;  // true: `step` is valid; false: `op` is valid
  TraceStep step;
  TraceOp op;
};

class TraceSource {
 public:
  virtual ~TraceSource() = default;
  virtual const TraceHeader& header() const = 0;
  // Fills `record` with the next record and returns true, or returns false at
  // the end. Throws tritsim::Error (exit 3) on a malformed record, naming the
  // file and line.
  virtual bool next(TraceRecord& record) = 0;
};

}  // namespace tritsim
