#include "hw/vector_unit.h"

#include "common/int_math.h"

namespace tritsim {

VectorOpCost VectorCostOf(OpKind kind) {
  switch (kind) {
    case OpKind::kGemm:  // 8/16-bit weights: one MAC per product
    case OpKind::kAttnScores:
    case OpKind::kAttnValues:
      return {1, 1, 0, 0, 0};
    case OpKind::kEmbed:  // table rows converted to activations
    case OpKind::kKvAppend:
    case OpKind::kResidual:
      return {1, 0, 1, 0, 0};
    case OpKind::kNorm:  // RMSNorm: sum of squares, one rsqrt per row, scale by the gains
      return {2, 1, 1, 0, 1};
    case OpKind::kQuantize:  // absmax per row, one reciprocal per row, scale and round
      return {2, 0, 2, 0, 1};
    case OpKind::kRope:  // a 2 x 2 rotation per element pair
      return {2, 2, 0, 0, 0};
    case OpKind::kSoftmax:  // one exp and one normalisation per score
    case OpKind::kActivation:
      return {1, 0, 1, 1, 0};
  }
  return {};
}

VectorUnit::VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config,
                       uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

// A GEMM reads its weight tile once and its activations once per weight
// column; any other op reads its operands once.
uint64_t VectorUnit::ReadAccesses(const TileWork& work) const {
  if (work.kind != OpKind::kGemm) return sram().AccessesFor(work.read_bytes);
  return sram().AccessesFor(work.weight_bytes) +
         sram().AccessesFor(work.rows * work.k * work.act_bytes) * work.n;
}

TileCost VectorUnit::Cost(const TileWork& work) const {
  const VectorOpCost row = VectorCostOf(work.kind);
  const uint64_t items = work.kind == OpKind::kGemm ? GemmItems(work) : work.elements;
  const uint64_t special = items * row.special + work.rows * row.special_per_row;
  TileCost cost;
  cost.cycles = CeilDiv(items * row.lane_passes, uint64_t(config_.lanes)) +
                CeilDiv(special, uint64_t(config_.special_per_cycle)) +
                (work.drain ? uint64_t(config_.pipeline_cycles) : 0);
  cost.sram_read_accesses = ReadAccesses(work);
  cost.events.vector_macs = items * row.macs;
  cost.events.vector_elementwise = items * row.elementwise;
  cost.events.vector_special = special;
  return cost;
}

}  // namespace tritsim
