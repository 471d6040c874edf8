#include "hw/tree_array.h"

namespace tritsim {

TreeArray::TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config,
                     uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

uint64_t TreeArray::Execute(const WorkItem& item) {
  counts_.weight_uses += item.weight_uses;
  counts_.weight_uses_zero += item.weight_uses_zero;
  counts_.accumulator_adds += item.accumulator_adds;
  counts_.decoder_bytes += item.decoder_bytes;
  return RunTimed(item);
}

void TreeArray::AddEvents(EventCounts& events) const {
  events.weight_uses += counts_.weight_uses;
  events.weight_uses_zero += counts_.weight_uses_zero;
  events.accumulator_adds += counts_.accumulator_adds;
  events.decoder_bytes += counts_.decoder_bytes;
}

}  // namespace tritsim
