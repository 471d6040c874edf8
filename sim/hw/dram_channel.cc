#include "hw/dram_channel.h"

#include <algorithm>
#include <cmath>

#include "common/error.h"

namespace tritsim {
namespace {

constexpr double kPsPerNs = 1000.0;
constexpr uint64_t kDdrTransfersPerCycle = 2;  // double data rate

uint64_t Max(uint64_t a, uint64_t b) { return a > b ? a : b; }

}  // namespace

DramChannel::TimingPs DramChannel::ToPs(const DramTiming& t, uint64_t tck_ps) {
  auto ps = [tck_ps](int64_t cycles) { return static_cast<uint64_t>(cycles) * tck_ps; };
  TimingPs p{};
  p.CL = ps(t.CL);
  p.CWL = ps(t.CWL);
  p.tRCD = ps(t.tRCD);
  p.tRP = ps(t.tRP);
  p.tRAS = ps(t.tRAS);
  p.tRC = ps(t.tRC);
  p.tCCD_S = ps(t.tCCD_S);
  p.tCCD_L = ps(t.tCCD_L);
  p.tRRD_S = ps(t.tRRD_S);
  p.tRRD_L = ps(t.tRRD_L);
  p.tFAW = ps(t.tFAW);
  p.tWR = ps(t.tWR);
  p.tWTR_S = ps(t.tWTR_S);
  p.tWTR_L = ps(t.tWTR_L);
  p.tRTP = ps(t.tRTP);
  p.tRFC = ps(t.tRFC);
  p.tREFI = ps(t.tREFI);
  p.burst = ps(t.burst_length) / kDdrTransfersPerCycle;
  p.rd_to_wr = ps(kReadToWriteTurnaroundCycles);
  return p;
}

DramChannel::DramChannel(const DramConfig& dram, RowOpening opening)
    : open_ahead_(opening == RowOpening::kAhead) {
  if (dram.bank_groups < 1 || dram.bank_groups > kMaxBankGroups || dram.banks_per_group < 1)
    throw InputError("architecture", 0, "dram.bank_groups",
                     "bank organisation out of range (1..16 groups, >= 1 bank per group)");
  tck_ps_ = static_cast<uint64_t>(std::llround(dram.timing.tCK_ns * kPsPerNs));
  if (tck_ps_ == 0) throw InputError("architecture", 0, "dram.timing.tCK_ns", "rounds to 0 ps");
  edge_ = MakeEdgeTest(tck_ps_);
  t_ = ToPs(dram.timing, tck_ps_);
  closed_page_ = dram.page_policy == PagePolicy::kClosed;
  banks_per_group_ = static_cast<uint32_t>(dram.banks_per_group);
  banks_.assign(static_cast<size_t>(dram.bank_groups * dram.banks_per_group), Bank{});
  capacity_ = static_cast<size_t>(std::max<int64_t>(1, dram.queue_depth));
  queue_.assign(capacity_, DramRequest{});
  next_refresh_ps_ = t_.tREFI;
}

DramChannel::EdgeTest DramChannel::MakeEdgeTest(uint64_t tck_ps) {
  EdgeTest e;
  uint64_t odd = tck_ps;
  while ((odd & 1) == 0) {
    odd >>= 1;
    ++e.shift;
  }
  // Newton's iteration doubles the correct low bits of the inverse; an odd
  // number is its own inverse mod 8 (3 bits), so 5 steps give 96 >= 64.
  constexpr int kNewtonSteps = 5;
  uint64_t inverse = odd;
  for (int i = 0; i < kNewtonSteps; ++i) inverse *= 2 - odd * inverse;
  e.odd_inverse = inverse;
  e.limit = ~uint64_t{0} / tck_ps;
  return e;
}

size_t DramChannel::ChooseFrFcfs(uint64_t now_ps) const {
  if (closed_page_) return 0;  // every access auto-precharges: never a row hit
  for (size_t age = 0; age < queued_; ++age) {
    if (IsReadyHit(At(age), now_ps)) return age;
  }
  return 0;  // no ready row hit: the oldest
}

void DramChannel::RemoveAt(size_t age) {
  // Keep arrival order: shift the older entries up by one.
  for (size_t a = age; a > 0; --a) queue_[Slot(a)] = queue_[Slot(a - 1)];
  head_ = Slot(1);
  --queued_;
  if (age < unopened_from_) --unopened_from_;
}

uint64_t DramChannel::PlanAct(const DramRequest& r, uint64_t after_ps) const {
  uint64_t act = Max(after_ps, banks_[r.bank].act_ok_ps);
  act = Max(act, act_any_ok_ps_);
  act = Max(act, act_group_ok_ps_[r.bank_group]);
  return Max(act, faw_ok_ps_[faw_next_]);
}

DramCommandTimes DramChannel::Plan(const DramRequest& r, uint64_t now_ps) const {
  const Bank& b = banks_[r.bank];
  DramCommandTimes t;
  uint64_t cas_after = Max(now_ps, b.cas_ok_ps);
  if (b.open_row != r.row) {
    uint64_t act_after = now_ps;
    if (b.open_row != kNoRow) {
      t.pre_ps = Max(now_ps, b.pre_ok_ps);
      act_after = t.pre_ps + t_.tRP;
    }
    t.act_ps = PlanAct(r, act_after);
    cas_after = t.act_ps + t_.tRCD;
  }
  t.cas_ps = PlanCas(r, cas_after);
  t.done_ps = t.cas_ps + (r.is_write ? t_.CWL : t_.CL) + t_.burst;
  return t;
}

void DramChannel::CountAhead(Bank& b, DramCommandTimes& reported) {
  ++slow_steps_;  // the first column command to a row opened ahead ends the bank's "ahead"
  ++(b.ahead == Ahead::kConflict ? stats_.row_conflicts : stats_.row_misses);
  if (reported.pre_ps == DramCommandTimes::kNoCommand) reported.pre_ps = b.ahead_pre_ps;
  if (reported.act_ps == DramCommandTimes::kNoCommand) reported.act_ps = b.ahead_act_ps;
  b.ahead = Ahead::kNone;
}

// Counts the request as a hit, miss or conflict by the bank state before
// its own commands; a row opened ahead for it counts as what it was then.
void DramChannel::CountKind(const DramRequest& r, DramCommandTimes& reported) {
  Bank& b = banks_[r.bank];
  const uint64_t open = b.open_row;
  if (b.ahead != Ahead::kNone) {
    CountAhead(b, reported);
  } else if (open == r.row) {
    ++stats_.row_hits;
  } else if (open == kNoRow) {
    ++stats_.row_misses;
  } else {
    ++stats_.row_conflicts;
  }
  ++(r.is_write ? stats_.writes : stats_.reads);
  stats_.busy_ps += t_.burst;
}

void DramChannel::QueuedUnopened(const DramRequest& r, size_t age) {
  ++slow_steps_;
  ++unopened_;
  unopened_from_ = std::min(unopened_from_, age);
  if (ahead_retry_ps_ > 0) ahead_retry_ps_ = std::min(ahead_retry_ps_, AheadPs(r, 0));
}

// Queued requests to `row` of `bank` become hits.
void DramChannel::OpenRow(uint32_t bank, uint64_t row) {
  Bank& b = banks_[bank];
  b.open_row = row;
  for (size_t age = unopened_from_; age < queued_; ++age) {
    const DramRequest& r = At(age);
    if (r.bank == bank && r.row == row) {
      ++b.queued_hits;
      --unopened_;
    }
  }
}

// The bank's queued hits now need a row again.
void DramChannel::CloseRow(Bank& b) {
  b.open_row = kNoRow;
  ahead_retry_ps_ = 0;
  if (b.queued_hits == 0) return;
  unopened_ += b.queued_hits;
  b.queued_hits = 0;
  unopened_from_ = 0;  // the hits may be anywhere in the queue
}

void DramChannel::LogSlow(DramCommand cmd, uint64_t time_ps, uint32_t bank, uint64_t row,
                          uint32_t column) const {
  log_->Add(
      {time_ps, row, column, log_channel_, bank / banks_per_group_, bank % banks_per_group_, cmd});
}

void DramChannel::CommitPre(uint32_t bank, uint64_t pre_ps) {
  ++slow_steps_;
  Bank& b = banks_[bank];
  Log(DramCommand::kPre, pre_ps, bank, b.open_row, 0);
  b.act_ok_ps = Max(b.act_ok_ps, pre_ps + t_.tRP);
  b.ahead = Ahead::kNone;
  CloseRow(b);
}

void DramChannel::AutoPrecharge(uint32_t bank) {
  CommitPre(bank, banks_[bank].pre_ok_ps);  // as soon as tRAS / tRTP / tWR allow
}

void DramChannel::CommitAct(const DramRequest& r, uint64_t act_ps) {
  ++slow_steps_;
  Bank& b = banks_[r.bank];
  Log(DramCommand::kAct, act_ps, r.bank, r.row, 0);
  OpenRow(r.bank, r.row);
  b.cas_ok_ps = act_ps + t_.tRCD;
  b.pre_ok_ps = act_ps + t_.tRAS;
  b.act_ok_ps = act_ps + t_.tRC;
  act_any_ok_ps_ = act_ps + t_.tRRD_S;
  act_group_ok_ps_[r.bank_group] = act_ps + t_.tRRD_L;
  faw_ok_ps_[faw_next_] = act_ps + t_.tFAW;
  faw_next_ = (faw_next_ + 1) % kFawActs;
  ++stats_.activates;
}

// Commits the request's own commands `t`; returns them with any PRE / ACT
// issued ahead for it filled in.
DramCommandTimes DramChannel::Commit(const DramRequest& r, const DramCommandTimes& t) {
  DramCommandTimes reported = t;
  CountKind(r, reported);
  if (t.pre_ps != DramCommandTimes::kNoCommand) CommitPre(r.bank, t.pre_ps);
  if (t.act_ps != DramCommandTimes::kNoCommand) CommitAct(r, t.act_ps);
  Leave(r);
  CommitCas(r, t);
  pick_ok_ps_ = std::min({t.pre_ps, t.act_ps, t.cas_ps});
  return reported;
}

// When the PRE (row open) or ACT (bank closed) that `r` needs next could
// issue, at or after after_ps; kNever while queued requests hit the open
// row (never closed under them: common practice).
uint64_t DramChannel::AheadPs(const DramRequest& r, uint64_t after_ps) const {
  const Bank& b = banks_[r.bank];
  if (b.open_row == kNoRow) return PlanAct(r, after_ps);
  return b.queued_hits > 0 ? kNever : Max(after_ps, b.pre_ok_ps);
}

// One pass, oldest request first, issuing each PRE / ACT that can go by
// the horizon (a request whose row gets precharged may get its ACT too).
// A command issued in the pass only delays the ones the pass skipped, so one
// pass finds them all; the earliest skipped one sets the next look. Only a
// bank's oldest request needing a row matters: a younger one to the same
// bank waits for the same command or for the row just opened to drain.
void DramChannel::OpenRowsAheadSlow(uint64_t now_ps, uint64_t horizon_ps) {
  ++slow_steps_;
  const uint64_t last_pre_ps = std::min(horizon_ps, next_refresh_ps_ - 1);
  const uint64_t last_act_ps = std::min(last_pre_ps, LastUsefulActPs());
  uint64_t earliest = kNever;
  bool all_hits = true;  // so far in the pass
  ++ahead_pass_;
  for (size_t age = unopened_from_; age < queued_ && unopened_ > 0; ++age) {
    const DramRequest& r = At(age);
    Bank& b = banks_[r.bank];
    if (b.open_row == r.row) continue;
    if (all_hits) unopened_from_ = age;
    all_hits = false;
    if (b.ahead_pass == ahead_pass_) continue;
    b.ahead_pass = ahead_pass_;
    earliest = std::min(earliest, OpenAheadFor(r, now_ps, last_pre_ps, last_act_ps));
  }
  ahead_retry_ps_ = earliest;
}

// A refresh already due is done first, as the next pick would do it (the
// same refresh: nothing else issues in between).
void DramChannel::ArrivedSlow(uint64_t now_ps) {
  while (now_ps >= next_refresh_ps_) Refresh();
  OpenRowsAhead(AlignUp(now_ps), pick_ok_ps_);
}

// The latest ACT ahead whose row could still serve a CAS before the refresh
// deadline: a later one would only be closed again by the refresh. No PRE or
// ACT ahead goes at or after the deadline (the refresh waits for them).
uint64_t DramChannel::LastUsefulActPs() const {
  return next_refresh_ps_ > t_.tRCD ? next_refresh_ps_ - t_.tRCD - 1 : 0;
}

// Issues the PRE and / or ACT that `r` needs if they fit by last_pre_ps /
// last_act_ps; returns when the next of them could issue (kNever: not
// before the refresh, or nothing left to issue).
uint64_t DramChannel::OpenAheadFor(const DramRequest& r, uint64_t now_ps, uint64_t last_pre_ps,
                                   uint64_t last_act_ps) {
  uint64_t when = AheadPs(r, now_ps);
  if (banks_[r.bank].open_row != kNoRow) {
    if (when > last_pre_ps) return when;
    PrechargeAhead(r.bank, when);
    when = AheadPs(r, now_ps);
  }
  if (when > last_act_ps) return when > LastUsefulActPs() ? kNever : when;
  ActivateAhead(r, when);
  return kNever;
}

void DramChannel::PrechargeAhead(uint32_t bank, uint64_t pre_ps) {
  CommitPre(bank, pre_ps);
  Bank& b = banks_[bank];
  b.ahead = Ahead::kConflict;
  b.ahead_pre_ps = pre_ps;
}

void DramChannel::ActivateAhead(const DramRequest& r, uint64_t act_ps) {
  Bank& b = banks_[r.bank];
  if (b.ahead != Ahead::kConflict) {  // a closed bank, not one closed ahead
    b.ahead = Ahead::kMiss;
    b.ahead_pre_ps = DramCommandTimes::kNoCommand;
  }
  b.ahead_act_ps = act_ps;
  CommitAct(r, act_ps);
}

void DramChannel::Refresh() {
  ++slow_steps_;
  uint64_t ref_ps = next_refresh_ps_;
  for (Bank& b : banks_) {
    uint64_t ready = b.act_ok_ps;
    if (b.open_row != kNoRow) ready = Max(ready, Max(next_refresh_ps_, b.pre_ok_ps) + t_.tRP);
    ref_ps = Max(ref_ps, ready);
  }
  const uint64_t end_ps = ref_ps + t_.tRFC;
  for (uint32_t i = 0; i < banks_.size(); ++i) {
    Bank& b = banks_[i];
    if (b.open_row != kNoRow)
      Log(DramCommand::kPre, Max(next_refresh_ps_, b.pre_ok_ps), i, b.open_row, 0);
    CloseRow(b);
    b.ahead = Ahead::kNone;
    b.act_ok_ps = end_ps;
  }
  Log(DramCommand::kRef, ref_ps, 0, 0, 0);
  ++stats_.refreshes;
  stats_.refresh_ps += t_.tRFC;
  next_refresh_ps_ += t_.tREFI;
}

// The general case: any kind of request, refresh in the way or not.
DramPick DramChannel::PickAny(uint64_t now_ps) {
  ++slow_steps_;
  while (now_ps >= next_refresh_ps_) Refresh();
  size_t age = ChooseFrFcfs(now_ps);
  DramCommandTimes times = Plan(At(age), now_ps);
  while (std::min({times.pre_ps, times.act_ps, times.cas_ps}) >= next_refresh_ps_) {
    Refresh();
    age = ChooseFrFcfs(now_ps);
    times = Plan(At(age), now_ps);
  }
  const DramRequest& r = At(age);
  DramPick pick{r.tag, Commit(r, times)};
  RemoveAt(age);
  OpenRowsAhead(now_ps, times.cas_ps);
  return pick;
}

namespace {

// Writers of WriteShape. A channel's state outlives the transfer that
// wrote it, and the next transfer may start before this one's last event,
// so a time before the floor is not dead for good. `Aged` writes a time at
// or after the floor relative to it, an earlier one as itself, tagged with
// the top bit (SameWord accepts an earlier time that is either unchanged or
// moved by exactly the period). `Exact` writes times
// that are compared with each other (arrivals, the last pick) relative to
// the floor, without the tag. kNever stays itself.
uint64_t Aged(uint64_t ps, uint64_t floor_ps) {
  if (ps == DramChannel::kNever) return ps;
  return ps >= floor_ps ? ps - floor_ps : ps | DramChannel::kBeforeFloor;
}
uint64_t Exact(uint64_t ps, uint64_t floor_ps) {
  return (ps - floor_ps) & ~DramChannel::kBeforeFloor;  // wraps below the floor: still exact
}
// Advance's counterpart of Aged: a time at or after the floor of the look
// that started the period was written in the period and moves with it; an
// earlier one was not, and stays.
uint64_t Moved(uint64_t ps, uint64_t floor_ps, uint64_t delta_ps) {
  return ps == DramChannel::kNever || ps < floor_ps ? ps : ps + delta_ps;
}
size_t SlotFrom(size_t tag, size_t slot, size_t window) {
  return tag >= slot ? tag - slot : tag + window - slot;
}

}  // namespace

template <class Channel, class Visit>
void DramChannel::ForEachColumnTime(Channel& c, Visit&& visit) {
  visit(c.ahead_retry_ps_);
  visit(c.cas_any_ok_ps_);
  visit(c.rd_after_wr_any_ok_ps_);
  visit(c.rd_data_ok_ps_);
  visit(c.wr_data_ok_ps_);
  for (size_t g = 0; g < c.banks_.size() / c.banks_per_group_; ++g) {
    visit(c.cas_group_ok_ps_[g]);
    visit(c.rd_after_wr_group_ok_ps_[g]);
  }
  for (auto& b : c.banks_) visit(b.pre_ok_ps);
}

size_t DramChannel::ShapeWords() const {
  constexpr size_t kChannelWords = 3, kColumnTimes = 5, kGroupTimes = 2, kBankWords = 3;
  constexpr size_t kQueuedWords = 4;
  const size_t groups = banks_.size() / banks_per_group_;
  return kChannelWords + kColumnTimes + kGroupTimes * groups + kBankWords * banks_.size() +
         kQueuedWords * queued_;
}

template <class Put>
void DramChannel::EmitShape(uint64_t floor_ps, size_t slot, size_t window, Put&& put) const {
  put(queued_);
  put(unopened_);
  put(Exact(pick_ok_ps_, floor_ps));
  ForEachColumnTime(*this, [&](uint64_t ps) { put(Aged(ps, floor_ps)); });
  for (const Bank& b : banks_) {
    put(b.open_row);
    put(uint64_t{b.queued_hits} << 8 | static_cast<uint64_t>(b.ahead));
  }
  for (size_t age = 0; age < queued_; ++age) {
    const DramRequest& r = At(age);
    put(r.row);
    put(Exact(r.arrival_ps, floor_ps));
    put(uint64_t{r.bank} << 1 | uint64_t{r.is_write});
    put(SlotFrom(r.tag, slot, window));
  }
}

uint64_t* DramChannel::WriteShape(uint64_t floor_ps, size_t slot, size_t window,
                                  uint64_t* w) const {
  EmitShape(floor_ps, slot, window, [&](uint64_t word) { *w++ = word; });
  return w;
}

const uint64_t* DramChannel::MatchShape(uint64_t floor_ps, size_t slot, size_t window,
                                        uint64_t delta_ps, const uint64_t* earlier) const {
  // The queue length sets the number of words: compared first, so the rest
  // is read only when it lines up.
  if (earlier[0] != queued_) return nullptr;
  bool same = true;
  EmitShape(floor_ps, slot, window,
            [&](uint64_t word) { same &= SameWord(*earlier++, word, delta_ps); });
  return same ? earlier : nullptr;
}

uint64_t* DramChannel::WriteProbe(uint64_t floor_ps, uint64_t* out) const {
  out[0] = queued_;
  out[1] = Exact(pick_ok_ps_, floor_ps);
  out[2] = queued_ > 0 ? Exact(queue_[head_].arrival_ps, floor_ps) : kNever;
  out[3] = SinceFloor(cas_any_ok_ps_, floor_ps);
  // The queued hits of the oldest and the youngest request's banks: they
  // differ from look to look while one row's requests drain and the next
  // row's arrive.
  out[4] = kNever;
  out[5] = kNever;
  if (queued_ > 0) {
    const uint32_t oldest = At(0).bank, youngest = At(queued_ - 1).bank;
    out[4] = uint64_t{oldest} << 32 | banks_[oldest].queued_hits;
    out[5] = uint64_t{youngest} << 32 | banks_[youngest].queued_hits;
  }
  return out + kProbeWords;
}

void DramChannel::Advance(uint64_t floor_ps, uint64_t delta_ps, size_t tag_shift, size_t window,
                          uint32_t column_shift, const DramStats& per_period, uint64_t times) {
  pick_ok_ps_ += delta_ps;
  ForEachColumnTime(*this, [&](uint64_t& ps) { ps = Moved(ps, floor_ps, delta_ps); });
  // A hint: requests younger than it may need a row, older ones are hits.
  // Any lower value is also right (the scans it starts skip hits).
  unopened_from_ = unopened_ == 0 ? queued_ : 0;
  for (size_t age = 0; age < queued_; ++age) {
    DramRequest& r = queue_[Slot(age)];
    r.arrival_ps += delta_ps;
    r.column += column_shift;
    const size_t tag = r.tag + tag_shift;
    r.tag = static_cast<uint32_t>(tag >= window ? tag - window : tag);
  }
  for (uint64_t DramStats::*field : kDramStatsFields) stats_.*field += times * per_period.*field;
}

void DramChannel::Finish(uint64_t end_ps) {
  while (next_refresh_ps_ < end_ps) Refresh();
}

}  // namespace tritsim
