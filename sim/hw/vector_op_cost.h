// The vector unit's cost table, plain C++ (no SystemC): one row per op kind
// and the cycle formula, shared by the VectorUnit module and by the
// workload bounds of `tritsim inspect`.
#pragma once

#include <cstdint>

#include "config/arch_config.h"
#include "mapping/work_item.h"

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

// Items of work in a tile: products for a GEMM, else work.elements.
uint64_t VectorItems(const TileWork& work);
// Special-function results of a tile.
uint64_t VectorSpecials(const TileWork& work);
// ceil(items x lane_passes / L) + ceil(special results / S), plus the
// instruction latency on the op's last tile.
uint64_t VectorTileCycles(const TileWork& work, const VectorUnitConfig& config);

}  // namespace tritsim
