#include "results/activity_log.h"

#include <algorithm>
#include <sstream>
#include <utility>

namespace tritsim {
namespace {

// VCD identifier codes are printable ASCII from '!' (IEEE 1364, 18.2.1).
std::string IdCode(int index) {
  std::string code;
  do {
    code.push_back(char('!' + index % 94));
    index /= 94;
  } while (index > 0);
  return code;
}

}  // namespace

int ActivityLog::AddSignal(const std::string& name) {
  names_.push_back(name);
  return int(names_.size()) - 1;
}

void ActivityLog::Busy(int signal, uint64_t start_ps, uint64_t end_ps) {
  if (end_ps > start_ps) intervals_.push_back({signal, start_ps, end_ps});
}

std::string ActivityLog::ToVcd(const std::string& scope) const {
  std::ostringstream out;
  out << "$comment tritsim unit activity (1 = busy) $end\n$timescale 1 ps $end\n";
  out << "$scope module " << scope << " $end\n";
  for (size_t i = 0; i < names_.size(); ++i) {
    out << "$var wire 1 " << IdCode(int(i)) << " " << names_[i] << " $end\n";
  }
  out << "$upscope $end\n$enddefinitions $end\n";
  // (time, signal, +1 start / -1 end); a signal is 1 while its count > 0.
  std::vector<std::pair<uint64_t, std::pair<int, int>>> edges;
  edges.reserve(intervals_.size() * 2);
  for (const Interval& iv : intervals_) {
    edges.push_back({iv.start_ps, {iv.signal, +1}});
    edges.push_back({iv.end_ps, {iv.signal, -1}});
  }
  std::sort(edges.begin(), edges.end());
  std::vector<int> depth(names_.size(), 0), shown(names_.size(), 0);
  out << "#0\n$dumpvars\n";
  for (size_t i = 0; i < names_.size(); ++i) out << "0" << IdCode(int(i)) << "\n";
  out << "$end\n";
  size_t e = 0;
  while (e < edges.size()) {
    const uint64_t t = edges[e].first;
    for (; e < edges.size() && edges[e].first == t; ++e)
      depth[edges[e].second.first] += edges[e].second.second;
    std::ostringstream changes;
    for (size_t s = 0; s < names_.size(); ++s) {
      const int value = depth[s] > 0 ? 1 : 0;
      if (value != shown[s]) {
        changes << value << IdCode(int(s)) << "\n";
        shown[s] = value;
      }
    }
    if (!changes.str().empty()) out << "#" << t << "\n" << changes.str();
  }
  return out.str();
}

}  // namespace tritsim
