// Resource bounds of a whole workload, without simulating: the workload's
// trace is cut into tiles by the same tiler the engine uses, each tile's
// demand on every resource is summed per phase, and each resource gives a
// ceiling on the phase's tokens/s (sim/mapping/resource_bounds.h). A run of
// the same workload never beats these ceilings: it moves the same bytes and
// does the same work, and each bound is a true lower bound on cycles.
#pragma once

#include <array>
#include <cstdint>

#include "config/arch_config.h"
#include "config/model_config.h"
#include "config/workload_config.h"
#include "results/run_result.h"

namespace tritsim {

struct PhaseBounds {
  bool present = false;   // the workload has this phase
  uint64_t tokens = 0;    // batch x tokens of the phase
  ResourceDemand demand;  // of every tile of the phase
  // Tokens/s each resource allows (0 demand: unbounded, +infinity).
  std::array<double, kResourceCount> tokens_per_second{};
  Resource bound_by = Resource::kDramBandwidth;  // the smallest ceiling
  // The tree array and the vector unit take turns on one in-order compute
  // timeline (sim/hw/sequencer.h), so their tiles' cycles add up: the sum
  // over tiles of each tile's largest compute-side bound (decoder, trees or
  // vector unit) is a lower bound on the phase's cycles too. It is tighter
  // than any one resource when array-bound and vector-bound ops alternate
  // (long-context attention between decoder-bound GEMMs).
  double serial_compute_cycles = 0;
  double serial_compute_tokens_per_second = 0;  // +infinity without compute
};

struct WorkloadBounds {
  PhaseBounds prefill;
  PhaseBounds decode;
};

// REQUIRES: model, arch and workload validated by the loader. Throws the
// tiler's SimError (exit 4) when a tile cannot fit the scratchpad.
WorkloadBounds BoundsOfWorkload(const ModelConfig& model, const ArchConfig& arch,
                                const WorkloadConfig& workload);

}  // namespace tritsim
