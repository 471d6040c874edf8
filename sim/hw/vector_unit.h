// Vector unit: L int8 multiply-accumulate lanes plus special-function
// hardware (exp, reciprocal square root, activation functions). Runs every
// op that is not a ternary GEMM: attention over the KV cache, softmax,
// RMSNorm, absmax requantization, residual adds, and GEMMs with 8/16-bit
// weights. Its cost model is one row per op kind (VectorOpCost); the cycle
// formula is in docs/engine.md.
#pragma once

#include "config/arch_config.h"
#include "hw/compute_unit.h"

namespace tritsim {

// What the vector unit does per item of work (an element, a softmax score,
// an attention product) of one op kind, and per row.
struct VectorOpCost {
  uint64_t lane_passes = 0;      // lane operations per item (cycles: ceil(items x this / L))
  uint64_t macs = 0;             // multiply-accumulates per item (energy)
  uint64_t elementwise = 0;      // elementwise adds/multiplies per item (energy)
  uint64_t special = 0;          // special-function results per item
  uint64_t special_per_row = 0;  // special-function results per row (rsqrt, reciprocal)
};

// The per-kind table (a switch with no default: a new op kind must add its row).
VectorOpCost VectorCostOf(OpKind kind);

class VectorUnit : public TimedComputeUnit {
 public:
  VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config, uint64_t period_ps,
             Scratchpad& sram);

  // ceil(items x lane_passes / L) + ceil(special results / S) cycles, plus
  // the instruction latency on the op's last tile.
  TileCost Cost(const TileWork& work) const override;

 private:
  uint64_t GemmItems(const TileWork& work) const { return work.rows * work.k * work.n; }
  uint64_t ReadAccesses(const TileWork& work) const;

  VectorUnitConfig config_;
};

}  // namespace tritsim
