// Tree array: T adder trees of fan-in F. Each cycle a tree takes F int8
// activations and F trits (each selects +x, -x or 0), sums them through
// ceil(log2 F) adder levels plus a configurable register cut, and adds the
// result into an A-bit accumulator. Weight-stationary: a tree holds one
// F-trit weight column chunk while the M activation rows of a GEMM stream
// through, so a pass over one weight set takes max(M, weight fetch) cycles.
// The cycle count of a tile is computed by the tiler; this unit waits it
// out, adds scratchpad conflicts, and counts its energy events.
#pragma once

#include <systemc>

#include "config/arch_config.h"
#include "engine/run_result.h"
#include "hw/compute_unit.h"
#include "hw/scratchpad.h"
#include "report/vcd_writer.h"

namespace tritsim {

class TreeArray : public sc_core::sc_module, public ComputeUnitIf {
 public:
  TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config, uint64_t period_ps,
            Scratchpad& sram);

  uint64_t Execute(const WorkItem& item) override;

  // Adds this unit's counts into `events`.
  void AddEvents(EventCounts& events) const;
  uint64_t busy_cycles() const { return busy_cycles_; }
  // Optional: busy intervals go to `log` as `signal` (for --vcd).
  void TraceActivity(ActivityLog* log, int signal) {
    log_ = log;
    signal_ = signal;
  }

 private:
  TreeArrayConfig config_;
  uint64_t period_ps_;
  Scratchpad& sram_;
  uint64_t busy_cycles_ = 0;
  EventCounts counts_;
  ActivityLog* log_ = nullptr;
  int signal_ = 0;
};

}  // namespace tritsim
