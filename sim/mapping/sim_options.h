// Options of one simulation run that are not part of the design point.
#pragma once

#include <cstdint>
#include <functional>
#include <string>

#include "trace/trace_op.h"

namespace tritsim {

class DramCommandLog;

// Where a run is, reported as the sequencer takes each trace record.
struct SimProgress {
  Phase phase = Phase::kDecode;  // phase of the current step
  int64_t step = 0;              // index of the current step within its phase
  uint64_t ops_started = 0;      // trace ops taken so far, over all steps
  double simulated_seconds = 0;  // simulated time when the record was taken
};

struct SimOptions {
  // Treat every weight tensor as already resident in the scratchpad: no
  // weight DMA. For what-if studies and for checking the array's closed-form
  // cycle count. Default off. The CLI refuses it when the model's weights do
  // not fit beside the activations (docs/engine.md).
  bool weights_resident = false;
  // Write unit activity as a VCD (IEEE 1364) file here; empty: none.
  std::string vcd_path;
  // Write the DRAM command log (docs/dram-log.md) here; empty: none. At most
  // dram_log_limit commands (>= 1), then a truncation line.
  std::string dram_log_path;
  int64_t dram_log_limit = 1000000;
  // Set by RunSimulation while it writes dram_log_path; callers leave it null.
  DramCommandLog* dram_log = nullptr;
  // Called once per trace record, from the simulation thread; empty: none.
  // Must be cheap (it runs per op) and must not throw.
  std::function<void(const SimProgress&)> on_progress;
  // Called when the sequencer retires an op (its index among the ops taken
  // from the trace, from 0), from the simulation thread; empty: none. The
  // sampled run (sim/run/sampling.h) measures its units here.
  std::function<void(int64_t op_index)> on_op_retired;
};

}  // namespace tritsim
