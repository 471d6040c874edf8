// One DRAM channel: bank groups, banks with open rows, JEDEC timing state,
// all-bank refresh, and a first-ready / first-come-first-served scheduler
// (FR-FCFS, Rixner et al., ISCA 2000) over a bounded queue that opens rows
// for queued requests while other banks stream row hits.
//
// Plain C++, driven by the memory system's event loop (memory_system.cc),
// which itself runs inside one DMA engine call: not thread-safe, no SystemC.
// Times are integer picoseconds; every command issues on a DRAM clock edge.
//
// Timing model, per request (one burst):
//  - ACT needs the bank precharged and tRP since its PRE, tRC since the
//    bank's last ACT, tRRD_S / tRRD_L since the channel's last ACT in another
//    / the same bank group, and at most four ACTs in any tFAW window.
//  - CAS needs tRCD since ACT, tCCD_S / tCCD_L since the last CAS in another /
//    the same bank group, a free data bus, and for a read tWTR_S / tWTR_L
//    after the end of the last write data in another / the same bank group.
//    Write data may start only kReadToWriteTurnaroundCycles after the end of
//    read data (bus turnaround; common practice, about two tCK for DDR4).
//  - PRE needs tRAS since ACT, tRTP since a read CAS, tWR after the end of
//    write data.
//  - Read data ends at CAS + CL + BL/2 tCK, write data at CAS + CWL + BL/2.
//  - Open page: a row stays open until a request to another row of the bank
//    needs it closed. Closed page: every access auto-precharges as early as
//    tRAS / tRTP / tWR allow.
//  - Refresh: an all-bank refresh is due every tREFI, the first at tREFI. A
//    request whose first command would issue at or after the deadline waits
//    for it; the refresh precharges all banks (respecting tRAS / tRTP / tWR),
//    issues tRP later, blocks every bank for tRFC and leaves all rows closed.
//    Deadlines stay on the tREFI grid even when one refresh slips.
// Scheduling. A pick happens at a decision time (NextPickPs) and schedules
// one column command (CAS): the oldest ready row hit if there is one, else
// the oldest request, with whatever PRE / ACT it still needs. The pick then
// opens rows ahead: up to its CAS time (and before the next refresh
// deadline) it issues PRE / ACT, oldest request first, for queued requests
// whose row is not open, as soon as tRP / tRAS / tRC / tRRD_S / tRRD_L /
// tFAW allow, never closing a row that a queued request still hits (common
// practice). So activates overlap the row-hit bursts of other banks. A
// request that arrives while the channel waits for its next pick gets its
// PRE / ACT ahead from its arrival (Arrived), up to that pick.
// Every command kind issues in time order, which keeps the "allowed from"
// state below exact.
// Simplifications (documented, deliberate): the command bus is not modelled
// (two commands may issue on the same edge); column commands issue in the
// order requests were picked; refresh is never postponed or pulled in.
#pragma once

#include <algorithm>
#include <array>
#include <cstdint>
#include <vector>

#include "config/arch_config.h"
#include "hw/dram_command_log.h"
#include "results/run_result.h"

namespace tritsim {

// One burst waiting in a channel's queue.
struct DramRequest {
  uint64_t row = 0;
  uint64_t arrival_ps = 0;  // when it entered the controller queue
  uint32_t bank = 0;        // flat bank index: bank_group * banks_per_group + bank
  uint32_t bank_group = 0;
  uint32_t tag = 0;     // caller's handle, returned by Pick()
  uint32_t column = 0;  // burst index in the row; for the command log only
  bool is_write = false;
};

// Command and data times of one scheduled request. kNoCommand where the
// request needed no such command (a row hit has no PRE or ACT). PRE / ACT
// issued ahead for the request (opened while other banks streamed) are
// reported with the first CAS to that row.
struct DramCommandTimes {
  static constexpr uint64_t kNoCommand = ~uint64_t{0};
  uint64_t pre_ps = kNoCommand;
  uint64_t act_ps = kNoCommand;
  uint64_t cas_ps = 0;
  uint64_t done_ps = 0;  // last data beat on the bus
};

// When the scheduler may open rows: ahead for any queued request while
// other banks stream (the default, see the file comment), or in order, only
// for the request it picks (a plain FR-FCFS controller; a baseline for tests).
enum class RowOpening : uint8_t { kAhead, kInOrder };

// What Pick() scheduled.
struct DramPick {
  uint32_t tag = 0;
  DramCommandTimes times;
};

// What a caller that keeps no command times needs of a pick (small enough
// to come back in registers).
struct DramPickEnd {
  uint64_t done_ps = 0;  // last data beat on the bus
  uint32_t tag = 0;
};

class DramChannel {
 public:
  // Bus turnaround from the end of read data to the start of write data, nCK
  // (common practice: about two clocks for DDR4 preamble and turnaround).
  static constexpr int64_t kReadToWriteTurnaroundCycles = 2;
  static constexpr uint64_t kNever = ~uint64_t{0};

  // REQUIRES: `dram` validated (bank_groups <= kMaxBankGroups, positive
  // timing). Allocates the bank table and the queue once, here.
  explicit DramChannel(const DramConfig& dram, RowOpening opening = RowOpening::kAhead);

  bool HasRoom() const { return queued_ < capacity_; }
  bool Empty() const { return queued_ == 0; }

  // REQUIRES: HasRoom(); arrival_ps not earlier than any queued request's.
  void Enqueue(const DramRequest& request) {
    DramRequest& slot = Push();
    slot = request;
    Queued(slot);
  }

  // Appends an entry and returns it for the caller to fill in place (no
  // copy). REQUIRES: HasRoom(); the caller fills every field and calls
  // Queued(entry) before any other call on this channel, with the same arrival
  // order rule as Enqueue.
  DramRequest& Push() {
    DramRequest& slot = queue_[Slot(queued_)];
    ++queued_;
    return slot;
  }

  // When the scheduler will make its next pick: kNever if the queue is
  // empty, else the later of the last pick's first command and the oldest
  // arrival, on a clock edge. Every queued request is eligible then.
  uint64_t NextPickPs() const {
    if (queued_ == 0) return kNever;
    const uint64_t oldest = queue_[head_].arrival_ps;
    // pick_ok_ps_ is on a clock edge; only an arrival can be off the grid.
    return oldest <= pick_ok_ps_ ? pick_ok_ps_ : AlignUp(oldest);
  }

  // Picks one queued request by FR-FCFS at NextPickPs() and schedules its
  // commands (doing any refresh that falls due first). A request counts as
  // first-ready if its row is open in its bank and ACT + tRCD has passed.
  // REQUIRES: !Empty().
  DramPick Pick() { return PickAt(NextPickPs()); }
  // Pick() for a caller that already holds NextPickPs().
  // REQUIRES: !Empty(), now_ps == NextPickPs().
  DramPick PickAt(uint64_t now_ps);
  // PickAt for the memory system's event loop: the same pick, returning only
  // its tag and the end of its data.
  DramPickEnd PickEndAt(uint64_t now_ps);

  // Does every refresh whose deadline is before end_ps.
  void Finish(uint64_t end_ps);

  // Sends every command from now on to `log` as channel `channel`; null
  // (the default) logs nothing. `log` must outlive the channel's use.
  void SetCommandLog(DramCommandLog* log, uint32_t channel) {
    log_ = log;
    log_channel_ = channel;
  }
  // Counts `r`, the entry just filled in after Push: a hit on its bank's open
  // row, or a request that needs its row opened.
  void Queued(const DramRequest& r) {
    Bank& b = banks_[r.bank];
    if (b.open_row == r.row) {
      ++b.queued_hits;
    } else {
      QueuedUnopened(r, queued_ - 1);
    }
  }

  // A request has just been queued behind others at now_ps, while the
  // channel waits for its next pick: opens its row ahead now (PRE / ACT up
  // to that pick) instead of at the pick, as a controller deciding every
  // clock would. REQUIRES: now_ps not earlier than the last pick or arrival.
  void Arrived(uint64_t now_ps) {
    // ArrivedSlow's two steps, tested here: most arrivals need neither.
    const bool refresh_due = now_ps >= next_refresh_ps_;
    const bool rows_to_open = unopened_ > 0 && pick_ok_ps_ >= ahead_retry_ps_;
    if (open_ahead_ && now_ps < pick_ok_ps_ && (refresh_due || rows_to_open)) ArrivedSlow(now_ps);
  }

  // No command this channel issues from now on is earlier than this, given
  // that no request arrives before `arrivals_from_ps` (for the command log).
  // With rows opened ahead, an arrival may issue a PRE / ACT at once.
  uint64_t CommandFloorPs(uint64_t arrivals_from_ps) const {
    uint64_t decisions = Empty() ? std::max(pick_ok_ps_, arrivals_from_ps) : pick_ok_ps_;
    if (open_ahead_) decisions = std::min(decisions, AlignUp(arrivals_from_ps));
    return std::min(next_refresh_ps_, decisions);
  }

  const DramStats& stats() const { return stats_; }
  uint64_t tck_ps() const { return tck_ps_; }

  // ---- Steady runs (memory_system.cc skips whole periods of them). ----
  // Counts the steps whose timing may depend on the refresh deadline or on
  // rows being opened: general picks, passes opening rows ahead, refreshes,
  // PRE and ACT, requests queued for a row not open, and the first column
  // command to a row opened ahead. A stretch with none of them only streams
  // ready row hits to rows that were open before it.
  uint64_t slow_steps() const { return slow_steps_; }
  // The column command of the last pick (every pick of a stretch without
  // slow steps is a CAS, so this is the latest command of the stretch).
  uint64_t last_pick_ps() const { return pick_ok_ps_; }
  uint64_t next_refresh_ps() const { return next_refresh_ps_; }
  // Writes everything the channel's future decisions depend on,
  // relative to `floor_ps` (the caller's current event time): times at or
  // after the floor as their distance from it, earlier "allowed from" times
  // as themselves with kBeforeFloor set, times compared with each other
  // (arrivals, the last pick) exactly. Window tags are written relative to
  // the caller's next window slot `slot` (of `window`). If a look one period
  // later writes words that agree (SameWord, word by word), the
  // channel's decisions in the rest of this transfer are those of the
  // period moved by the difference of the floors, until the refresh
  // deadline.
  static constexpr uint64_t kBeforeFloor = uint64_t{1} << 63;
  // A time relative to `floor_ps`, 0 at or before it; kNever stays itself
  // (for probes and the caller's window gates, where an earlier time only
  // means "no constraint").
  static uint64_t SinceFloor(uint64_t ps, uint64_t floor_ps) {
    if (ps == kNever) return ps;
    return ps > floor_ps ? ps - floor_ps : 0;
  }
  // Writes ShapeWords() words at `out`; returns the end.
  uint64_t* WriteShape(uint64_t floor_ps, size_t slot, size_t window, uint64_t* out) const;
  size_t ShapeWords() const;
  // Whether the shape WriteShape would write now repeats `earlier`, written
  // one period of delta_ps before (SameWord, word by word), without writing
  // it: the end of the channel's words in `earlier`, or null if they differ.
  const uint64_t* MatchShape(uint64_t floor_ps, size_t slot, size_t window, uint64_t delta_ps,
                             const uint64_t* earlier) const;
  // Whether word `later` of a shape, written one period of delta_ps after
  // `earlier`, repeats it: equal, or both times before their floors (tagged
  // kBeforeFloor) and moved by exactly delta_ps (written in the period,
  // before the later look's floor).
  static bool SameWord(uint64_t earlier, uint64_t later, uint64_t delta_ps) {
    if (earlier == later) return true;
    const bool both_before =
        (earlier & later & kBeforeFloor) != 0 && earlier != kNever && later != kNever;
    return both_before && (later & ~kBeforeFloor) == (earlier & ~kBeforeFloor) + delta_ps;
  }
  // A few words of the shape that change with nearly every request outside
  // a steady run (queue length, last pick, oldest arrival, CAS constraint,
  // queued hits at the two ends of the queue).
  static constexpr size_t kProbeWords = 6;
  // Writes them at `out`; returns the end.
  uint64_t* WriteProbe(uint64_t floor_ps, uint64_t* out) const;
  // Moves the channel `times` periods ahead along a steady run whose first
  // look was at `floor_ps`: every time at or after that floor (written in
  // the period) by delta_ps, while earlier ones stay, queued tags by tag_shift window slots,
  // queued columns by column_shift, and the stats by `times` x per_period.
  // The refresh deadline stays where it is; the ACT constraints too (only
  // slow steps use or change them). REQUIRES: no command log.
  void Advance(uint64_t floor_ps, uint64_t delta_ps, size_t tag_shift, size_t window,
               uint32_t column_shift, const DramStats& per_period, uint64_t times);

  static constexpr int kMaxBankGroups = 16;

 private:
  static constexpr uint64_t kNoRow = ~uint64_t{0};
  static constexpr size_t kFawActs = 4;  // ACTs allowed in one tFAW window (JESD79-4)

  // Timing parameters converted to ps.
  struct TimingPs {
    uint64_t CL, CWL, tRCD, tRP, tRAS, tRC, tCCD_S, tCCD_L, tRRD_S, tRRD_L, tFAW, tWR;
    uint64_t tWTR_S, tWTR_L, tRTP, tRFC, tREFI, burst, rd_to_wr;
  };
  // How the row now open was opened ahead, for the stats of its first CAS.
  enum class Ahead : uint8_t { kNone, kMiss, kConflict };
  // Earliest times, ps, at which the next command of each kind may issue to
  // one bank. Stored as "allowed from" so that no state means time 0.
  struct Bank {
    uint64_t open_row = kNoRow;
    uint64_t cas_ok_ps = 0;  // ACT + tRCD
    uint64_t pre_ok_ps = 0;  // max(ACT + tRAS, read CAS + tRTP, write end + tWR)
    uint64_t act_ok_ps = 0;  // max(PRE + tRP, ACT + tRC, end of refresh)
    uint64_t ahead_pre_ps = DramCommandTimes::kNoCommand;  // PRE issued ahead, if any
    uint64_t ahead_act_ps = DramCommandTimes::kNoCommand;  // ACT issued ahead, if any
    uint32_t queued_hits = 0;                              // counted queued requests to open_row
    uint64_t ahead_pass = 0;  // last pass of OpenRowsAheadSlow that looked at this bank
    Ahead ahead = Ahead::kNone;
  };

  static TimingPs ToPs(const DramTiming& t, uint64_t tck_ps);
  DramPick PickAny(uint64_t now_ps);
  template <class Reduce>
  auto PickReduced(uint64_t now_ps, Reduce reduce);
  DramPick PickOldestHit(uint64_t cas_ps);
  size_t ChooseFrFcfs(uint64_t now_ps) const;
  bool IsReadyHit(const DramRequest& r, uint64_t now_ps) const;
  DramCommandTimes Plan(const DramRequest& r, uint64_t now_ps) const;
  uint64_t PlanAct(const DramRequest& r, uint64_t after_ps) const;
  uint64_t PlanCas(const DramRequest& r, uint64_t after_ps) const;
  DramCommandTimes Commit(const DramRequest& r, const DramCommandTimes& t);
  void CommitAct(const DramRequest& r, uint64_t act_ps);
  void CommitPre(uint32_t bank, uint64_t pre_ps);
  void CommitCas(const DramRequest& r, const DramCommandTimes& t);
  void AutoPrecharge(uint32_t bank);
  void CountKind(const DramRequest& r, DramCommandTimes& reported);
  void CountAhead(Bank& b, DramCommandTimes& reported);
  void Refresh();
  void RemoveAt(size_t age);
  void QueuedUnopened(const DramRequest& r, size_t age);
  // The request leaves the queue with its CAS (its row is open by then).
  void Leave(const DramRequest& r) {
    if (--banks_[r.bank].queued_hits == 0 && unopened_ > 0) ahead_retry_ps_ = 0;
  }
  uint64_t AheadPs(const DramRequest& r, uint64_t after_ps) const;
  // Calls visit(t) on every column-side "allowed from" time: what the
  // row-hit path reads and writes, so what a look's shape holds (Aged) and
  // what Advance moves. Channel is DramChannel or const DramChannel.
  template <class Channel, class Visit>
  static void ForEachColumnTime(Channel& c, Visit&& visit);
  // Calls put(word) on every word of the shape, in order (WriteShape and
  // MatchShape).
  template <class Put>
  void EmitShape(uint64_t floor_ps, size_t slot, size_t window, Put&& put) const;
  void OpenRow(uint32_t bank, uint64_t row);
  void CloseRow(Bank& b);
  // Opening rows ahead (see the file comment); commands in [now_ps, horizon_ps].
  void OpenRowsAhead(uint64_t now_ps, uint64_t horizon_ps) {
    if (unopened_ > 0 && horizon_ps >= ahead_retry_ps_ && open_ahead_)
      OpenRowsAheadSlow(now_ps, horizon_ps);
  }
  void OpenRowsAheadSlow(uint64_t now_ps, uint64_t horizon_ps);
  void ArrivedSlow(uint64_t now_ps);
  uint64_t LastUsefulActPs() const;
  uint64_t OpenAheadFor(const DramRequest& r, uint64_t now_ps, uint64_t last_pre_ps,
                        uint64_t last_act_ps);
  void PrechargeAhead(uint32_t bank, uint64_t pre_ps);
  void ActivateAhead(const DramRequest& r, uint64_t act_ps);
  void Log(DramCommand cmd, uint64_t time_ps, uint32_t bank, uint64_t row, uint32_t column) const {
    if (log_ != nullptr) LogSlow(cmd, time_ps, bank, row, column);
  }
  void LogSlow(DramCommand cmd, uint64_t time_ps, uint32_t bank, uint64_t row,
               uint32_t column) const;
  size_t Slot(size_t age) const {
    const size_t i = head_ + age;
    return i >= capacity_ ? i - capacity_ : i;
  }
  const DramRequest& At(size_t age) const { return queue_[Slot(age)]; }
  uint64_t AlignUp(uint64_t ps) const {
    if (OnClockEdge(ps)) return ps;  // the common case, without a division
    return ps + (tck_ps_ - ps % tck_ps_);
  }
  // ps % tck_ps_ == 0, by multiplication: with tck = odd * 2^k, ps is a
  // multiple iff rotate_right(ps * odd^-1 mod 2^64, k) <= (2^64 - 1) / tck
  // (Granlund & Montgomery, PLDI 1994; Warren, Hacker's Delight, 10-17).
  bool OnClockEdge(uint64_t ps) const {
    const uint64_t x = ps * edge_.odd_inverse;
    const uint64_t rotated = (x >> edge_.shift) | (x << ((64 - edge_.shift) & 63));
    return rotated <= edge_.limit;
  }
  struct EdgeTest {
    uint64_t odd_inverse = 1;  // inverse of tck's odd part, mod 2^64
    unsigned shift = 0;        // k: tck's trailing zero bits
    uint64_t limit = ~uint64_t{0};
  };
  static EdgeTest MakeEdgeTest(uint64_t tck_ps);

  TimingPs t_{};
  uint64_t tck_ps_ = 1;
  EdgeTest edge_;  // for OnClockEdge
  bool closed_page_ = false;
  bool open_ahead_ = true;  // RowOpening::kAhead
  uint32_t banks_per_group_ = 1;

  std::vector<Bank> banks_;
  // Channel-wide "allowed from" times, ps.
  uint64_t act_any_ok_ps_ = 0;                              // last ACT + tRRD_S
  std::array<uint64_t, kMaxBankGroups> act_group_ok_ps_{};  // last ACT in group + tRRD_L
  std::array<uint64_t, kFawActs> faw_ok_ps_{};              // each of the last 4 ACTs + tFAW
  size_t faw_next_ = 0;                                     // oldest entry of faw_ok_ps_
  uint64_t cas_any_ok_ps_ = 0;                              // last CAS + tCCD_S
  std::array<uint64_t, kMaxBankGroups> cas_group_ok_ps_{};  // last CAS in group + tCCD_L
  uint64_t rd_after_wr_any_ok_ps_ = 0;                      // write data end + tWTR_S
  std::array<uint64_t, kMaxBankGroups> rd_after_wr_group_ok_ps_{};  // + tWTR_L, same group
  uint64_t rd_data_ok_ps_ = 0;                                      // earliest start of read data
  uint64_t wr_data_ok_ps_ = 0;                                      // earliest start of write data
  uint64_t next_refresh_ps_ = 0;                                    // next refresh deadline
  uint64_t pick_ok_ps_ = 0;  // first command of the last pick
  // Row opening ahead: every queued request is counted in its bank's
  // queued_hits or in unopened_; and a time before which no PRE / ACT ahead
  // can issue (0: look again).
  size_t unopened_ = 0;       // queued requests whose row is not open
  size_t unopened_from_ = 0;  // requests older than this age are all hits
  uint64_t ahead_retry_ps_ = 0;
  uint64_t ahead_pass_ = 0;        // passes of OpenRowsAheadSlow so far
  uint64_t slow_steps_ = 0;        // see slow_steps()
  DramCommandLog* log_ = nullptr;  // null: no command log
  uint32_t log_channel_ = 0;

  // Queue: a ring in arrival order (age 0 = oldest).
  std::vector<DramRequest> queue_;
  size_t capacity_ = 1;
  size_t head_ = 0;
  size_t queued_ = 0;

  DramStats stats_;
};

// ---- Hot path, inline: the common pick of a ready row hit. ----

inline bool DramChannel::IsReadyHit(const DramRequest& r, uint64_t now_ps) const {
  const Bank& b = banks_[r.bank];
  return b.open_row == r.row && b.cas_ok_ps <= now_ps;
}

inline uint64_t DramChannel::PlanCas(const DramRequest& r, uint64_t after_ps) const {
  uint64_t cas = std::max(after_ps, cas_any_ok_ps_);
  cas = std::max(cas, cas_group_ok_ps_[r.bank_group]);
  if (r.is_write) {
    if (cas + t_.CWL < wr_data_ok_ps_) cas = wr_data_ok_ps_ - t_.CWL;
    return cas;
  }
  cas = std::max(cas, rd_after_wr_any_ok_ps_);
  cas = std::max(cas, rd_after_wr_group_ok_ps_[r.bank_group]);
  if (cas + t_.CL < rd_data_ok_ps_) cas = rd_data_ok_ps_ - t_.CL;
  return cas;
}

inline void DramChannel::CommitCas(const DramRequest& r, const DramCommandTimes& t) {
  Bank& b = banks_[r.bank];
  Log(r.is_write ? DramCommand::kWr : DramCommand::kRd, t.cas_ps, r.bank, r.row, r.column);
  cas_any_ok_ps_ = t.cas_ps + t_.tCCD_S;
  cas_group_ok_ps_[r.bank_group] = t.cas_ps + t_.tCCD_L;
  if (r.is_write) {
    b.pre_ok_ps = std::max(b.pre_ok_ps, t.done_ps + t_.tWR);
    rd_after_wr_any_ok_ps_ = t.done_ps + t_.tWTR_S;
    rd_after_wr_group_ok_ps_[r.bank_group] = t.done_ps + t_.tWTR_L;
    rd_data_ok_ps_ = t.done_ps;
    wr_data_ok_ps_ = t.done_ps;
  } else {
    b.pre_ok_ps = std::max(b.pre_ok_ps, t.cas_ps + t_.tRTP);
    rd_data_ok_ps_ = t.done_ps;
    wr_data_ok_ps_ = t.done_ps + t_.rd_to_wr;
  }
  if (closed_page_) AutoPrecharge(r.bank);
}

// The oldest request is a ready row hit and its CAS comes before the next
// refresh: what PickAny would do in that case, without the general steps.
inline DramPick DramChannel::PickOldestHit(uint64_t cas_ps) {
  const DramRequest& r = queue_[head_];
  DramPick pick;
  pick.tag = r.tag;
  pick.times.cas_ps = cas_ps;
  pick.times.done_ps = cas_ps + (r.is_write ? t_.CWL : t_.CL) + t_.burst;
  Bank& b = banks_[r.bank];
  if (b.ahead == Ahead::kNone) {
    ++stats_.row_hits;
  } else {
    CountAhead(b, pick.times);
  }
  ++(r.is_write ? stats_.writes : stats_.reads);
  stats_.busy_ps += t_.burst;
  Leave(r);
  CommitCas(r, pick.times);
  pick_ok_ps_ = cas_ps;
  head_ = Slot(1);
  --queued_;
  if (unopened_from_ > 0) --unopened_from_;
  return pick;
}

// PickAt's two paths, each reduced by `reduce` before they meet (so that a
// small result stays in registers).
template <class Reduce>
inline auto DramChannel::PickReduced(uint64_t now_ps, Reduce reduce) {
  const DramRequest& oldest = queue_[head_];
  if (now_ps < next_refresh_ps_ && IsReadyHit(oldest, now_ps)) {
    // A ready hit's CAS waits only for channel-wide constraints (ACT + tRCD has passed).
    const uint64_t cas_ps = PlanCas(oldest, now_ps);
    if (cas_ps < next_refresh_ps_) {
      const DramPick pick = PickOldestHit(cas_ps);
      OpenRowsAhead(now_ps, cas_ps);
      return reduce(pick);
    }
  }
  return reduce(PickAny(now_ps));
}

inline DramPick DramChannel::PickAt(uint64_t now_ps) {
  return PickReduced(now_ps, [](const DramPick& pick) { return pick; });
}

inline DramPickEnd DramChannel::PickEndAt(uint64_t now_ps) {
  return PickReduced(now_ps, [](const DramPick& pick) {
    return DramPickEnd{pick.times.done_ps, pick.tag};
  });
}

}  // namespace tritsim
