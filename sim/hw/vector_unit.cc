#include "hw/vector_unit.h"

#include "common/int_math.h"

namespace tritsim {

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
  const uint64_t items = VectorItems(work);
  const uint64_t special = VectorSpecials(work);
  TileCost cost;
  cost.cycles = VectorTileCycles(work, config_);
  cost.sram_read_accesses = ReadAccesses(work);
  cost.events.vector_macs = items * row.macs;
  cost.events.vector_elementwise = items * row.elementwise;
  cost.events.vector_special = special;
  return cost;
}

}  // namespace tritsim
