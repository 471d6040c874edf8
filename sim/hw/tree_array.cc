#include "hw/tree_array.h"

#include <algorithm>
#include <cmath>

#include "common/int_math.h"

namespace tritsim {

TreeArray::TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config,
                     const PackingConfig& packing, uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config), decoder_(packing) {}

uint64_t TreeArray::pipeline_depth() const {
  return Log2Ceil(uint64_t(config_.fan_in)) + uint64_t(config_.register_cut);
}

// One pass streams the tile's rows through trees holding F x T weights; the
// next pass's weights are read (and decoded) meanwhile.
uint64_t TreeArray::PassCycles(const TileWork& work, bool decoded) const {
  const uint64_t pass_bytes =
      BitsToBytes(uint64_t(config_.fan_in) * uint64_t(config_.trees), work.weight_bits);
  uint64_t cycles = std::max(work.rows, CeilDiv(pass_bytes, sram().bytes_per_cycle()));
  if (decoded) cycles = std::max(cycles, decoder_.CyclesFor(pass_bytes));
  return cycles;
}

void TreeArray::CountEvents(const TileWork& work, bool decoded, EventCounts& events) const {
  events.weight_uses = work.rows * work.k * work.n;  // activation x weight products
  if (decoded) events.decoder_bytes = work.weight_bytes;
  events.weight_uses_zero =
      work.ternary_weights ? uint64_t(std::llround(double(events.weight_uses) * work.zero_fraction))
                           : 0;
  events.accumulator_adds = work.rows * work.n * CeilDiv(work.k, uint64_t(config_.fan_in));
}

TileCost TreeArray::Cost(const TileWork& work) const {
  const bool decoded =
      config_.kind == ArrayKind::kTernary && decoder_.Expands(work.ternary_weights);
  const uint64_t passes =
      CeilDiv(work.n, uint64_t(config_.trees)) * CeilDiv(work.k, uint64_t(config_.fan_in));
  TileCost cost;
  cost.cycles = passes * PassCycles(work, decoded) + (work.drain ? pipeline_depth() : 0);
  // The weight tile once, the activation rows once per group of T columns.
  cost.sram_read_accesses = sram().AccessesFor(work.weight_bytes) +
                            sram().AccessesFor(work.rows * work.k * work.act_bytes) *
                                CeilDiv(work.n, uint64_t(config_.trees));
  CountEvents(work, decoded, cost.events);
  return cost;
}

}  // namespace tritsim
