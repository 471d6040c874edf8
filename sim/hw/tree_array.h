// Tree array: T adder trees of fan-in F. Each cycle a tree takes F int8
// activations and F trits (each selects +x, -x or 0), sums them through
// ceil(log2 F) adder levels plus a configurable register cut, and adds the
// result into an A-bit accumulator. Weight-stationary: a tree holds one
// F-trit weight column chunk while the M activation rows of a GEMM stream
// through, so a pass over one weight set takes max(M, weight fetch) cycles.
// The cycle count of a tile is computed by the tiler; this unit waits it
// out, adds scratchpad conflicts, and counts its energy events.
#pragma once

#include "config/arch_config.h"
#include "hw/compute_unit.h"

namespace tritsim {

class TreeArray : public TimedComputeUnit {
 public:
  TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config, uint64_t period_ps,
            Scratchpad& sram);

 private:
  TreeArrayConfig config_;
};

}  // namespace tritsim
