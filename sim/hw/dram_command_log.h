// The DRAM command log (`tritsim run --dram-log FILE`): every ACT, PRE, RD,
// WR and REF the channels issue, one per line, merged over the channels in
// time order. Format: docs/dram-log.md.
//
// Channels hand their commands over as they commit them, which is not quite
// time order (a pick plans a CAS ahead of the refresh that precedes it, and
// channels run interleaved), so the log holds them in a min-heap and writes
// those earlier than a floor the memory system vouches for (Release): no
// command added later is earlier than the floor. Memory is bounded by the
// commands between the floor and the newest one.
#pragma once

#include <cstdint>
#include <ostream>
#include <vector>

#include "config/arch_config.h"

namespace tritsim {

enum class DramCommand : uint8_t { kAct, kPre, kRd, kWr, kRef };

// One command. REF: bank group, bank, row and column are not printed; PRE
// and ACT: the column is not printed.
struct DramCommandRecord {
  uint64_t time_ps = 0;
  uint64_t row = 0;
  uint32_t column = 0;
  uint32_t channel = 0;
  uint32_t bank_group = 0;
  uint32_t bank = 0;  // inside its group
  DramCommand command = DramCommand::kAct;
};

class DramCommandLog {
 public:
  // Writes the header lines for `dram` (preset applied) to `out`. `out`
  // must outlive the log. limit >= 1: commands written at most.
  DramCommandLog(std::ostream& out, const DramConfig& dram, uint64_t limit);

  // Takes one command. REQUIRES: not earlier than the last Release floor.
  void Add(const DramCommandRecord& record);
  // Writes, in time order (ties: channel, then order of Add), every held
  // command earlier than floor_ps. REQUIRES: no later Add is earlier.
  void Release(uint64_t floor_ps);
  // Writes everything held, then the truncation line if the limit cut the
  // log. Call once, after the last Add.
  void Close();

  size_t held() const { return heap_.size(); }
  uint64_t written() const { return written_; }

 private:
  struct Held {
    DramCommandRecord record;
    uint64_t sequence = 0;
  };
  static bool Later(const Held& a, const Held& b);
  void WriteHeader(const DramConfig& dram);
  void WriteOldest();

  std::ostream& out_;
  uint64_t limit_ = 1;
  uint64_t written_ = 0;
  uint64_t added_ = 0;
  bool truncated_ = false;
  std::vector<Held> heap_;  // min-heap by (time, channel, sequence)
};

}  // namespace tritsim
