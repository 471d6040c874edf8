// The "ideal" memory preset: a fixed latency behind one fixed-bandwidth bus.
// No banks, rows or refresh; for sanity runs that separate the accelerator
// from DRAM effects.
//
// Each request (one 64-byte burst) starts on the bus at the later of its
// arrival and the end of the previous burst, holds the bus for
// burst_bytes / ideal_bandwidth_gbps, and completes ideal_latency_ns after
// its bus time ends. Bus time is kept in femtoseconds so that bandwidths
// whose burst time is not a whole number of ps do not drift.
#pragma once

#include <cstdint>
#include <vector>

#include "hw/memory_system.h"

namespace tritsim {

class IdealMemory final : public MemorySystem {
 public:
  static constexpr uint64_t kBurstBytes = 64;

  // REQUIRES: ideal_bandwidth_gbps > 0, ideal_latency_ns >= 0.
  explicit IdealMemory(const DramConfig& dram);

  uint64_t Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                    int64_t max_outstanding) override;
  void Finish(uint64_t end_ps) override;
  const DramStats& stats() const override { return stats_; }
  uint64_t burst_bytes() const override { return kBurstBytes; }
  double peak_bytes_per_second() const override { return bytes_per_second_; }

 private:
  uint64_t IssueOne(uint64_t arrival_ps, bool is_write);

  double bytes_per_second_ = 0.0;
  uint64_t burst_fs_ = 1;  // bus time of one burst, fs
  uint64_t latency_ps_ = 0;
  uint64_t bus_free_fs_ = 0;         // end of the last burst's bus time, fs
  uint64_t busy_fs_ = 0;             // bus time of all bursts so far, fs
  std::vector<uint64_t> window_ps_;  // completions of the last max_outstanding requests
  DramStats stats_;
};

}  // namespace tritsim
