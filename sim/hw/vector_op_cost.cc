#include "hw/vector_op_cost.h"

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

uint64_t VectorItems(const TileWork& work) {
  return work.kind == OpKind::kGemm ? work.rows * work.k * work.n : work.elements;
}

uint64_t VectorSpecials(const TileWork& work) {
  const VectorOpCost row = VectorCostOf(work.kind);
  return VectorItems(work) * row.special + work.rows * row.special_per_row;
}

uint64_t VectorTileCycles(const TileWork& work, const VectorUnitConfig& config) {
  const VectorOpCost row = VectorCostOf(work.kind);
  return CeilDiv(VectorItems(work) * row.lane_passes, uint64_t(config.lanes)) +
         CeilDiv(VectorSpecials(work), uint64_t(config.special_per_cycle)) +
         (work.drain ? uint64_t(config.pipeline_cycles) : 0);
}

}  // namespace tritsim
