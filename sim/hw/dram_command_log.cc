#include "hw/dram_command_log.h"

#include <algorithm>
#include <cmath>

namespace tritsim {
namespace {

constexpr double kPsPerNs = 1000.0;

const char* Name(DramCommand c) {
  switch (c) {
    case DramCommand::kAct:
      return "ACT";
    case DramCommand::kPre:
      return "PRE";
    case DramCommand::kRd:
      return "RD";
    case DramCommand::kWr:
      return "WR";
    case DramCommand::kRef:
      return "REF";
  }
  return "?";
}

}  // namespace

DramCommandLog::DramCommandLog(std::ostream& out, const DramConfig& dram, uint64_t limit)
    : out_(out), limit_(limit) {
  WriteHeader(dram);
}

void DramCommandLog::WriteHeader(const DramConfig& dram) {
  const DramTiming& t = dram.timing;
  out_ << "# format tritsim-dram-log/1\n"
       << "# preset " << dram.preset << "\n"
       << "# channels " << dram.channels << "\n"
       << "# tCK_ps " << std::llround(t.tCK_ns * kPsPerNs) << "\n"
       << "# bank_groups " << dram.bank_groups << "\n"
       << "# banks_per_group " << dram.banks_per_group << "\n"
       << "# burst_length " << t.burst_length << "\n";
  const std::pair<const char*, int64_t> cycles[] = {
      {"CL", t.CL},         {"CWL", t.CWL},       {"tRCD", t.tRCD},     {"tRP", t.tRP},
      {"tRAS", t.tRAS},     {"tRC", t.tRC},       {"tCCD_S", t.tCCD_S}, {"tCCD_L", t.tCCD_L},
      {"tRRD_S", t.tRRD_S}, {"tRRD_L", t.tRRD_L}, {"tFAW", t.tFAW},     {"tWR", t.tWR},
      {"tWTR_S", t.tWTR_S}, {"tWTR_L", t.tWTR_L}, {"tRTP", t.tRTP},     {"tRFC", t.tRFC},
      {"tREFI", t.tREFI}};
  for (const auto& [name, value] : cycles) out_ << "# " << name << " " << value << "\n";
}

bool DramCommandLog::Later(const Held& a, const Held& b) {
  if (a.record.time_ps != b.record.time_ps) return a.record.time_ps > b.record.time_ps;
  if (a.record.channel != b.record.channel) return a.record.channel > b.record.channel;
  return a.sequence > b.sequence;
}

void DramCommandLog::Add(const DramCommandRecord& record) {
  if (truncated_) return;
  heap_.push_back({record, added_++});
  std::push_heap(heap_.begin(), heap_.end(), Later);
}

void DramCommandLog::WriteOldest() {
  std::pop_heap(heap_.begin(), heap_.end(), Later);
  const DramCommandRecord r = heap_.back().record;
  heap_.pop_back();
  if (written_ == limit_) {  // one command past the limit: stop logging
    truncated_ = true;
    heap_.clear();
    return;
  }
  ++written_;
  out_ << r.time_ps << ' ' << r.channel << ' ' << Name(r.command);
  if (r.command == DramCommand::kRef) {
    out_ << " - - - -\n";
    return;
  }
  out_ << ' ' << r.bank_group << ' ' << r.bank << ' ' << r.row << ' ';
  if (r.command == DramCommand::kRd || r.command == DramCommand::kWr) {
    out_ << r.column << '\n';
  } else {
    out_ << "-\n";
  }
}

void DramCommandLog::Release(uint64_t floor_ps) {
  while (!heap_.empty() && heap_.front().record.time_ps < floor_ps) WriteOldest();
}

void DramCommandLog::Close() {
  while (!heap_.empty()) WriteOldest();
  if (truncated_) out_ << "# truncated after " << limit_ << " commands\n";
}

}  // namespace tritsim
