// MakeMemorySystem and the multi-channel DRAM memory system.
//
// A Transfer is simulated as a small discrete-event loop over two kinds of
// events, always taking the earliest (an arrival before a pick at the same
// time, so a pick sees everything that has arrived):
//  - the next request, in address order, enters its channel's queue at the
//    latest of start_ps, the completion of the request max_outstanding
//    earlier, the previous arrival, and a free slot in that queue (the DMA
//    engine issues in order, so a full queue holds back the requests behind);
//  - a channel's scheduler picks one queued request (DramChannel::Pick).
// Channels are otherwise independent. The loop is exact under the channel's
// rules and allocates nothing per request.
#include "hw/memory_system.h"

#include <algorithm>
#include <vector>

#include "hw/dram_address_map.h"
#include "hw/dram_channel.h"
#include "hw/ideal_memory.h"

namespace tritsim {
namespace {

constexpr uint64_t kUnknown = ~uint64_t{0};
constexpr double kPsPerSecond = 1e12;
constexpr uint64_t kDdrTransfersPerCycle = 2;

void AddStats(DramStats& sum, const DramStats& s) {
  sum.reads += s.reads;
  sum.writes += s.writes;
  sum.row_hits += s.row_hits;
  sum.row_misses += s.row_misses;
  sum.row_conflicts += s.row_conflicts;
  sum.activates += s.activates;
  sum.refreshes += s.refreshes;
  sum.busy_ps += s.busy_ps;
  sum.refresh_ps += s.refresh_ps;
}

class DramMemory final : public MemorySystem {
 public:
  explicit DramMemory(const DramConfig& dram);

  uint64_t Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                    int64_t max_outstanding) override;
  void Finish(uint64_t end_ps) override;
  const DramStats& stats() const override;
  uint64_t burst_bytes() const override { return map_.burst_bytes(); }
  double peak_bytes_per_second() const override { return peak_bytes_per_second_; }

 private:
  // Per-Transfer progress of the event loop.
  struct Progress {
    uint64_t first_burst_address = 0;
    uint64_t count = 0;    // requests in this transfer
    uint64_t arrived = 0;  // requests already queued
    uint64_t picked = 0;   // requests already scheduled
    uint64_t now_ps = 0;   // time of the last event
    uint64_t start_ps = 0;
    uint64_t done_ps = 0;  // latest completion so far
    size_t slot = 0;       // window slot of the next arrival
    bool is_write = false;
  };

  uint64_t NextAddress(const Progress& p) const {
    return p.first_burst_address + p.arrived * map_.burst_bytes();
  }
  uint32_t ChannelOf(const Progress& p) const {
    return channels_.size() == 1 ? 0 : map_.ChannelOf(NextAddress(p));
  }
  uint64_t ArrivalPs(const Progress& p, uint32_t channel) const;
  size_t EarliestPick(uint64_t& when_ps) const;
  void RescanEarliestPick();
  // Refreshes pick_ps_[channel] after a change to that channel's queue.
  void UpdatePick(size_t channel) {
    pick_ps_[channel] = channels_[channel].NextPickPs();
    if (pick_ps_.size() > 1) UpdateEarliestPick(channel);
  }
  void UpdateEarliestPick(size_t channel);
  void Arrive(Progress& p, uint32_t channel, uint64_t when_ps);
  void PickOn(Progress& p, size_t channel, uint64_t when_ps);

  DramAddressMap map_;
  std::vector<DramChannel> channels_;
  double peak_bytes_per_second_ = 0.0;
  uint32_t banks_per_group_ = 1;
  // Completion of the request that last used each window slot (kUnknown
  // while it is still queued); slot i % max_outstanding.
  std::vector<uint64_t> window_ps_;
  // channels_[c].NextPickPs(), kept up to date after every change to c.
  std::vector<uint64_t> pick_ps_;
  uint64_t min_pick_ps_ = DramChannel::kNever;  // min of pick_ps_ (2+ channels only)
  size_t min_channel_ = 0;                      // lowest channel holding it
  mutable DramStats total_;
};

DramMemory::DramMemory(const DramConfig& dram)
    : map_(dram), banks_per_group_(static_cast<uint32_t>(dram.banks_per_group)) {
  channels_.reserve(static_cast<size_t>(dram.channels));
  for (int64_t c = 0; c < dram.channels; ++c) channels_.emplace_back(dram);
  pick_ps_.assign(channels_.size(), DramChannel::kNever);
  const uint64_t burst_ps = channels_.front().tck_ps() *
                            static_cast<uint64_t>(dram.timing.burst_length) / kDdrTransfersPerCycle;
  peak_bytes_per_second_ = static_cast<double>(dram.channels) *
                           static_cast<double>(map_.burst_bytes()) / static_cast<double>(burst_ps) *
                           kPsPerSecond;
}

// Earliest time the pending request may enter its queue, or kUnknown while
// it waits for a queue slot or for a still-queued request's completion.
uint64_t DramMemory::ArrivalPs(const Progress& p, uint32_t channel) const {
  if (!channels_[channel].HasRoom()) return kUnknown;
  const uint64_t gate_ps = window_ps_[p.slot];
  if (gate_ps == kUnknown) return kUnknown;
  return std::max(p.now_ps, gate_ps);
}

// The channel whose scheduler picks next and when (ties: lowest channel).
size_t DramMemory::EarliestPick(uint64_t& when_ps) const {
  if (pick_ps_.size() == 1) {
    when_ps = pick_ps_[0];
    return 0;
  }
  when_ps = min_pick_ps_;
  return min_channel_;
}

void DramMemory::RescanEarliestPick() {
  min_channel_ = 0;
  min_pick_ps_ = pick_ps_[0];
  for (size_t c = 1; c < pick_ps_.size(); ++c) {
    if (pick_ps_[c] < min_pick_ps_) {
      min_pick_ps_ = pick_ps_[c];
      min_channel_ = c;
    }
  }
}

// Keeps (min_pick_ps_, min_channel_) the lowest-numbered channel with the
// earliest pick, rescanning only when the current earliest one moved later.
void DramMemory::UpdateEarliestPick(size_t channel) {
  const uint64_t t = pick_ps_[channel];
  if (t < min_pick_ps_ || (t == min_pick_ps_ && channel < min_channel_)) {
    min_pick_ps_ = t;
    min_channel_ = channel;
  } else if (channel == min_channel_ && t != min_pick_ps_) {
    RescanEarliestPick();
  }
}

// Decodes the next request straight into its channel's queue.
void DramMemory::Arrive(Progress& p, uint32_t channel, uint64_t when_ps) {
  const DramAddress where = map_.Decode(NextAddress(p));
  DramRequest& r = channels_[channel].Push();
  r.row = where.row;
  r.arrival_ps = when_ps;
  r.bank = where.bank_group * banks_per_group_ + where.bank;
  r.bank_group = where.bank_group;
  r.tag = static_cast<uint32_t>(p.slot);
  r.is_write = p.is_write;
  UpdatePick(channel);
  window_ps_[p.slot] = kUnknown;
  p.now_ps = when_ps;
  p.slot = p.slot + 1 == window_ps_.size() ? 0 : p.slot + 1;
  ++p.arrived;
}

void DramMemory::PickOn(Progress& p, size_t channel, uint64_t when_ps) {
  const DramPick pick = channels_[channel].Pick();
  UpdatePick(channel);
  window_ps_[pick.tag] = pick.times.done_ps;
  p.done_ps = std::max(p.done_ps, pick.times.done_ps);
  p.now_ps = when_ps;
  ++p.picked;
}

uint64_t DramMemory::Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                              int64_t max_outstanding) {
  if (bytes == 0) return start_ps;
  const uint64_t burst = map_.burst_bytes();
  Progress p;
  p.first_burst_address = address / burst * burst;
  p.count = (address + bytes + burst - 1) / burst - address / burst;
  p.now_ps = p.start_ps = p.done_ps = start_ps;
  p.is_write = is_write;
  const uint64_t window = static_cast<uint64_t>(std::max<int64_t>(1, max_outstanding));
  window_ps_.assign(static_cast<size_t>(std::min(window, p.count)), start_ps);
  uint32_t next_channel = ChannelOf(p);
  while (p.picked < p.count) {
    const uint64_t arrive_ps = p.arrived < p.count ? ArrivalPs(p, next_channel) : kUnknown;
    uint64_t pick_ps = kUnknown;
    const size_t channel = EarliestPick(pick_ps);
    if (arrive_ps != kUnknown && arrive_ps <= pick_ps) {
      Arrive(p, next_channel, arrive_ps);
      next_channel = ChannelOf(p);
    } else {
      PickOn(p, channel, pick_ps);
    }
  }
  return p.done_ps;
}

void DramMemory::Finish(uint64_t end_ps) {
  for (DramChannel& c : channels_) c.Finish(end_ps);
}

const DramStats& DramMemory::stats() const {
  total_ = DramStats{};
  for (const DramChannel& c : channels_) AddStats(total_, c.stats());
  return total_;
}

}  // namespace

std::unique_ptr<MemorySystem> MakeMemorySystem(const DramConfig& dram) {
  if (dram.is_ideal()) return std::make_unique<IdealMemory>(dram);
  return std::make_unique<DramMemory>(dram);
}

}  // namespace tritsim
