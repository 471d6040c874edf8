#include "hw/vector_unit.h"

namespace tritsim {

VectorUnit::VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config,
                       uint64_t period_ps, Scratchpad& sram)
    : sc_core::sc_module(name), config_(config), period_ps_(period_ps), sram_(sram) {}

uint64_t VectorUnit::Execute(const WorkItem& item) {
  const uint64_t now_ps = sc_core::sc_time_stamp().value();
  const uint64_t conflicts =
      sram_.ReadWindow(now_ps, now_ps + item.compute_cycles * period_ps_, item.sram_read_accesses);
  const uint64_t cycles = item.compute_cycles + conflicts;
  busy_cycles_ += item.compute_cycles;
  counts_.vector_macs += item.vector_macs;
  counts_.vector_special += item.vector_special;
  counts_.vector_elementwise += item.vector_elementwise;
  if (log_) log_->Busy(signal_, now_ps, now_ps + cycles * period_ps_);
  if (cycles) sc_core::wait(sc_core::sc_time::from_value(cycles * period_ps_));
  return conflicts;
}

void VectorUnit::AddEvents(EventCounts& events) const {
  events.vector_macs += counts_.vector_macs;
  events.vector_special += counts_.vector_special;
  events.vector_elementwise += counts_.vector_elementwise;
}

}  // namespace tritsim
