// Tree array: T adder trees of fan-in F. Each cycle a tree takes F int8
// activations and F trits (each selects +x, -x or 0), sums them through
// ceil(log2 F) adder levels plus a configurable register cut, and adds the
// result into an A-bit accumulator. Weight-stationary: a tree holds one
// F-trit weight column chunk while the M activation rows of a GEMM stream
// through, so a pass over one weight set takes max(M, weight fetch) cycles,
// where the fetch is limited by the scratchpad's read width and, for base-3
// weights, by the trit decoder. With array.kind int8_mac / fp16_mac the
// same shape multiplies instead (a baseline; cycle model unchanged).
#pragma once

#include "config/arch_config.h"
#include "hw/compute_unit.h"
#include "hw/trit_decoder.h"

namespace tritsim {

class TreeArray : public TimedComputeUnit {
 public:
  TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config,
            const PackingConfig& packing, uint64_t period_ps, Scratchpad& sram);

  // A GEMM tile: ceil(n/T) x ceil(k/F) passes of max(rows, fetch) cycles, plus
  // the adder pipeline on the op's last tile (docs/engine.md).
  TileCost Cost(const TileWork& work) const override;
  // ceil(log2 F) adder levels plus the register cut.
  uint64_t pipeline_depth() const;

 private:
  uint64_t PassCycles(const TileWork& work, bool decoded) const;
  void CountEvents(const TileWork& work, bool decoded, EventCounts& events) const;

  TreeArrayConfig config_;
  TritDecoder decoder_;
};

}  // namespace tritsim
