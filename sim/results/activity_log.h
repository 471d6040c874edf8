// Unit activity over time as a Value Change Dump (IEEE 1364-2005, clause
// 18) for a waveform viewer. Units report busy intervals in any order; the
// writer sorts them and emits one 1-bit wire per unit. Memory grows with
// the number of intervals, so it is only used when --vcd is given.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

namespace tritsim {

class ActivityLog {
 public:
  // Declares a 1-bit signal; returns its index.
  int AddSignal(const std::string& name);
  // `signal` is busy over [start_ps, end_ps). Empty intervals are ignored.
  void Busy(int signal, uint64_t start_ps, uint64_t end_ps);
  // The VCD text: header, then value changes in time order.
  std::string ToVcd(const std::string& scope) const;
  size_t intervals() const { return intervals_.size(); }

 private:
  struct Interval {
    int signal;
    uint64_t start_ps, end_ps;
  };
  std::vector<std::string> names_;
  std::vector<Interval> intervals_;
};

}  // namespace tritsim
