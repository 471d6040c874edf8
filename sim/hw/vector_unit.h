// Vector unit: L int8 multiply-accumulate lanes plus special-function
// hardware (exp, reciprocal square root, activation functions). Runs every
// op that is not a ternary GEMM: attention over the KV cache, softmax,
// RMSNorm, absmax requantization, residual adds, and GEMMs with 8/16-bit
// weights. Its cost model is one row per op kind (VectorCostOf, in
// hw/vector_op_cost.h); the cycle formula is in docs/engine.md.
#pragma once

#include "config/arch_config.h"
#include "hw/compute_unit.h"
#include "hw/vector_op_cost.h"

namespace tritsim {

class VectorUnit : public TimedComputeUnit {
 public:
  VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config, uint64_t period_ps,
             Scratchpad& sram);

  // ceil(items x lane_passes / L) + ceil(special results / S) cycles, plus
  // the instruction latency on the op's last tile.
  TileCost Cost(const TileWork& work) const override;

 private:
  uint64_t ReadAccesses(const TileWork& work) const;

  VectorUnitConfig config_;
};

}  // namespace tritsim
