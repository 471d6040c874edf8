// What the sequencer's compute thread sees of a compute unit: run one work
// item to completion, blocking the calling SC_THREAD for its cycles (the
// timing style of TLM-2.0 blocking transport).
#pragma once

#include <cstdint>

#include <systemc>

#include "hw/scratchpad.h"
#include "mapping/work_item.h"
#include "results/activity_log.h"
#include "results/run_result.h"

namespace tritsim {

// What one tile costs its unit, from the unit's own cost model.
struct TileCost {
  uint64_t cycles = 0;              // compute cycles, excluding scratchpad conflicts
  uint64_t sram_read_accesses = 0;  // bank accesses the unit reads (for conflicts and energy)
  EventCounts events;               // arithmetic and decoder events
};

// What running a tile took: its cost plus the conflicts its reads met.
struct TileRun {
  TileCost cost;
  uint64_t conflict_cycles = 0;
};

class ComputeUnitIf : public virtual sc_core::sc_interface {
 public:
  // REQUIRES: called from an SC_THREAD at a core-clock edge, with the item's
  // operands in the scratchpad. Blocks for the tile's cycles plus the
  // scratchpad conflicts, which it returns with the cost.
  virtual TileRun Execute(const WorkItem& item) = 0;
};

// The timing every compute unit shares: a tile's cycles (from the unit's
// Cost) plus the scratchpad conflicts its reads meet, waited out in the
// caller's thread, with busy cycles and the tile's energy events counted
// and, for --vcd, the busy interval logged.
class TimedComputeUnit : public sc_core::sc_module, public ComputeUnitIf {
 public:
  TimedComputeUnit(sc_core::sc_module_name name, uint64_t period_ps, Scratchpad& sram);

  TileRun Execute(const WorkItem& item) override;
  // This unit's cost model: cycles, scratchpad reads and events of a tile.
  // REQUIRES: work.computes.
  virtual TileCost Cost(const TileWork& work) const = 0;
  // Adds this unit's event counts into `events`.
  void AddEventsTo(EventCounts& events) const { AddEvents(counts_, events); }

  uint64_t busy_cycles() const { return busy_cycles_; }
  // Optional: busy intervals go to `log` as `signal` (for --vcd).
  void TraceActivity(ActivityLog* log, int signal) {
    log_ = log;
    signal_ = signal;
  }

 protected:
  const Scratchpad& sram() const { return sram_; }

 private:
  uint64_t period_ps_;
  Scratchpad& sram_;
  uint64_t busy_cycles_ = 0;
  EventCounts counts_;
  ActivityLog* log_ = nullptr;
  int signal_ = 0;
};

}  // namespace tritsim
