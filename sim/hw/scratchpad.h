// Scratchpad SRAM: banked on-chip memory shared by the DMA engine (writes
// of arriving tiles) and the compute units (reads of operands).
//
// Bank-conflict model: with one port per bank, a DMA write and a unit read
// to the same bank in the same cycle conflict and the read waits one cycle.
// Addresses of both streams spread evenly over the banks, so of the
// min(W, R) cycles in which both access, 1/banks collide (expected-value
// model, exact in integers by floor). Writes counted are those of DMA
// transfers already under way when the read window starts. With two or more
// ports per bank nothing conflicts.
#pragma once

#include <cstdint>
#include <deque>

#include <systemc>

#include "config/arch_config.h"

namespace tritsim {

class Scratchpad : public sc_core::sc_module {
 public:
  Scratchpad(sc_core::sc_module_name name, const ScratchpadConfig& config);

  // DMA engine thread: a transfer writing `accesses` bank accesses spread
  // evenly over [start_ps, end_ps).
  void RecordWrite(uint64_t start_ps, uint64_t end_ps, uint64_t accesses);

  // Compute thread: a unit reads `accesses` over [start_ps, end_ps). Returns
  // the conflict cycles the reads lose, and counts the reads.
  uint64_t ReadWindow(uint64_t start_ps, uint64_t end_ps, uint64_t accesses);

  uint64_t reads() const { return reads_; }
  uint64_t writes() const { return writes_; }
  uint64_t conflict_cycles() const { return conflict_cycles_; }
  // Bank accesses that move `bytes` (each access moves one bank width).
  uint64_t AccessesFor(uint64_t bytes) const {
    const uint64_t width = uint64_t(config_.bank_width_bytes);
    return (bytes + width - 1) / width;
  }
  // Bytes all banks deliver together in one core cycle (one access each).
  uint64_t bytes_per_cycle() const {
    return uint64_t(config_.banks) * uint64_t(config_.bank_width_bytes);
  }
  // Port-cycles available per core cycle (banks x ports).
  uint64_t ports_total() const { return uint64_t(config_.banks) * uint64_t(config_.ports); }

 private:
  struct WriteSegment {
    uint64_t start_ps, end_ps, accesses;
  };
  ScratchpadConfig config_;
  std::deque<WriteSegment> writes_in_flight_;
  uint64_t reads_ = 0;
  uint64_t writes_ = 0;
  uint64_t conflict_cycles_ = 0;
};

}  // namespace tritsim
