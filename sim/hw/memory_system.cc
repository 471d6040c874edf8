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
//
// Steady runs. Inside a row, a long transfer settles into a run that
// repeats itself: every `period` requests, the same banks get the same
// kind of requests, and the whole state (queues, banks, window, timing
// constraints) is the state of a period earlier moved later in time. Every
// rule of the channel is invariant under a shift of time by whole DRAM
// clocks except the refresh deadline, and the requests' coordinates repeat
// with the period until the column wraps into the next bank or row. So
// when two looks at the state one period apart agree (after the relative
// encoding of DramChannel::WriteShape), only ready row hits were streamed
// in between (no slow step: no refresh, no general pick, no row opened),
// the shift is a whole number of clocks, and the next k periods' requests
// repeat the last period's coordinates and end before every channel's
// refresh deadline, then the next k periods are exactly the last one moved
// k times: the loop moves the state there and adds k times the period's
// stats (a fast-forward of a periodic steady state; the results are
// identical to simulating every request, which the tests check).
#include "hw/memory_system.h"

#include <algorithm>
#include <vector>

#include "hw/dram_address_map.h"
#include "hw/dram_channel.h"
#include "hw/ideal_memory.h"

namespace tritsim {
namespace {

constexpr uint64_t kUnknown = ~uint64_t{0};
static_assert(kUnknown == DramChannel::kNever,
              "window gates are written with DramChannel::SinceFloor");
constexpr double kPsPerSecond = 1e12;
constexpr uint64_t kDdrTransfersPerCycle = 2;

void AddStats(DramStats& sum, const DramStats& s) {
  for (uint64_t DramStats::*field : kDramStatsFields) sum.*field += s.*field;
}

class DramMemory final : public MemorySystem {
 public:
  DramMemory(const DramConfig& dram, RowOpening opening, SteadyRuns steady);

  uint64_t Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                    int64_t max_outstanding) override;
  void Finish(uint64_t end_ps) override;
  void SetCommandLog(DramCommandLog* log) override;
  const DramStats& stats() const override;
  uint64_t skipped_requests() const override { return skipped_requests_; }
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
    uint64_t next_look = 0;  // picked count of the next look for a steady run
  };
  // The whole state at a look that may start a steady run of `period`
  // requests (its probe matched the probe of a look `period` earlier).
  struct Candidate {
    bool valid = false;
    uint64_t period = 0;
    uint64_t picked = 0;      // Progress::picked then
    uint64_t arrived = 0;     // Progress::arrived then
    uint64_t floor_ps = 0;    // Progress::now_ps then
    uint64_t slow_steps = 0;  // summed over the channels
    std::vector<uint64_t> shape;
    std::vector<DramStats> stats;  // per channel
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
  void LookForSteadyRun(Progress& p);
  template <class Put>
  void EmitWindowShape(const Progress& p, Put&& put) const;
  size_t ShapeWords(const Progress& p) const;
  void WriteShape(const Progress& p, std::vector<uint64_t>& out) const;
  bool ShapeRepeats(const Progress& p, const std::vector<uint64_t>& earlier,
                    uint64_t delta_ps) const;
  void WriteProbe(const Progress& p, uint64_t slow_steps, uint64_t* out) const;  // probe_words_
  uint64_t RequestsLeftInRun(const Progress& p) const;
  uint64_t PeriodsAhead(const Progress& p, uint64_t period, uint64_t delta_ps) const;
  template <bool kOneChannel>
  void SkipPeriods(Progress& p, uint64_t periods, uint64_t delta_ps);
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
  // Steady runs (see the file comment): a look every look_every_ picks
  // writes a cheap probe of the state into a ring of kProbes entries
  // (probe_words_ each; the newest over the oldest). A probe equal to the
  // one j looks earlier makes a candidate of period j x look_every_, whose
  // whole state is compared a period later.
  static constexpr size_t kProbes = 8;
  bool skip_steady_ = true;
  uint64_t look_every_ = 1;  // a whole number of column strides
  size_t probe_words_ = 0;
  std::vector<uint64_t> probe_ring_;  // kProbes x probe_words_
  size_t probes_held_ = 0;
  size_t probe_next_ = 0;           // ring entry the next probe goes to
  uint64_t probed_slow_steps_ = 0;  // the channels' slow steps at the last look
  Candidate candidate_;
  uint64_t skipped_requests_ = 0;
  DramCommandLog* log_ = nullptr;   // null: no command log
  uint64_t transfer_start_ps_ = 0;  // start_ps of the current Transfer
};

// Commands held by the log before it writes out what is safe (a batch keeps
// the scan over the channels rare; its size bounds the log's memory).
constexpr size_t kLogReleaseBatch = 4096;

// The window slot `ahead` slots after `slot` (ahead <= window), wrapping.
size_t SlotAhead(size_t slot, size_t ahead, size_t window) {
  return slot + ahead < window ? slot + ahead : slot + ahead - window;
}

size_t RoundUpToPowerOfTwo(size_t n) {
  size_t p = 1;
  while (p < n) p *= 2;
  return p;
}

// Window slots in a probe, spread evenly over the window.
constexpr size_t kProbeWindowSlots = 8;
// Probe words per request a look may cost on average: a look every
// probe_words_ / kProbeWordsPerRequest requests or more.
constexpr uint64_t kProbeWordsPerRequest = 2;

// a - b, field by field (b an earlier reading of the same counters).
DramStats StatsSince(const DramStats& a, const DramStats& b) {
  DramStats d;
  for (uint64_t DramStats::*field : kDramStatsFields) d.*field = a.*field - b.*field;
  return d;
}

DramMemory::DramMemory(const DramConfig& dram, RowOpening opening, SteadyRuns steady)
    : map_(dram),
      banks_per_group_(static_cast<uint32_t>(dram.banks_per_group)),
      skip_steady_(steady == SteadyRuns::kSkip) {
  channels_.reserve(static_cast<size_t>(dram.channels));
  for (int64_t c = 0; c < dram.channels; ++c) channels_.emplace_back(dram, opening);
  leaves_ = RoundUpToPowerOfTwo(channels_.size());
  tree_ps_.assign(2 * leaves_, DramChannel::kNever);
  tree_channel_.assign(2 * leaves_, 0);
  for (size_t c = 0; c < leaves_; ++c) tree_channel_[leaves_ + c] = static_cast<uint32_t>(c);
  for (size_t node = leaves_; node-- > 1;) tree_channel_[node] = tree_channel_[2 * node];
  probe_words_ = 2 + kProbeWindowSlots + channels_.size() * DramChannel::kProbeWords;
  probe_ring_.assign(kProbes * probe_words_, 0);
  const uint64_t stride = map_.column_stride();
  look_every_ = stride;
  while (look_every_ * kProbeWordsPerRequest < probe_words_) look_every_ += stride;
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
  p.slot = SlotAhead(p.slot, 1, p.window);
  ++p.arrived;
  p.next_address += map_.burst_bytes();
  map_.Next(p.next);
}

template <bool kOneChannel>
void DramMemory::PickOn(Progress& p, size_t channel, uint64_t when_ps) {
  const DramPickEnd pick = channels_[channel].PickEndAt(when_ps);
  UpdatePick<kOneChannel>(channel);
  window_ps_[pick.tag] = pick.done_ps;
  p.done_ps = std::max(p.done_ps, pick.done_ps);
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
  // Steady runs start afresh in every transfer; none are looked for with a
  // command log (every command is written out) or a window narrower than a
  // probe's window slots (such transfers are short or latency-bound anyway).
  candidate_.valid = false;
  probes_held_ = 0;
  p.next_look =
      skip_steady_ && log_ == nullptr && p.window >= kProbeWindowSlots ? look_every_ : kUnknown;
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
      if (p.picked == p.next_look) LookForSteadyRun<kOneChannel>(p);
    }
  }
}

// The whole state, relative to the current event time (see
// DramChannel::WriteShape): the latest completion, the window's gates from
// the next slot on, and every channel.
template <class Put>
void DramMemory::EmitWindowShape(const Progress& p, Put&& put) const {
  const uint64_t floor_ps = p.now_ps;
  put(DramChannel::SinceFloor(p.done_ps, floor_ps));
  for (size_t i = 0, slot = p.slot; i < p.window; ++i, slot = SlotAhead(slot, 1, p.window)) {
    put(DramChannel::SinceFloor(window_ps_[slot], floor_ps));  // kUnknown is kNever
  }
}

size_t DramMemory::ShapeWords(const Progress& p) const {
  size_t words = 1 + p.window;
  for (const DramChannel& c : channels_) words += c.ShapeWords();
  return words;
}

void DramMemory::WriteShape(const Progress& p, std::vector<uint64_t>& out) const {
  out.resize(ShapeWords(p));  // mostly the size it had: nothing to fill
  uint64_t* w = out.data();
  EmitWindowShape(p, [&](uint64_t word) { *w++ = word; });
  for (const DramChannel& c : channels_) w = c.WriteShape(p.now_ps, p.slot, p.window, w);
}

// Whether the shape WriteShape would write now repeats `earlier`, written
// one period of delta_ps before (DramChannel::SameWord, word by word),
// compared in place: a check that passes writes nothing.
bool DramMemory::ShapeRepeats(const Progress& p, const std::vector<uint64_t>& earlier,
                              uint64_t delta_ps) const {
  if (earlier.size() != ShapeWords(p)) return false;
  const uint64_t* e = earlier.data();
  bool same = true;
  EmitWindowShape(p, [&](uint64_t word) { same &= DramChannel::SameWord(*e++, word, delta_ps); });
  for (auto c = channels_.begin(); same && c != channels_.end(); ++c) {
    e = c->MatchShape(p.now_ps, p.slot, p.window, delta_ps, e);
    same = e != nullptr;
  }
  return same;
}

// A few words of the state that change with nearly every request outside a
// steady run: the slow steps so far, the latest completion, window gates
// spread over the window, and each channel's DramChannel::WriteProbe.
void DramMemory::WriteProbe(const Progress& p, uint64_t slow_steps, uint64_t* out) const {
  const uint64_t floor_ps = p.now_ps;
  *out++ = slow_steps;
  *out++ = DramChannel::SinceFloor(p.done_ps, floor_ps);
  for (size_t i = 0; i < kProbeWindowSlots; ++i) {
    const size_t ahead = i * p.window / kProbeWindowSlots;  // spread over the window
    *out++ = DramChannel::SinceFloor(window_ps_[SlotAhead(p.slot, ahead, p.window)], floor_ps);
  }
  for (const DramChannel& c : channels_) out = c.WriteProbe(floor_ps, out);
}

// Every look_every_ picks. A due candidate whose whole state this look
// repeats, moved by whole clocks, with no slow step in between, is a steady
// run: skip the periods ahead that repeat it. Otherwise probe, and make
// this look a candidate when its probe repeats an earlier one.
template <bool kOneChannel>
void DramMemory::LookForSteadyRun(Progress& p) {
  p.next_look = p.picked + look_every_;
  uint64_t slow_steps = 0;
  for (const DramChannel& c : channels_) slow_steps += c.slow_steps();
  Candidate& c = candidate_;
  if (c.valid) {
    if (p.picked - c.picked < c.period) return;
    c.valid = false;
    if (slow_steps == c.slow_steps && p.arrived - c.arrived == c.period) {
      const uint64_t delta_ps = p.now_ps - c.floor_ps;
      if (delta_ps > 0 && delta_ps % channels_.front().tck_ps() == 0 &&
          ShapeRepeats(p, c.shape, delta_ps)) {
        const uint64_t periods = PeriodsAhead(p, c.period, delta_ps);
        if (periods > 0) {
          SkipPeriods<kOneChannel>(p, periods, delta_ps);
          probes_held_ = 0;
          return;
        }
      }
    }
  }
  // Slow steps only add up, so no probe taken before the last one can be
  // repeated: a look after slow steps empties the ring and takes no probe
  // (the state right after them is still settling).
  if (slow_steps != probed_slow_steps_) {
    probed_slow_steps_ = slow_steps;
    probes_held_ = 0;
    return;
  }
  // The probe goes straight into its ring entry, then meets the older ones.
  const auto probe = probe_ring_.begin() + static_cast<std::ptrdiff_t>(probe_next_ * probe_words_);
  WriteProbe(p, slow_steps, &*probe);
  size_t repeats = 0;  // looks back to an equal probe
  for (size_t j = 1; j <= probes_held_ && j < kProbes && repeats == 0; ++j) {
    const size_t entry = (probe_next_ + kProbes - j) % kProbes;
    const auto older = probe_ring_.begin() + static_cast<std::ptrdiff_t>(entry * probe_words_);
    if (std::equal(probe, probe + static_cast<std::ptrdiff_t>(probe_words_), older)) repeats = j;
  }
  probe_next_ = (probe_next_ + 1) % kProbes;
  probes_held_ = std::min(probes_held_ + 1, kProbes);
  // A candidate pays off only if, after its check a period from now, at
  // least one more period of the run is left to skip.
  if (repeats == 0 || RequestsLeftInRun(p) < 2 * repeats * look_every_) return;
  c.valid = true;
  c.period = repeats * look_every_;
  c.picked = p.picked;
  c.arrived = p.arrived;
  c.floor_ps = p.now_ps;
  c.slow_steps = slow_steps;
  WriteShape(p, c.shape);
  c.stats.resize(channels_.size());
  for (size_t i = 0; i < channels_.size(); ++i) c.stats[i] = channels_[i].stats();
}

// Requests from the next arrival up to the column wrapping into the next
// bank or row, less one, and no more than the transfer has left less one.
uint64_t DramMemory::RequestsLeftInRun(const Progress& p) const {
  if (p.arrived >= p.count) return 0;
  const uint64_t row_span = map_.column_stride() * map_.columns();
  const uint64_t burst = p.next_address / map_.burst_bytes();
  return std::min((burst / row_span + 1) * row_span - burst, p.count - p.arrived - 1);
}

// How many more periods repeat the last one: their requests keep the
// coordinates of the requests a period earlier (the column does not wrap
// into the next bank or row), at least one request of the transfer is left
// after them, and every channel's last CAS, moved by that many periods, is
// still before its refresh deadline.
uint64_t DramMemory::PeriodsAhead(const Progress& p, uint64_t period, uint64_t delta_ps) const {
  const uint64_t burst = p.next_address / map_.burst_bytes();
  if (burst / map_.column_stride() % map_.columns() < period / map_.column_stride()) return 0;
  uint64_t periods = RequestsLeftInRun(p) / period;
  for (const DramChannel& c : channels_) {
    if (c.last_pick_ps() >= c.next_refresh_ps()) return 0;
    periods = std::min(periods, (c.next_refresh_ps() - 1 - c.last_pick_ps()) / delta_ps);
  }
  return periods;
}

// Moves the state `periods` periods of the candidate ahead.
template <bool kOneChannel>
void DramMemory::SkipPeriods(Progress& p, uint64_t periods, uint64_t delta_ps) {
  const uint64_t period = candidate_.period;
  const uint64_t requests = periods * period;
  const uint64_t moved_ps = periods * delta_ps;
  const auto slots = static_cast<size_t>(requests % p.window);
  const auto columns = static_cast<uint32_t>(periods * (period / map_.column_stride()));
  for (size_t c = 0; c < channels_.size(); ++c) {
    const DramStats per_period = StatsSince(channels_[c].stats(), candidate_.stats[c]);
    channels_[c].Advance(candidate_.floor_ps, moved_ps, slots, p.window, columns, per_period,
                         periods);
  }
  // Window slot i now holds what slot i - slots held, moved in time.
  std::rotate(window_ps_.begin(), window_ps_.end() - static_cast<std::ptrdiff_t>(slots),
              window_ps_.end());
  for (uint64_t& ps : window_ps_) {
    if (ps != kUnknown) ps += moved_ps;
  }
  p.now_ps += moved_ps;
  p.done_ps += moved_ps;
  p.slot = SlotAhead(p.slot, slots, p.window);
  p.arrived += requests;
  p.picked += requests;
  skipped_requests_ += requests;
  p.next_look = p.picked + look_every_;
  p.next_address += requests * map_.burst_bytes();
  p.next = map_.Decode(p.next_address);
  for (size_t c = 0; c < channels_.size(); ++c) UpdatePick<kOneChannel>(c);
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

std::unique_ptr<MemorySystem> MakeMemorySystem(const DramConfig& dram, RowOpening opening,
                                               SteadyRuns steady) {
  if (dram.is_ideal()) return std::make_unique<IdealMemory>(dram);
  return std::make_unique<DramMemory>(dram, opening, steady);
}

}  // namespace tritsim
