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
// rules and allocates nothing per request. The earliest pick over the
// channels comes from a winner tree, so one channel's change costs
// log2(channels) steps, not a scan of every channel.
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
  DramMemory(const DramConfig& dram, RowOpening opening);

  uint64_t Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                    int64_t max_outstanding) override;
  void Finish(uint64_t end_ps) override;
  void SetCommandLog(DramCommandLog* log) override;
  const DramStats& stats() const override;
  uint64_t burst_bytes() const override { return map_.burst_bytes(); }
  double peak_bytes_per_second() const override { return peak_bytes_per_second_; }

 private:
  // Per-Transfer progress of the event loop.
  struct Progress {
    uint64_t count = 0;         // requests in this transfer
    uint64_t arrived = 0;       // requests already queued
    uint64_t picked = 0;        // requests already scheduled
    uint64_t now_ps = 0;        // time of the last event
    uint64_t done_ps = 0;       // latest completion so far
    uint64_t next_address = 0;  // first byte of the next request to arrive
    DramAddress next;           // its decoded coordinates
    size_t slot = 0;            // window slot of the next arrival
    size_t window = 1;          // window slots in use (min(max_outstanding, count))
    bool is_write = false;
  };

  // The event loop of Transfer; kOneChannel drops the channel indexing and
  // the winner tree when there is a single channel.
  template <bool kOneChannel>
  void RunEvents(Progress& p);
  template <bool kOneChannel>
  uint64_t ArrivalPs(const Progress& p) const;
  // The channel whose scheduler picks next (ties: lowest channel) and when.
  size_t EarliestChannel() const { return tree_channel_[1]; }
  uint64_t EarliestPs() const { return tree_ps_[1]; }
  // Refreshes the channel's leaf after a change to its queue, then replays
  // the matches on the path to the root, carrying the winner up.
  template <bool kOneChannel>
  void UpdatePick(size_t channel) {
    if (kOneChannel) {
      tree_ps_[1] = channels_.front().NextPickPs();
      return;
    }
    size_t node = leaves_ + channel;
    uint64_t ps = channels_[channel].NextPickPs();
    uint32_t who = static_cast<uint32_t>(channel);
    tree_ps_[node] = ps;
    for (; node > 1; node /= 2) {
      const size_t sibling = node ^ 1;
      const uint64_t other_ps = tree_ps_[sibling];
      // The left child (even index) covers the lower channels: it wins ties.
      const bool sibling_is_left = (node & 1) != 0;
      const bool other_wins = (other_ps < ps) | (sibling_is_left & (other_ps == ps));
      if (other_wins) {
        ps = other_ps;
        who = tree_channel_[sibling];
      }
      tree_ps_[node / 2] = ps;
      tree_channel_[node / 2] = who;
    }
  }
  template <bool kOneChannel>
  void Arrive(Progress& p, uint64_t when_ps);
  template <bool kOneChannel>
  void PickOn(Progress& p, size_t channel, uint64_t when_ps);
  void ReleaseLog();

  DramAddressMap map_;
  std::vector<DramChannel> channels_;
  double peak_bytes_per_second_ = 0.0;
  uint32_t banks_per_group_ = 1;
  // Completion of the request that last used each window slot (kUnknown
  // while it is still queued); slot i % max_outstanding.
  std::vector<uint64_t> window_ps_;
  // Winner tree of the channels' next picks, as two parallel arrays: leaf
  // leaves_ + c holds channels_[c].NextPickPs(), kept up to date after every
  // change to c (leaves past the last channel hold kNever); internal node n
  // in [1, leaves_) holds the earliest pick among the leaves below it and
  // its channel, the lowest on ties; its children are 2n and 2n + 1. With
  // one channel the root is the leaf itself (index 1).
  size_t leaves_ = 1;  // channels rounded up to a power of two
  std::vector<uint64_t> tree_ps_;
  std::vector<uint32_t> tree_channel_;
  mutable DramStats total_;
  DramCommandLog* log_ = nullptr;   // null: no command log
  uint64_t transfer_start_ps_ = 0;  // start_ps of the current Transfer
};

// Commands held by the log before it writes out what is safe (a batch keeps
// the scan over the channels rare; its size bounds the log's memory).
constexpr size_t kLogReleaseBatch = 4096;

size_t RoundUpToPowerOfTwo(size_t n) {
  size_t p = 1;
  while (p < n) p *= 2;
  return p;
}

DramMemory::DramMemory(const DramConfig& dram, RowOpening opening)
    : map_(dram), banks_per_group_(static_cast<uint32_t>(dram.banks_per_group)) {
  channels_.reserve(static_cast<size_t>(dram.channels));
  for (int64_t c = 0; c < dram.channels; ++c) channels_.emplace_back(dram, opening);
  leaves_ = RoundUpToPowerOfTwo(channels_.size());
  tree_ps_.assign(2 * leaves_, DramChannel::kNever);
  tree_channel_.assign(2 * leaves_, 0);
  for (size_t c = 0; c < leaves_; ++c) tree_channel_[leaves_ + c] = static_cast<uint32_t>(c);
  for (size_t node = leaves_; node-- > 1;) tree_channel_[node] = tree_channel_[2 * node];
  const uint64_t burst_ps = channels_.front().tck_ps() *
                            static_cast<uint64_t>(dram.timing.burst_length) / kDdrTransfersPerCycle;
  peak_bytes_per_second_ = static_cast<double>(dram.channels) *
                           static_cast<double>(map_.burst_bytes()) / static_cast<double>(burst_ps) *
                           kPsPerSecond;
}

// Earliest time the pending request may enter its queue, or kUnknown while
// it waits for a queue slot or for a still-queued request's completion.
template <bool kOneChannel>
uint64_t DramMemory::ArrivalPs(const Progress& p) const {
  if (!channels_[kOneChannel ? 0 : p.next.channel].HasRoom()) return kUnknown;
  const uint64_t gate_ps = window_ps_[p.slot];
  if (gate_ps == kUnknown) return kUnknown;
  return std::max(p.now_ps, gate_ps);
}

// Decodes the next request straight into its channel's queue. A push onto
// a non-empty queue leaves the channel's next pick time unchanged (it
// depends only on the oldest entry and the last pick).
template <bool kOneChannel>
void DramMemory::Arrive(Progress& p, uint64_t when_ps) {
  const uint32_t channel = kOneChannel ? 0 : p.next.channel;
  DramChannel& queue = channels_[channel];
  const bool was_empty = queue.Empty();
  DramRequest& r = queue.Push();
  r.row = p.next.row;
  r.arrival_ps = when_ps;
  r.bank = p.next.bank_group * banks_per_group_ + p.next.bank;
  r.bank_group = p.next.bank_group;
  r.tag = static_cast<uint32_t>(p.slot);
  r.column = p.next.column;
  r.is_write = p.is_write;
  queue.Queued(r);
  if (was_empty) {
    UpdatePick<kOneChannel>(channel);
  } else {
    queue.Arrived(when_ps);
  }
  window_ps_[p.slot] = kUnknown;
  p.now_ps = when_ps;
  p.slot = p.slot + 1 == p.window ? 0 : p.slot + 1;
  ++p.arrived;
  p.next_address += map_.burst_bytes();
  p.next = map_.Decode(p.next_address);
}

template <bool kOneChannel>
void DramMemory::PickOn(Progress& p, size_t channel, uint64_t when_ps) {
  const DramPick pick = channels_[channel].PickAt(when_ps);
  UpdatePick<kOneChannel>(channel);
  window_ps_[pick.tag] = pick.times.done_ps;
  p.done_ps = std::max(p.done_ps, pick.times.done_ps);
  p.now_ps = when_ps;
  ++p.picked;
  if (log_ != nullptr && log_->held() >= kLogReleaseBatch) ReleaseLog();
}

// Writes the logged commands no channel can precede any more. No request
// arrives before the current transfer's start (later transfers start no
// earlier), so an idle channel can do its refreshes due before then at
// once: it would do them first thing at its next pick anyway, so results do
// not change.
void DramMemory::ReleaseLog() {
  uint64_t floor_ps = DramChannel::kNever;
  for (DramChannel& c : channels_) {
    if (c.Empty()) c.Finish(transfer_start_ps_);
    floor_ps = std::min(floor_ps, c.CommandFloorPs(transfer_start_ps_));
  }
  log_->Release(floor_ps);
}

void DramMemory::SetCommandLog(DramCommandLog* log) {
  log_ = log;
  for (size_t c = 0; c < channels_.size(); ++c) {
    channels_[c].SetCommandLog(log, static_cast<uint32_t>(c));
  }
}

uint64_t DramMemory::Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                              int64_t max_outstanding) {
  if (bytes == 0) return start_ps;
  const uint64_t burst = map_.burst_bytes();
  Progress p;
  p.next_address = address / burst * burst;
  p.next = map_.Decode(p.next_address);
  p.count = (address + bytes + burst - 1) / burst - address / burst;
  p.now_ps = p.done_ps = transfer_start_ps_ = start_ps;
  p.is_write = is_write;
  const uint64_t window = static_cast<uint64_t>(std::max<int64_t>(1, max_outstanding));
  p.window = static_cast<size_t>(std::min(window, p.count));
  window_ps_.assign(p.window, start_ps);
  if (channels_.size() == 1) {
    RunEvents<true>(p);
  } else {
    RunEvents<false>(p);
  }
  return p.done_ps;
}

template <bool kOneChannel>
void DramMemory::RunEvents(Progress& p) {
  while (p.picked < p.count) {
    const uint64_t arrive_ps = p.arrived < p.count ? ArrivalPs<kOneChannel>(p) : kUnknown;
    const uint64_t pick_ps = EarliestPs();
    if (arrive_ps != kUnknown && arrive_ps <= pick_ps) {
      Arrive<kOneChannel>(p, arrive_ps);
    } else {
      PickOn<kOneChannel>(p, kOneChannel ? 0 : EarliestChannel(), pick_ps);
    }
  }
}

void DramMemory::Finish(uint64_t end_ps) {
  for (DramChannel& c : channels_) c.Finish(end_ps);
  if (log_ != nullptr) log_->Release(DramChannel::kNever);
}

const DramStats& DramMemory::stats() const {
  total_ = DramStats{};
  for (const DramChannel& c : channels_) AddStats(total_, c.stats());
  return total_;
}

}  // namespace

std::unique_ptr<MemorySystem> MakeMemorySystem(const DramConfig& dram, RowOpening opening) {
  if (dram.is_ideal()) return std::make_unique<IdealMemory>(dram);
  return std::make_unique<DramMemory>(dram, opening);
}

}  // namespace tritsim
