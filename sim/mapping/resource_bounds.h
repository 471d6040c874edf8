// Every resource is a ceiling. What an op (or a phase, or a decode step)
// demands of each resource of a design, and the fewest core cycles each
// resource needs for it: the binding resource is the one needing most.
//
// Each bound is a true lower bound on the cycles the engine can take:
//  - dram_bandwidth: bytes / peak bytes per cycle (Williams et al. 2009);
//  - request_concurrency: bytes / (requests in flight x request bytes /
//    the shortest request latency, a row-hit write or read), Little's
//    law (Little 1961);
//  - trit_decoder: packed base-3 bytes / decoder bytes per cycle;
//  - tree_array: products / (T x F) per cycle;
//  - vector_unit: the vector unit's own cycles from its cost model;
//  - sram_ports: bank accesses / (banks x ports) per cycle.
// Plain C++; the sequencer fills demands from what ran, inspect from the
// tiles a workload's ops are cut into.
#pragma once

#include <array>
#include <cstdint>

#include "config/arch_config.h"
#include "results/run_result.h"

namespace tritsim {

// Cycles each resource needs, indexed by Resource, and the binding one.
struct ResourceBounds {
  std::array<double, kResourceCount> cycles{};
  Resource binding = Resource::kDramBandwidth;
  double max_cycles() const { return cycles[size_t(binding)]; }
};

// The rates a design offers, per core cycle.
struct ResourceRates {
  double dram_bytes = 0;        // peak DRAM bandwidth
  double concurrent_bytes = 0;  // Little's law: in flight x request bytes / shortest latency
  double decoder_bytes = 0;     // packed base-3 bytes the decoder expands
  double array_products = 0;    // T x F products
  double sram_accesses = 0;     // banks x ports bank accesses
};

ResourceRates RatesOf(const ArchConfig& arch);

// The cycles each resource needs for `demand`, and the binding resource
// (ties go to the first in Resource order).
ResourceBounds BoundsOf(const ResourceDemand& demand, const ResourceRates& rates);

}  // namespace tritsim
