#include "hw/dma_engine.h"

namespace tritsim {

using sc_core::sc_time;
using sc_core::sc_time_stamp;
using sc_core::wait;

DmaEngine::DmaEngine(sc_core::sc_module_name name, const DmaConfig& config, uint64_t period_ps,
                     MemorySystem& memory, Scratchpad& sram, uint64_t bank_width_bytes)
    : sc_core::sc_module(name),
      config_(config),
      period_ps_(period_ps),
      memory_(memory),
      sram_(sram),
      bank_width_bytes_(bank_width_bytes) {
  SC_THREAD(Run);
}

uint64_t DmaEngine::Load(uint64_t address, uint64_t bytes) {
  load_ = {address, bytes, false};
  load_requested_ = true;
  load_done_ = false;
  work_event_.notify(sc_core::SC_ZERO_TIME);
  while (!load_done_) wait(load_done_event_);
  return load_start_ps_;
}

void DmaEngine::PostStore(uint64_t address, uint64_t bytes) {
  stores_.push_back({address, bytes, true});
  work_event_.notify(sc_core::SC_ZERO_TIME);
}

void DmaEngine::WaitStoresDone() {
  while (pending_stores() > 0) wait(store_done_event_);
}

std::string DmaEngine::state() const {
  if (busy_) return busy_is_store_ ? "a store to DRAM" : "a load from DRAM";
  return "idle with " + std::to_string(stores_.size()) + " stores queued";
}

void DmaEngine::Transfer(const Job& job) {
  const uint64_t start_ps =
      AlignUp(sc_time_stamp().value()) + uint64_t(config_.setup_cycles) * period_ps_;
  const uint64_t now_ps = sc_time_stamp().value();
  if (start_ps > now_ps) wait(sc_time::from_value(start_ps - now_ps));
  const uint64_t done_ps =
      memory_.Transfer(job.address, job.bytes, job.is_write, start_ps, config_.max_outstanding);
  const uint64_t accesses = (job.bytes + bank_width_bytes_ - 1) / bank_width_bytes_;
  if (job.is_write) {
    bytes_stored_ += job.bytes;
  } else {
    bytes_loaded_ += job.bytes;
    sram_.RecordWrite(start_ps, done_ps, accesses);
  }
  if (log_) log_->Busy(job.is_write ? store_signal_ : load_signal_, start_ps, done_ps);
  if (done_ps > start_ps) wait(sc_time::from_value(done_ps - start_ps));
  if (job.is_write) sram_.ReadWindow(start_ps, start_ps, accesses);  // counts the reads only
}

void DmaEngine::Run() {
  for (;;) {
    while (stores_.empty() && !load_requested_) wait(work_event_);
    busy_ = true;
    if (!stores_.empty()) {
      const Job job = stores_.front();
      stores_.pop_front();
      busy_is_store_ = true;
      Transfer(job);
      busy_is_store_ = false;
      store_done_event_.notify(sc_core::SC_ZERO_TIME);
    } else {
      load_requested_ = false;
      load_start_ps_ = AlignUp(sc_time_stamp().value());
      Transfer(load_);
      load_done_ = true;
      load_done_event_.notify(sc_core::SC_ZERO_TIME);
    }
    busy_ = false;
  }
}

void DmaEngine::CountTransferEvents(uint64_t load_bytes, uint64_t store_bytes,
                                    EventCounts& events) const {
  events.sram_writes += sram_.AccessesFor(load_bytes);
  events.sram_reads += sram_.AccessesFor(store_bytes);
  events.dram_bytes_read += load_bytes;
  events.dram_bytes_written += store_bytes;
}

}  // namespace tritsim
