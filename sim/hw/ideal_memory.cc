#include "hw/ideal_memory.h"

#include <algorithm>
#include <cmath>

#include "common/error.h"

namespace tritsim {
namespace {

constexpr double kBytesPerGigabyte = 1e9;
constexpr double kFsPerSecond = 1e15;
constexpr double kPsPerNs = 1000.0;
constexpr uint64_t kFsPerPs = 1000;

}  // namespace

IdealMemory::IdealMemory(const DramConfig& dram) {
  if (!(dram.ideal_bandwidth_gbps > 0.0) || !(dram.ideal_latency_ns >= 0.0))
    throw InputError("architecture", 0, "dram.ideal_bandwidth_gbps",
                     "ideal memory needs a positive bandwidth and a non-negative latency");
  bytes_per_second_ = dram.ideal_bandwidth_gbps * kBytesPerGigabyte;
  burst_fs_ = static_cast<uint64_t>(
      std::llround(static_cast<double>(kBurstBytes) / bytes_per_second_ * kFsPerSecond));
  burst_fs_ = std::max<uint64_t>(burst_fs_, 1);
  latency_ps_ = static_cast<uint64_t>(std::llround(dram.ideal_latency_ns * kPsPerNs));
}

uint64_t IdealMemory::IssueOne(uint64_t arrival_ps, bool is_write) {
  bus_free_fs_ = std::max(bus_free_fs_, arrival_ps * kFsPerPs) + burst_fs_;
  ++(is_write ? stats_.writes : stats_.reads);
  busy_fs_ += burst_fs_;
  stats_.busy_ps = busy_fs_ / kFsPerPs;
  return (bus_free_fs_ + kFsPerPs - 1) / kFsPerPs + latency_ps_;
}

uint64_t IdealMemory::Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                               int64_t max_outstanding) {
  if (bytes == 0) return start_ps;
  const uint64_t first = address / kBurstBytes;
  const uint64_t count = (address + bytes + kBurstBytes - 1) / kBurstBytes - first;
  const size_t window = static_cast<size_t>(std::max<int64_t>(1, max_outstanding));
  window_ps_.assign(std::min<uint64_t>(window, count), start_ps);
  // Arrivals follow one another in order: each waits for the completion
  // max_outstanding requests back (the ring slot it reuses).
  uint64_t arrival_ps = start_ps;
  uint64_t done_ps = start_ps;
  size_t slot = 0;
  for (uint64_t i = 0; i < count; ++i) {
    arrival_ps = std::max(arrival_ps, window_ps_[slot]);
    done_ps = IssueOne(arrival_ps, is_write);
    window_ps_[slot] = done_ps;
    slot = slot + 1 == window_ps_.size() ? 0 : slot + 1;
  }
  return done_ps;
}

void IdealMemory::Finish(uint64_t /*end_ps*/) {}

}  // namespace tritsim
