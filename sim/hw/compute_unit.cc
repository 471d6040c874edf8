#include "hw/compute_unit.h"

namespace tritsim {

TimedComputeUnit::TimedComputeUnit(sc_core::sc_module_name name, uint64_t period_ps,
                                   Scratchpad& sram)
    : sc_core::sc_module(name), period_ps_(period_ps), sram_(sram) {}

TileRun TimedComputeUnit::Execute(const WorkItem& item) {
  TileRun run;
  if (item.work.computes) run.cost = Cost(item.work);
  AddEvents(run.cost.events, counts_);
  const uint64_t now_ps = sc_core::sc_time_stamp().value();
  run.conflict_cycles =
      sram_.ReadWindow(now_ps, now_ps + run.cost.cycles * period_ps_, run.cost.sram_read_accesses);
  const uint64_t cycles = run.cost.cycles + run.conflict_cycles;
  busy_cycles_ += run.cost.cycles;
  if (log_) log_->Busy(signal_, now_ps, now_ps + cycles * period_ps_);
  if (cycles) sc_core::wait(sc_core::sc_time::from_value(cycles * period_ps_));
  return run;
}

}  // namespace tritsim
