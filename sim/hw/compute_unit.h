// What the sequencer's compute thread sees of a compute unit: run one work
// item to completion, blocking the calling SC_THREAD for its cycles (the
// timing style of TLM-2.0 blocking transport).
#pragma once

#include <cstdint>

#include <systemc>

#include "results/run_result.h"
#include "mapping/work_item.h"
#include "hw/scratchpad.h"
#include "results/activity_log.h"

namespace tritsim {

class ComputeUnitIf : public virtual sc_core::sc_interface {
 public:
  // REQUIRES: called from an SC_THREAD at a core-clock edge, with the item's
  // operands in the scratchpad. Returns the cycles lost to scratchpad bank
  // conflicts (already included in the time waited).
  virtual uint64_t Execute(const WorkItem& item) = 0;
};

// The timing every compute unit shares: an item's cycles (from the tiler)
// plus the scratchpad conflicts its reads meet, waited out in the caller's
// thread, with busy cycles and the item's energy events counted and, for
// --vcd, the busy interval logged.
class TimedComputeUnit : public sc_core::sc_module, public ComputeUnitIf {
 public:
  TimedComputeUnit(sc_core::sc_module_name name, uint64_t period_ps, Scratchpad& sram);

  uint64_t Execute(const WorkItem& item) override;
  // Adds this unit's event counts into `events`.
  void AddEventsTo(EventCounts& events) const { AddEvents(counts_, events); }

  uint64_t busy_cycles() const { return busy_cycles_; }
  // Optional: busy intervals go to `log` as `signal` (for --vcd).
  void TraceActivity(ActivityLog* log, int signal) {
    log_ = log;
    signal_ = signal;
  }

 protected:
 private:
  uint64_t period_ps_;
  Scratchpad& sram_;
  uint64_t busy_cycles_ = 0;
  EventCounts counts_;
  ActivityLog* log_ = nullptr;
  int signal_ = 0;
};

}  // namespace tritsim
