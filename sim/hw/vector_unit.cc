#include "hw/vector_unit.h"

namespace tritsim {

VectorUnit::VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config,
                       uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

uint64_t VectorUnit::Execute(const WorkItem& item) {
  counts_.vector_macs += item.vector_macs;
  counts_.vector_special += item.vector_special;
  counts_.vector_elementwise += item.vector_elementwise;
  return RunTimed(item);
}

void VectorUnit::AddEvents(EventCounts& events) const {
  events.vector_macs += counts_.vector_macs;
  events.vector_special += counts_.vector_special;
  events.vector_elementwise += counts_.vector_elementwise;
}

}  // namespace tritsim
