// What one simulation measured. Plain value types filled by the engine's
// units; the energy model and the report layer only read them.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "trace/trace_op.h"

namespace tritsim {

// Tree-array cycles by cause. The five fields sum exactly to the run's
// total core cycles.
struct StallBreakdown {
  uint64_t busy = 0;           // the array is computing
  uint64_t dram_wait = 0;      // waiting for a weight/activation tile from DRAM
  uint64_t sram_conflict = 0;  // delayed by scratchpad bank conflicts
  uint64_t vector_wait = 0;    // waiting for the vector unit (a dependence)
  uint64_t idle = 0;           // nothing to do (start-up, drain, write-back)
  uint64_t total() const { return busy + dram_wait + sram_conflict + vector_wait + idle; }
};

// `whole` minus `part`, cause by cause (`part` is a prefix of `whole`'s run).
inline StallBreakdown StallsAfter(const StallBreakdown& whole, const StallBreakdown& part) {
  return {whole.busy - part.busy, whole.dram_wait - part.dram_wait,
          whole.sram_conflict - part.sram_conflict, whole.vector_wait - part.vector_wait,
          whole.idle - part.idle};
}

// Events that cost energy, counted by the units that cause them.
struct EventCounts {
  uint64_t weight_uses = 0;         // activation x weight products in the array (= K*N*M per GEMM)
  uint64_t weight_uses_zero = 0;    // of those, with a zero trit (gateable)
  uint64_t accumulator_adds = 0;    // accumulator updates (one per tree output per K chunk)
  uint64_t decoder_bytes = 0;       // packed base-3 bytes expanded by the trit decoder
  uint64_t vector_macs = 0;         // int8 multiply-accumulates in the vector unit
  uint64_t vector_special = 0;      // special-function evaluations (exp, rsqrt, act)
  uint64_t vector_elementwise = 0;  // elementwise adds/multiplies (residual, norm scale, quantize)
  uint64_t sram_reads = 0;          // bank accesses of bank_width_bytes
  uint64_t sram_writes = 0;
  uint64_t dram_bytes_read = 0;
  uint64_t dram_bytes_written = 0;
  uint64_t dram_activates = 0;
  uint64_t dram_refreshes = 0;  // all-bank refresh commands, summed over channels
};

// Adds every count of `from` into `into`.
inline void AddEvents(const EventCounts& from, EventCounts& into) {
  into.weight_uses += from.weight_uses;
  into.weight_uses_zero += from.weight_uses_zero;
  into.accumulator_adds += from.accumulator_adds;
  into.decoder_bytes += from.decoder_bytes;
  into.vector_macs += from.vector_macs;
  into.vector_special += from.vector_special;
  into.vector_elementwise += from.vector_elementwise;
  into.sram_reads += from.sram_reads;
  into.sram_writes += from.sram_writes;
  into.dram_bytes_read += from.dram_bytes_read;
  into.dram_bytes_written += from.dram_bytes_written;
  into.dram_activates += from.dram_activates;
  into.dram_refreshes += from.dram_refreshes;
}

struct DramStats {
  uint64_t reads = 0;  // requests (one burst each)
  uint64_t writes = 0;
  uint64_t row_hits = 0;
  uint64_t row_misses = 0;     // closed bank: ACT needed
  uint64_t row_conflicts = 0;  // other row open: PRE + ACT needed
  uint64_t activates = 0;
  uint64_t refreshes = 0;
  uint64_t busy_ps = 0;     // data-bus busy time, summed over channels
  uint64_t refresh_ps = 0;  // time in refresh, summed over channels
  double row_hit_rate() const {
    uint64_t n = row_hits + row_misses + row_conflicts;
    return n ? double(row_hits) / double(n) : 0.0;
  }
};

// Every counter of DramStats, for code that adds, subtracts or scales them
// field by field (a new counter goes here too).
inline constexpr uint64_t DramStats::*kDramStatsFields[] = {
    &DramStats::reads,      &DramStats::writes,        &DramStats::row_hits,
    &DramStats::row_misses, &DramStats::row_conflicts, &DramStats::activates,
    &DramStats::refreshes,  &DramStats::busy_ps,       &DramStats::refresh_ps};

enum class Regime { kMemory, kCompute };

// The resources that bound an op (sim/mapping/resource_bounds.h). Names in
// reports: ResourceName().
enum class Resource {
  kDramBandwidth,
  kRequestConcurrency,
  kTritDecoder,
  kTreeArray,
  kVectorUnit,
  kSramPorts
};
inline constexpr size_t kResourceCount = 6;

// "dram_bandwidth", "request_concurrency", "trit_decoder", "tree_array",
// "vector_unit", "sram_ports".
inline const char* ResourceName(Resource r) {
  switch (r) {
    case Resource::kDramBandwidth:
      return "dram_bandwidth";
    case Resource::kRequestConcurrency:
      return "request_concurrency";
    case Resource::kTritDecoder:
      return "trit_decoder";
    case Resource::kTreeArray:
      return "tree_array";
    case Resource::kVectorUnit:
      return "vector_unit";
    case Resource::kSramPorts:
      return "sram_ports";
  }
  return "?";
}

// Memory-side resources make an op memory-bound; the others compute-bound.
inline Regime RegimeOf(Resource r) {
  return r == Resource::kDramBandwidth || r == Resource::kRequestConcurrency ? Regime::kMemory
                                                                             : Regime::kCompute;
}

// What work demands of each resource (summed over ops, steps or phases).
struct ResourceDemand {
  double dram_bytes = 0;      // read + written
  double decoder_bytes = 0;   // packed base-3 bytes expanded
  double array_products = 0;  // activation x weight products on the tree array
  double vector_cycles = 0;   // the vector unit's own cycles (its cost model)
  double sram_accesses = 0;   // scratchpad bank accesses, reads + writes
  void Add(const ResourceDemand& o) {
    dram_bytes += o.dram_bytes;
    decoder_bytes += o.decoder_bytes;
    array_products += o.array_products;
    vector_cycles += o.vector_cycles;
    sram_accesses += o.sram_accesses;
  }
};

// One trace op as it ran.
struct OpResult {
  TraceOp op;
  uint64_t start_cycle = 0;
  uint64_t cycles = 0;        // core cycles from the op's start to its end
  uint64_t ops = 0;           // arithmetic ops (2 per multiply-equivalent+add, common practice)
  uint64_t dram_bytes = 0;    // read + written on behalf of this op
  uint64_t bound_cycles = 0;  // sum over instances of the largest resource bound
  ResourceDemand demand;      // summed over instances
  Resource bound_by = Resource::kDramBandwidth;  // binding resource of `demand`
  Regime regime = Regime::kMemory;               // RegimeOf(bound_by)
  // Energy events of this op's tiles (DRAM activates and refreshes are not
  // attributed to ops: they stay in RunResult::events only).
  EventCounts events;
  double intensity() const { return dram_bytes ? double(ops) / double(dram_bytes) : 0.0; }
};

struct PhaseResult {
  PhaseResult() = default;
  PhaseResult(Phase p, uint64_t c, uint64_t t) : phase(p), cycles(c), tokens(t) {}
  Phase phase = Phase::kDecode;
  uint64_t cycles = 0;
  uint64_t tokens = 0;    // tokens produced or consumed (batch x tokens)
  ResourceDemand demand;  // of every op of the phase
  Resource bound_by = Resource::kDramBandwidth;
  uint64_t bound_cycles = 0;  // the binding resource's cycles for `demand`
  StallBreakdown stalls;      // the phase's core cycles by cause; sums to `cycles`
};

// How a sampled run (tritsim run --sample, sim/run/sampling.h) was
// estimated, and its stated error: the half-width of a two-sided confidence
// interval at `confidence`, relative to the estimate.
struct SamplingPhase {
  Phase phase = Phase::kDecode;
  int64_t detailed_steps = 0;
  int64_t total_steps = 0;
  double cycles_bound = 0.0;  // relative half-width of the phase's cycles
  double energy_bound = 0.0;  // relative half-width of the phase's joules
};

struct SamplingSummary {
  bool sampled = false;           // false: an exact run (no `sampling` in reports)
  int64_t detailed_steps = 0;     // steps simulated in detail, over the phases
  int64_t total_steps = 0;        // steps of the workload
  int64_t detailed_layers = 0;    // decoder layers simulated (and measured)
  int64_t total_layers = 0;       // decoder layers of the workload (steps x layers)
  double confidence = 0.0;        // e.g. 0.997
  double t_quantile = 0.0;        // Student t quantile used for the run's totals
  double degrees_of_freedom = 0;  // Welch-Satterthwaite, of the run's cycle variance
  double cycles_bound = 0.0;      // relative half-width of the total cycles
  double energy_bound = 0.0;      // relative half-width of the total joules
  std::vector<SamplingPhase> phases;
};

struct RunResult {
  SamplingSummary sampling;  // sampled runs only
  std::string arch_name;
  std::string model_name;
  bool weights_resident = false;  // SimOptions::weights_resident of the run
  double core_mhz = 0.0;
  uint64_t cycles = 0;  // total core cycles
  uint64_t sim_ps = 0;  // total simulated time, ps
  uint64_t ops = 0;
  uint64_t tokens = 0;  // generated tokens (decode x batch), or prompt tokens if no decode
  uint64_t first_token_cycles = 0;  // start to the end of the first decode step (or prefill)
  std::vector<PhaseResult> phases;
  std::vector<OpResult> layers;  // one per trace op, in order
  StallBreakdown stalls;
  EventCounts events;
  DramStats dram;
  uint64_t vector_busy_cycles = 0;
  uint64_t sram_port_busy_cycles =
      0;  // cycles with a scratchpad port in use, summed over banks/ports
  double peak_ops_per_second = 0.0;  // the tree array's
  double dram_peak_bytes_per_second = 0.0;
  // The other ceilings, per second (sim/mapping/resource_bounds.h), for the
  // roofline plot: the vector unit's peak ops, the bytes Little's law lets
  // the DMA window move, the packed bytes the trit decoder expands (0: none).
  double vector_peak_ops_per_second = 0.0;
  double concurrency_bytes_per_second = 0.0;
  double decoder_bytes_per_second = 0.0;
};

}  // namespace tritsim
