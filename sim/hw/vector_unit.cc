#include "hw/vector_unit.h"

namespace tritsim {

VectorUnit::VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config,
                       uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

uint64_t VectorUnit::Execute(const WorkItem& item) {
  tritsim::AddEvents(item.events, counts_);
  return RunTimed(item);
}

void VectorUnit::AddEvents(EventCounts& events) const { tritsim::AddEvents(counts_, events); }

}  // namespace tritsim
