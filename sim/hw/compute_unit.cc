#include "hw/compute_unit.h"

namespace tritsim {

TimedComputeUnit::TimedComputeUnit(sc_core::sc_module_name name, uint64_t period_ps,
                                   Scratchpad& sram)
    : sc_core::sc_module(name), period_ps_(period_ps), sram_(sram) {}

uint64_t TimedComputeUnit::Execute(const WorkItem& item) {
  AddEvents(item.events, counts_);
  const uint64_t now_ps = sc_core::sc_time_stamp().value();
  const uint64_t conflicts =
      sram_.ReadWindow(now_ps, now_ps + item.compute_cycles * period_ps_, item.sram_read_accesses);
  const uint64_t cycles = item.compute_cycles + conflicts;
  busy_cycles_ += item.compute_cycles;
  if (log_) log_->Busy(signal_, now_ps, now_ps + cycles * period_ps_);
  if (cycles) sc_core::wait(sc_core::sc_time::from_value(cycles * period_ps_));
  return conflicts;
}

}  // namespace tritsim
