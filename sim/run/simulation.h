// Runs one simulation: elaborates the accelerator (SystemC), replays the
// trace on it, and returns what the units measured.
//
// SystemC elaborates once per process: call this at most once per process
// (tests run each simulating test in its own process; sweeps run one process
// per design point). This header keeps SystemC out of its includers.
#pragma once

#include <functional>
#include <vector>

#include "config/arch_config.h"
#include "mapping/sim_options.h"
#include "results/run_result.h"
#include "trace/trace_source.h"

namespace tritsim {

// REQUIRES: `arch` validated by the config loader. Throws tritsim::Error:
// exit 3 for a malformed trace record, exit 4 when a tile cannot fit or the
// watchdog finds the simulation stuck (naming the unit and what it waits for).
RunResult RunSimulation(const ArchConfig& arch, TraceSource& trace, const SimOptions& options);

// Measurement points of a sampled run: when the op `wants(index)` accepts
// retires, `measure` gets the counters accumulated so far
// (Accelerator::Snapshot: cycles, stalls, events, dram, busy cycles) and
// the per-op results so far. Called from the simulation thread.
struct RetireProbe {
  std::function<bool(int64_t op_index)> wants;
  std::function<void(int64_t op_index, const RunResult& so_far, const std::vector<OpResult>& ops)>
      measure;
};
RunResult RunSimulation(const ArchConfig& arch, TraceSource& trace, const SimOptions& options,
                        const RetireProbe& probe);

}  // namespace tritsim
