#include "hw/scratchpad.h"

#include <algorithm>

namespace tritsim {

Scratchpad::Scratchpad(sc_core::sc_module_name name, const ScratchpadConfig& config)
    : sc_core::sc_module(name), config_(config) {}

void Scratchpad::RecordWrite(uint64_t start_ps, uint64_t end_ps, uint64_t accesses) {
  writes_ += accesses;
  if (accesses == 0 || end_ps <= start_ps) return;
  writes_in_flight_.push_back({start_ps, end_ps, accesses});
}

uint64_t Scratchpad::ReadWindow(uint64_t start_ps, uint64_t end_ps, uint64_t accesses) {
  reads_ += accesses;
  while (!writes_in_flight_.empty() && writes_in_flight_.front().end_ps <= start_ps) {
    writes_in_flight_.pop_front();
  }
  if (config_.ports >= 2 || accesses == 0 || end_ps <= start_ps) return 0;
  long double overlapping_writes = 0;
  for (const WriteSegment& w : writes_in_flight_) {
    const uint64_t lo = std::max(w.start_ps, start_ps);
    const uint64_t hi = std::min(w.end_ps, end_ps);
    if (hi <= lo) continue;
    overlapping_writes +=
        static_cast<long double>(w.accesses) * (hi - lo) / (w.end_ps - w.start_ps);
  }
  const uint64_t both = std::min<uint64_t>(accesses, uint64_t(overlapping_writes));
  const uint64_t conflicts = both / uint64_t(config_.banks);
  conflict_cycles_ += conflicts;
  return conflicts;
}

}  // namespace tritsim
