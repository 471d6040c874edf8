#include "hw/tree_array.h"

namespace tritsim {

TreeArray::TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config,
                     uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

uint64_t TreeArray::Execute(const WorkItem& item) {
  tritsim::AddEvents(item.events, counts_);
  return RunTimed(item);
}

void TreeArray::AddEvents(EventCounts& events) const { tritsim::AddEvents(counts_, events); }

}  // namespace tritsim
