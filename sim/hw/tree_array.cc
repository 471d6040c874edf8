#include "hw/tree_array.h"

namespace tritsim {

TreeArray::TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config,
                     uint64_t period_ps, Scratchpad& sram)
    : sc_core::sc_module(name), config_(config), period_ps_(period_ps), sram_(sram) {}

uint64_t TreeArray::Execute(const WorkItem& item) {
  const uint64_t now_ps = sc_core::sc_time_stamp().value();
  const uint64_t conflicts =
      sram_.ReadWindow(now_ps, now_ps + item.compute_cycles * period_ps_, item.sram_read_accesses);
  const uint64_t cycles = item.compute_cycles + conflicts;
  busy_cycles_ += item.compute_cycles;
  counts_.weight_uses += item.weight_uses;
  counts_.weight_uses_zero += item.weight_uses_zero;
  counts_.accumulator_adds += item.accumulator_adds;
  counts_.decoder_bytes += item.decoder_bytes;
  if (log_) log_->Busy(signal_, now_ps, now_ps + cycles * period_ps_);
  if (cycles) sc_core::wait(sc_core::sc_time::from_value(cycles * period_ps_));
  return conflicts;
}

void TreeArray::AddEvents(EventCounts& events) const {
  events.weight_uses += counts_.weight_uses;
  events.weight_uses_zero += counts_.weight_uses_zero;
  events.accumulator_adds += counts_.accumulator_adds;
  events.decoder_bytes += counts_.decoder_bytes;
}

}  // namespace tritsim
