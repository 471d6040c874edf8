// DMA engine: moves tiles between DRAM and the scratchpad, one transfer at a
// time, each with a fixed setup cost and at most dma.max_outstanding DRAM
// requests in flight. Stores have priority over loads.
//
// Threads: the engine's own SC_THREAD serves the queues. The sequencer's
// issue thread calls Load() (blocks until the tile is in the scratchpad);
// its compute thread calls PostStore() (returns at once) and
// WaitStoresDone() (blocks until every posted store has reached DRAM).
// A transfer is handed to the MemorySystem whole and the thread waits once
// for its completion time: no SystemC context switch per DRAM request.
#pragma once

#include <cstdint>
#include <deque>
#include <string>

#include <systemc>

#include "config/arch_config.h"
#include "hw/memory_system.h"
#include "hw/scratchpad.h"
#include "results/activity_log.h"
#include "results/run_result.h"

namespace tritsim {

class DmaEngine : public sc_core::sc_module {
 public:
  SC_HAS_PROCESS(DmaEngine);
  DmaEngine(sc_core::sc_module_name name, const DmaConfig& config, uint64_t period_ps,
            MemorySystem& memory, Scratchpad& sram, uint64_t bank_width_bytes);

  // Issue thread. Returns once [address, address+bytes) is in the scratchpad.
  // Returns the time the transfer started (after queueing), in ps.
  uint64_t Load(uint64_t address, uint64_t bytes);
  // Compute thread.
  void PostStore(uint64_t address, uint64_t bytes);
  void WaitStoresDone();

  uint64_t pending_stores() const { return stores_.size() + (busy_is_store_ ? 1 : 0); }
  // For the watchdog: what the engine's thread is doing.
  std::string state() const;
  // Optional: transfer intervals go to `log` (for --vcd).
  void TraceActivity(ActivityLog* log, int load_signal, int store_signal) {
    log_ = log;
    load_signal_ = load_signal;
    store_signal_ = store_signal;
  }
  // Events of one tile's transfers: scratchpad writes of its load, reads of
  // its store, and the DRAM bytes both move. Adds them into `events`.
  void CountTransferEvents(uint64_t load_bytes, uint64_t store_bytes, EventCounts& events) const;

  uint64_t bytes_loaded() const { return bytes_loaded_; }
  uint64_t bytes_stored() const { return bytes_stored_; }

 private:
  struct Job {
    uint64_t address = 0;
    uint64_t bytes = 0;
    bool is_write = false;
  };
  void Run();
  uint64_t AlignUp(uint64_t ps) const { return (ps + period_ps_ - 1) / period_ps_ * period_ps_; }
  void Transfer(const Job& job);

  DmaConfig config_;
  uint64_t period_ps_;
  MemorySystem& memory_;
  Scratchpad& sram_;
  uint64_t bank_width_bytes_;

  std::deque<Job> stores_;
  bool load_requested_ = false;
  bool load_done_ = false;
  Job load_;
  uint64_t load_start_ps_ = 0;
  bool busy_is_store_ = false;
  bool busy_ = false;
  sc_core::sc_event work_event_;
  sc_core::sc_event load_done_event_;
  sc_core::sc_event store_done_event_;
  uint64_t bytes_loaded_ = 0;
  uint64_t bytes_stored_ = 0;
  ActivityLog* log_ = nullptr;
  int load_signal_ = 0;
  int store_signal_ = 0;
};

}  // namespace tritsim
