// Vector unit: L int8 multiply-accumulate lanes plus special-function
// hardware (exp, reciprocal square root, activation functions). Runs every
// op that is not a ternary GEMM: attention over the KV cache, softmax,
// RMSNorm, absmax requantization, residual adds, and GEMMs with 8/16-bit
// weights. Cycle counts come from the tiler (docs/engine.md gives the
// formulas); this unit waits them out, adds scratchpad conflicts, and
// counts its energy events.
#pragma once

#include "config/arch_config.h"
#include "hw/compute_unit.h"

namespace tritsim {

class VectorUnit : public TimedComputeUnit {
 public:
  VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config, uint64_t period_ps,
             Scratchpad& sram);

 private:
  VectorUnitConfig config_;
};

}  // namespace tritsim
