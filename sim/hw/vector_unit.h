// Vector unit: L int8 multiply-accumulate lanes plus special-function
// hardware (exp, reciprocal square root, activation functions). Runs every
// op that is not a ternary GEMM: attention over the KV cache, softmax,
// RMSNorm, absmax requantization, residual adds, and GEMMs with 8/16-bit
// weights. Cycle counts come from the tiler (docs/engine.md gives the
// formulas); this unit waits them out, adds scratchpad conflicts, and
// counts its energy events.
#pragma once

#include <systemc>

#include "config/arch_config.h"
#include "engine/run_result.h"
#include "hw/compute_unit.h"
#include "hw/scratchpad.h"
#include "report/vcd_writer.h"

namespace tritsim {

class VectorUnit : public sc_core::sc_module, public ComputeUnitIf {
 public:
  VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config, uint64_t period_ps,
             Scratchpad& sram);

  uint64_t Execute(const WorkItem& item) override;

  void AddEvents(EventCounts& events) const;
  uint64_t busy_cycles() const { return busy_cycles_; }
  // Optional: busy intervals go to `log` as `signal` (for --vcd).
  void TraceActivity(ActivityLog* log, int signal) {
    log_ = log;
    signal_ = signal;
  }

 private:
  VectorUnitConfig config_;
  uint64_t period_ps_;
  Scratchpad& sram_;
  uint64_t busy_cycles_ = 0;
  EventCounts counts_;
  ActivityLog* log_ = nullptr;
  int signal_ = 0;
};

}  // namespace tritsim
