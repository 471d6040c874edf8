#include "hw/dram_log_checker.h"

#include <array>
#include <deque>
#include <map>
#include <sstream>

namespace tritsim::test {
namespace {

constexpr uint64_t kNone = ~uint64_t{0};        // "never happened"
constexpr size_t kFawActs = 4;                  // ACTs allowed in one tFAW (JESD79-4 4.x)
constexpr uint64_t kMaxPostponedRefreshes = 8;  // JESD79-4 refresh postponing

// Timing parameters in ps (header nCK x tCK_ps).
struct Params {
  uint64_t tck = 0, burst = 0;  // burst: BL/2 tCK of data
  uint64_t CL = 0, CWL = 0, tRCD = 0, tRP = 0, tRAS = 0, tRC = 0, tCCD_S = 0, tCCD_L = 0;
  uint64_t tRRD_S = 0, tRRD_L = 0, tFAW = 0, tWR = 0, tWTR_S = 0, tWTR_L = 0, tRTP = 0;
  uint64_t tRFC = 0, tREFI = 0;
};

struct BankState {
  bool open = false;
  uint64_t row = 0;
  uint64_t act = kNone, pre = kNone, rd = kNone, wr_end = kNone;
};

struct ChannelState {
  std::map<std::pair<uint64_t, uint64_t>, BankState> banks;  // (group, bank)
  std::deque<uint64_t> acts;                                 // last kFawActs ACT times
  uint64_t act_any = kNone;
  std::map<uint64_t, uint64_t> act_group, cas_group, wr_end_group;
  uint64_t cas_any = kNone, wr_end_any = kNone;
  uint64_t ref = kNone, refs = 0, last = 0;
};

struct Command {
  uint64_t time = 0, channel = 0, group = 0, bank = 0, row = 0, column = 0;
  std::string name;
};

class Checker {
 public:
  explicit Checker(DramLogSummary& out) : out_(out) {}
  void Line(const std::string& line, size_t number);
  void Finish();

 private:
  void Header(const std::string& key, const std::string& value);
  bool Parse(const std::string& line, Command& c);
  void Check(const Command& c);
  void Act(ChannelState& ch, BankState& b, const Command& c);
  void Pre(BankState& b, const Command& c);
  void Cas(ChannelState& ch, BankState& b, const Command& c, bool write);
  void Ref(ChannelState& ch, const Command& c);
  // Flags `what` unless `from` never happened or t >= from + gap.
  void Need(uint64_t t, uint64_t from, uint64_t gap, const char* rule);
  void Fail(const std::string& rule, const std::string& detail);

  DramLogSummary& out_;
  std::map<std::string, uint64_t> nck_;
  Params p_;
  bool params_ready_ = false;
  size_t line_ = 0;
  uint64_t last_time_ = 0;
  std::map<uint64_t, ChannelState> channels_;
};

void Checker::Fail(const std::string& rule, const std::string& detail) {
  out_.violations.push_back("line " + std::to_string(line_) + ": " + rule + ": " + detail);
}

void Checker::Need(uint64_t t, uint64_t from, uint64_t gap, const char* rule) {
  if (from == kNone || t >= from + gap) return;
  Fail(rule, "at " + std::to_string(t) + " ps, allowed from " + std::to_string(from + gap));
}

void Checker::Header(const std::string& key, const std::string& value) {
  if (key == "truncated") {
    out_.truncated = true;
    return;
  }
  if (key == "format" || key == "preset") return;
  nck_[key] = std::stoull(value);
}

// Converts the header's nCK values once the first command arrives.
Params ToPs(const std::map<std::string, uint64_t>& n) {
  Params p;
  p.tck = n.at("tCK_ps");
  auto ps = [&](const char* k) { return n.at(k) * p.tck; };
  p.burst = n.at("burst_length") / 2 * p.tck;  // two transfers per tCK
  p.CL = ps("CL"), p.CWL = ps("CWL"), p.tRCD = ps("tRCD"), p.tRP = ps("tRP");
  p.tRAS = ps("tRAS"), p.tRC = ps("tRC"), p.tCCD_S = ps("tCCD_S"), p.tCCD_L = ps("tCCD_L");
  p.tRRD_S = ps("tRRD_S"), p.tRRD_L = ps("tRRD_L"), p.tFAW = ps("tFAW"), p.tWR = ps("tWR");
  p.tWTR_S = ps("tWTR_S"), p.tWTR_L = ps("tWTR_L"), p.tRTP = ps("tRTP");
  p.tRFC = ps("tRFC"), p.tREFI = ps("tREFI");
  return p;
}

void Checker::Line(const std::string& line, size_t number) {
  line_ = number;
  if (line.empty()) return;
  std::istringstream in(line);
  if (line[0] == '#') {
    std::string hash, key, value;
    in >> hash >> key >> value;
    Header(key, value);
    return;
  }
  Command c;
  if (!Parse(line, c)) return Fail("format", "cannot parse '" + line + "'");
  if (!params_ready_) {
    if (nck_.count("tREFI") == 0) return Fail("header", "timing missing before the first command");
    p_ = ToPs(nck_);
    params_ready_ = true;
  }
  Check(c);
}

bool Checker::Parse(const std::string& line, Command& c) {
  std::istringstream in(line);
  std::string g, b, r, col;
  if (!(in >> c.time >> c.channel >> c.name >> g >> b >> r >> col)) return false;
  if (c.name == "REF") return g == "-" && b == "-" && r == "-" && col == "-";
  if (g == "-" || b == "-" || r == "-") return false;
  c.group = std::stoull(g), c.bank = std::stoull(b), c.row = std::stoull(r);
  if (c.name == "ACT" || c.name == "PRE") return col == "-";
  if (c.name != "RD" && c.name != "WR") return false;
  c.column = std::stoull(col);
  return true;
}

void Checker::Check(const Command& c) {
  ++out_.commands;
  if (c.time < last_time_) Fail("order", "time goes back from " + std::to_string(last_time_));
  if (c.time % p_.tck != 0) Fail("clock", std::to_string(c.time) + " ps is not on a tCK edge");
  last_time_ = c.time;
  ChannelState& ch = channels_[c.channel];
  ch.last = c.time;
  if (c.name == "REF") return Ref(ch, c);
  Need(c.time, ch.ref, p_.tRFC, "tRFC");
  BankState& b = ch.banks[{c.group, c.bank}];
  if (c.name == "ACT") return Act(ch, b, c);
  if (c.name == "PRE") return Pre(b, c);
  Cas(ch, b, c, c.name == "WR");
}

void Checker::Act(ChannelState& ch, BankState& b, const Command& c) {
  ++out_.acts;
  if (b.open) Fail("ACT to open bank", "bank " + std::to_string(c.bank) + " has a row open");
  Need(c.time, b.pre, p_.tRP, "tRP");
  Need(c.time, b.act, p_.tRC, "tRC");
  const auto group_act = ch.act_group.find(c.group);
  const uint64_t same = group_act == ch.act_group.end() ? kNone : group_act->second;
  Need(c.time, same, p_.tRRD_L, "tRRD_L");
  if (ch.act_any != same) Need(c.time, ch.act_any, p_.tRRD_S, "tRRD_S");
  if (ch.acts.size() == kFawActs) Need(c.time, ch.acts.front(), p_.tFAW, "tFAW");
  if (ch.acts.size() == kFawActs) ch.acts.pop_front();
  ch.acts.push_back(c.time);
  ch.act_any = ch.act_group[c.group] = c.time;
  b = BankState{true, c.row, c.time, b.pre, kNone, kNone};
}

void Checker::Pre(BankState& b, const Command& c) {
  ++out_.pres;
  if (!b.open) return;  // PRE to a precharged bank is a no-op (JESD79-4)
  Need(c.time, b.act, p_.tRAS, "tRAS");
  Need(c.time, b.rd, p_.tRTP, "tRTP");
  Need(c.time, b.wr_end, p_.tWR, "tWR");
  b.open = false;
  b.pre = c.time;
}

void Checker::Cas(ChannelState& ch, BankState& b, const Command& c, bool write) {
  ++(write ? out_.writes : out_.reads);
  if (!b.open) Fail("column to closed bank", c.name + " with no row open");
  if (b.open && b.row != c.row) Fail("column to other row", c.name + " to a row not open");
  Need(c.time, b.act, p_.tRCD, "tRCD");
  const auto g = ch.cas_group.find(c.group);
  const uint64_t same = g == ch.cas_group.end() ? kNone : g->second;
  Need(c.time, same, p_.tCCD_L, "tCCD_L");
  if (ch.cas_any != same) Need(c.time, ch.cas_any, p_.tCCD_S, "tCCD_S");
  ch.cas_any = ch.cas_group[c.group] = c.time;
  if (write) {
    b.wr_end = ch.wr_end_any = ch.wr_end_group[c.group] = c.time + p_.CWL + p_.burst;
    return;
  }
  b.rd = c.time;
  const auto w = ch.wr_end_group.find(c.group);
  const uint64_t same_end = w == ch.wr_end_group.end() ? kNone : w->second;
  Need(c.time, same_end, p_.tWTR_L, "tWTR_L");
  if (ch.wr_end_any != same_end) Need(c.time, ch.wr_end_any, p_.tWTR_S, "tWTR_S");
}

void Checker::Ref(ChannelState& ch, const Command& c) {
  ++out_.refreshes;
  for (const auto& [where, b] : ch.banks) {
    if (b.open) Fail("REF with open bank", "bank group " + std::to_string(where.first));
    Need(c.time, b.pre, p_.tRP, "tRP");
  }
  Need(c.time, ch.ref, p_.tRFC, "tRFC");
  const uint64_t max_gap = (kMaxPostponedRefreshes + 1) * p_.tREFI;
  if (ch.ref != kNone && c.time - ch.ref > max_gap) Fail("tREFI", "REFs too far apart");
  ch.ref = c.time;
  ++ch.refs;
}

void Checker::Finish() {
  for (const auto& [id, ch] : channels_) {
    const uint64_t due = p_.tREFI == 0 ? 0 : ch.last / p_.tREFI;
    if (ch.refs + kMaxPostponedRefreshes < due) {
      Fail("tREFI", "channel " + std::to_string(id) + ": " + std::to_string(ch.refs) + " REFs by " +
                        std::to_string(ch.last) + " ps, " + std::to_string(due) + " due");
    }
  }
}

}  // namespace

DramLogSummary CheckDramLog(const std::string& text) {
  DramLogSummary summary;
  Checker checker(summary);
  std::istringstream in(text);
  std::string line;
  size_t number = 0;
  while (std::getline(in, line)) checker.Line(line, ++number);
  checker.Finish();
  return summary;
}

}  // namespace tritsim::test
