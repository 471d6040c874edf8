// The accelerator top level: scratchpad, DMA engine, tree array, vector
// unit and sequencer, wired together, plus the memory system behind the
// DMA engine.
#pragma once

#include <memory>
#include <string>

#include <systemc>

#include "config/arch_config.h"
#include "hw/dma_engine.h"
#include "hw/memory_system.h"
#include "hw/scratchpad.h"
#include "hw/sequencer.h"
#include "hw/tree_array.h"
#include "hw/vector_unit.h"
#include "mapping/sim_options.h"
#include "results/run_result.h"
#include "trace/trace_source.h"

namespace tritsim {

class Accelerator : public sc_core::sc_module {
 public:
  Accelerator(sc_core::sc_module_name name, const ArchConfig& arch, const SimOptions& options,
              TraceSource& trace);

  bool finished() const { return sequencer_.finished(); }
  void RethrowIfFailed() const { sequencer_.RethrowIfFailed(); }
  std::string WaitState() const { return sequencer_.WaitState(); }

  // Everything measured, after the simulation has finished.
  void Collect(RunResult& result);
  // While running (from on_op_retired): the cumulative counters so far, for
  // a sampled run's per-unit differences. Fills cycles (the stalls charged
  // so far, which sum to them), stalls, events, dram, vector_busy_cycles and
  // sram_port_busy_cycles; not layers or phases (op_results() has the ops).
  void Snapshot(RunResult& result) const;
  const std::vector<OpResult>& op_results() const { return sequencer_.op_results(); }
  // The --vcd activity log, or null when none was asked for.
  const ActivityLog* activity() const { return activity_.get(); }

 private:
  // The unit counters every result holds (events, DRAM, busy cycles).
  void CountEvents(RunResult& result) const;

  ArchConfig arch_;
  std::unique_ptr<MemorySystem> memory_;
  std::unique_ptr<ActivityLog> activity_;
  uint64_t period_ps_;
  Scratchpad sram_;
  DmaEngine dma_;
  TreeArray tree_array_;
  VectorUnit vector_unit_;
  Sequencer sequencer_;
};

}  // namespace tritsim
