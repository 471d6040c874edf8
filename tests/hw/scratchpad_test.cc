// The scratchpad's bank-conflict model (docs/engine.md, "Scratchpad bank
// conflicts"): with one port per bank, of the min(W, R) accesses in which a
// DMA write and a unit read overlap, 1 / banks collide (floor); two ports
// never conflict. The Scratchpad is a SystemC module: each TEST builds its
// own (one elaboration per ctest process); its calls take explicit times,
// so no simulation is started.
#include "hw/scratchpad.h"

#include <gtest/gtest.h>

#include <cstdint>
#include <memory>

#include "config/arch_config.h"

namespace tritsim {
namespace {

constexpr uint64_t kBanks = 16;
constexpr uint64_t kBankWidth = 64;
constexpr uint64_t kWindowPs = 100000;  // 100 core cycles at 1 GHz

class ScratchpadTest : public ::testing::Test {
 protected:
  ScratchpadTest() {
    config_.banks = int64_t(kBanks);
    config_.bank_width_bytes = int64_t(kBankWidth);
  }
  Scratchpad& sram() {
    if (!sram_) sram_ = std::make_unique<Scratchpad>("scratchpad", config_);
    return *sram_;
  }
  // A DMA write of `accesses` over [start, end) then a read of `reads`
  // over [read_start, read_start + kWindowPs); returns the conflict cycles.
  uint64_t WriteThenRead(uint64_t start, uint64_t end, uint64_t accesses, uint64_t read_start,
                         uint64_t reads) {
    sram().RecordWrite(start, end, accesses);
    return sram().ReadWindow(read_start, read_start + kWindowPs, reads);
  }

  ScratchpadConfig config_;

 private:
  std::unique_ptr<Scratchpad> sram_;
};

// min(W = 320, R = 200) = 200 overlapping accesses; 200 / 16 = 12.5, floor 12.
TEST_F(ScratchpadTest, OnePortLosesOneCycleInBanksOfTheOverlappingAccesses) {
  EXPECT_EQ(WriteThenRead(0, kWindowPs, 320, 0, 200), 12u);
  EXPECT_EQ(sram().conflict_cycles(), 12u);
}

// min(W = 40, R = 200) = 40; 40 / 16 = 2.5, floor 2: the fewer writes bound it.
TEST_F(ScratchpadTest, FewerWritesThanReadsBoundTheConflicts) {
  EXPECT_EQ(WriteThenRead(0, kWindowPs, 40, 0, 200), 2u);
}

// The read window covers the second half of a write spread evenly over
// twice its length: W = 640 / 2 = 320 overlapping writes, R = 400; 320 / 16 = 20.
TEST_F(ScratchpadTest, OnlyTheOverlappingPartOfAWriteCounts) {
  EXPECT_EQ(WriteThenRead(0, 2 * kWindowPs, 640, kWindowPs, 400), 20u);
}

TEST_F(ScratchpadTest, WriteFinishedBeforeTheReadsConflictsWithNothing) {
  EXPECT_EQ(WriteThenRead(0, kWindowPs, 320, kWindowPs, 200), 0u);
}

TEST_F(ScratchpadTest, TwoPortsNeverConflict) {
  config_.ports = 2;
  EXPECT_EQ(WriteThenRead(0, kWindowPs, 320, 0, 200), 0u);
  EXPECT_EQ(sram().conflict_cycles(), 0u);
}

TEST_F(ScratchpadTest, CountsEveryReadAndWriteWhateverThePorts) {
  config_.ports = 2;
  WriteThenRead(0, kWindowPs, 320, 0, 200);
  sram().RecordWrite(kWindowPs, kWindowPs, 7);  // an empty interval still moves data
  sram().ReadWindow(0, 0, 5);
  EXPECT_EQ(sram().writes(), 327u);
  EXPECT_EQ(sram().reads(), 205u);
}

TEST_F(ScratchpadTest, AccessesRoundUpToWholeBankWidths) {
  EXPECT_EQ(sram().AccessesFor(0), 0u);
  EXPECT_EQ(sram().AccessesFor(1), 1u);
  EXPECT_EQ(sram().AccessesFor(kBankWidth), 1u);
  EXPECT_EQ(sram().AccessesFor(kBankWidth + 1), 2u);
  EXPECT_EQ(sram().bytes_per_cycle(), kBanks * kBankWidth) << "one access per bank per cycle";
  EXPECT_EQ(sram().ports_total(), kBanks);
}

}  // namespace
}  // namespace tritsim
