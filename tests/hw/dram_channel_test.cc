// Tests of the DRAM memory system: address map, channel timing, scheduler,
// refresh, multi-channel interleaving and the ideal memory.
//
// Outside-world values come from JEDEC JESD79-4 (DDR4) through
// docs/references.md; the DramConfig defaults are the DDR4-3200AA
// values, so expected times are derived here from the timing parameters and
// the parameters themselves are checked once against the standard.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <memory>
#include <vector>

#include "common/error.h"
#include "config/arch_config.h"
#include "hw/dram_address_map.h"
#include "hw/dram_channel.h"
#include "hw/memory_system.h"

namespace tritsim {
namespace {

constexpr uint64_t kMiB = uint64_t{1} << 20;
constexpr double kPsPerSecond = 1e12;
constexpr int64_t kDeepWindow = 64;  // requests in flight for streaming tests

// DDR4-3200, JESD79-4 (H, via docs/references.md): 3200 MT/s x 8 B = 25.6 GB/s.
constexpr double kDdr4_3200PeakBytesPerSecond = 25.6e9;

class DramTest : public ::testing::Test {
 protected:
  static DramConfig Ddr4() { return DramConfig{}; }

  static uint64_t Tck(const DramConfig& d) {
    return static_cast<uint64_t>(std::llround(d.timing.tCK_ns * 1000.0));
  }
  // nCK -> ps for the config's clock.
  static uint64_t Ps(const DramConfig& d, int64_t cycles) {
    return static_cast<uint64_t>(cycles) * Tck(d);
  }
  static uint64_t BurstPs(const DramConfig& d) { return Ps(d, d.timing.burst_length / 2); }

  static uint64_t AddressOf(const DramConfig& d, uint32_t group, uint32_t bank, uint64_t row,
                            uint32_t column) {
    DramAddress where;
    where.bank_group = group;
    where.bank = bank;
    where.row = row;
    where.column = column;
    return DramAddressMap(d).Encode(where);
  }

  // Reads `bytes` from address 0 and returns the completion time, ps.
  static uint64_t Stream(MemorySystem& mem, uint64_t bytes, bool is_write = false) {
    return mem.Transfer(0, bytes, is_write, 0, kDeepWindow);
  }
  static double BytesPerSecond(uint64_t bytes, uint64_t ps) {
    return static_cast<double>(bytes) / (static_cast<double>(ps) / kPsPerSecond);
  }

  static DramRequest Request(uint32_t group, uint32_t bank, uint64_t row, bool is_write,
                             uint32_t tag, const DramConfig& d) {
    DramRequest r;
    r.bank_group = group;
    r.bank = group * static_cast<uint32_t>(d.banks_per_group) + bank;
    r.row = row;
    r.is_write = is_write;
    r.tag = tag;
    return r;
  }
};

// ---- the configuration under test is DDR4-3200 ----

TEST_F(DramTest, DramDefaultsAreJedecDdr4_3200) {
  const DramConfig d = Ddr4();
  // JESD79-4 DDR4-3200AA (H, via docs/references.md): tCK 0.625 ns, CL = tRCD = tRP
  // = 13.75 ns, tRAS 32 ns, tRC 45.75 ns, tRFC1 350 ns (8 Gb), tREFI 7.8 us.
  EXPECT_EQ(Tck(d), 625u);
  EXPECT_EQ(Ps(d, d.timing.tRCD), 13750u);
  EXPECT_EQ(Ps(d, d.timing.CL), 13750u);
  EXPECT_EQ(Ps(d, d.timing.tRP), 13750u);
  EXPECT_EQ(Ps(d, d.timing.tRAS), 32500u);  // 52 nCK, 32 ns rounded up to whole clocks
  EXPECT_EQ(Ps(d, d.timing.tRC), 46250u);   // 74 nCK covers 45.75 ns
  EXPECT_EQ(Ps(d, d.timing.tRFC), 350000u);
  EXPECT_EQ(Ps(d, d.timing.tREFI), 7800000u);
  auto mem = MakeMemorySystem(d);
  EXPECT_EQ(mem->burst_bytes(), 64u);  // 64-bit bus x BL8 (JESD79-4)
  EXPECT_NEAR(mem->peak_bytes_per_second(), kDdr4_3200PeakBytesPerSecond, 1.0);
}

// ---- address map ----

TEST_F(DramTest, DramAddressMapDecodesMostSignificantFieldFirst) {
  const DramConfig d = Ddr4();  // row | bank | column | bank group | channel
  const DramAddressMap map(d);
  EXPECT_EQ(map.Decode(64).bank_group, 1u);
  EXPECT_EQ(map.Decode(63).bank_group, 0u);  // same burst as byte 0
  EXPECT_EQ(map.Decode(4 * 64).column, 1u);
  EXPECT_EQ(map.Decode(4 * 8192).bank, 1u);
  EXPECT_EQ(map.Decode(16 * 8192).row, 1u);
  EXPECT_EQ(map.Decode(16 * 8192).bank, 0u);
}

TEST_F(DramTest, DramAddressMapEncodeInvertsDecode) {
  DramConfig d = Ddr4();
  d.channels = 3;  // not a power of two: the division path
  for (const DramConfig& c : {Ddr4(), d}) {
    const DramAddressMap map(c);
    for (uint64_t a = 0; a < 4 * kMiB; a += 4096 + 64) {
      const uint64_t burst_start = a / 64 * 64;
      EXPECT_EQ(map.Encode(map.Decode(a)), burst_start);
    }
  }
}

// Next steps one burst up the mixed-radix number (common practice): it must
// agree with decoding the next burst, across every carry, on the default map,
// a non-power-of-two one and one with another field order.
TEST_F(DramTest, DramAddressMapNextIsTheDecodeOfTheNextBurst) {
  DramConfig three = Ddr4();
  three.channels = 3;
  DramConfig reordered = Ddr4();
  reordered.channels = 2;
  reordered.address_map = {AddressField::kRow, AddressField::kColumn, AddressField::kBank,
                           AddressField::kChannel, AddressField::kBankGroup};
  for (const DramConfig& c : {Ddr4(), three, reordered}) {
    const DramAddressMap map(c);
    DramAddress where = map.Decode(0);
    for (uint64_t a = 64; a < 4 * kMiB; a += 64) {
      map.Next(where);
      const DramAddress expected = map.Decode(a);
      ASSERT_EQ(where.row, expected.row) << a;
      ASSERT_EQ(where.channel, expected.channel) << a;
      ASSERT_EQ(where.bank_group, expected.bank_group) << a;
      ASSERT_EQ(where.bank, expected.bank) << a;
      ASSERT_EQ(where.column, expected.column) << a;
    }
  }
}

TEST_F(DramTest, DramAddressMapRejectsRowBelowOtherFields) {
  DramConfig d = Ddr4();
  d.address_map = {AddressField::kBank, AddressField::kRow, AddressField::kColumn,
                   AddressField::kBankGroup, AddressField::kChannel};
  EXPECT_THROW(DramAddressMap{d}, Error);
  d.address_map = {AddressField::kRow, AddressField::kRow, AddressField::kColumn,
                   AddressField::kBankGroup, AddressField::kChannel};
  EXPECT_THROW(DramAddressMap{d}, Error);
}

// ---- single-request latencies ----

TEST_F(DramTest, DramIsolatedReadToClosedBankCostsTrcdPlusClPlusBurst) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  const uint64_t done = mem->Transfer(0, 64, false, 0, 1);
  // JESD79-4: ACT, tRCD, READ, CL, then BL/2 clocks of data.
  EXPECT_EQ(done, Ps(d, d.timing.tRCD + d.timing.CL + d.timing.burst_length / 2));
  EXPECT_EQ(done, 30000u);  // 48 nCK at 0.625 ns (JESD79-4 DDR4-3200AA)
  EXPECT_EQ(mem->stats().row_misses, 1u);
  EXPECT_EQ(mem->stats().activates, 1u);
}

TEST_F(DramTest, DramIsolatedWriteCompletesAfterTrcdPlusCwlPlusBurst) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  // JESD79-4: write data starts CWL after the WRITE command.
  EXPECT_EQ(mem->Transfer(0, 64, true, 0, 1),
            Ps(d, d.timing.tRCD + d.timing.CWL + d.timing.burst_length / 2));
  EXPECT_EQ(mem->stats().writes, 1u);
}

TEST_F(DramTest, DramRowConflictAddsPrechargeAfterTrasAndTrtp) {
  const DramConfig d = Ddr4();
  const DramTiming& t = d.timing;
  for (bool wait_for_first : {false, true}) {
    auto mem = MakeMemorySystem(d);
    const uint64_t first = mem->Transfer(AddressOf(d, 0, 0, 0, 0), 64, false, 0, 1);
    const uint64_t start = wait_for_first ? first : 0;
    const uint64_t second = mem->Transfer(AddressOf(d, 0, 0, 1, 0), 64, false, start, 1);
    // JESD79-4: PRE no earlier than tRAS after ACT (at 0) and tRTP after the
    // READ (at tRCD); ACT tRP after PRE and tRC after the previous ACT.
    const uint64_t pre = std::max({start, Ps(d, t.tRAS), Ps(d, t.tRCD + t.tRTP)});
    const uint64_t act = std::max(pre + Ps(d, t.tRP), Ps(d, t.tRC));
    EXPECT_EQ(second, act + Ps(d, t.tRCD + t.CL) + BurstPs(d)) << wait_for_first;
    EXPECT_GE(second - start, Ps(d, t.tRP + t.tRCD + t.CL) + BurstPs(d));
    EXPECT_EQ(mem->stats().row_conflicts, 1u);
  }
}

TEST_F(DramTest, DramRowHitCostsClPlusBurstOnly) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  const uint64_t first = mem->Transfer(AddressOf(d, 2, 3, 7, 0), 64, false, 0, 1);
  const uint64_t hit = mem->Transfer(AddressOf(d, 2, 3, 7, 5), 64, false, first, 1);
  // JESD79-4: a READ to the open row needs only CL plus the burst.
  EXPECT_EQ(hit - first, Ps(d, d.timing.CL) + BurstPs(d));
  EXPECT_EQ(mem->stats().row_hits, 1u);
}

// ---- channel-level command timing ----

TEST_F(DramTest, DramFifthActivateWaitsForTfaw) {
  const DramConfig d = Ddr4();
  const DramTiming& t = d.timing;
  DramChannel channel(d);
  // Five banks: groups 0..3 then group 0 again (another bank).
  const uint32_t groups[] = {0, 1, 2, 3, 0};
  const uint32_t banks[] = {0, 0, 0, 0, 1};
  for (uint32_t i = 0; i < 5; ++i) channel.Enqueue(Request(groups[i], banks[i], 0, false, i, d));
  std::vector<uint64_t> act;
  for (int i = 0; i < 5; ++i) act.push_back(channel.Pick().times.act_ps);
  for (int i = 1; i < 4; ++i) EXPECT_EQ(act[i] - act[i - 1], Ps(d, t.tRRD_S));  // JESD79-4
  // JESD79-4: no more than four ACTs in any tFAW window.
  EXPECT_GE(act[4] - act[0], Ps(d, t.tFAW));
  const int64_t expected = std::max({t.tFAW, 3 * t.tRRD_S + t.tRRD_S, t.tRRD_L});
  EXPECT_EQ(act[4] - act[0], Ps(d, expected));
}

TEST_F(DramTest, DramReadAfterWriteWaitsTwtrLongInSameGroup) {
  const DramConfig d = Ddr4();
  DramChannel channel(d);
  channel.Enqueue(Request(1, 2, 9, true, 0, d));
  const DramCommandTimes write = channel.Pick().times;
  channel.Enqueue(Request(1, 2, 9, false, 1, d));
  const DramCommandTimes read = channel.Pick().times;
  // JESD79-4: tWTR_L from the end of write data to a READ in the same group.
  EXPECT_EQ(read.cas_ps, write.done_ps + Ps(d, d.timing.tWTR_L));
  EXPECT_EQ(read.act_ps, DramCommandTimes::kNoCommand);  // row hit
}

TEST_F(DramTest, DramFrFcfsServesReadyRowHitBeforeOlderMiss) {
  const DramConfig d = Ddr4();
  DramChannel channel(d);
  channel.Enqueue(Request(0, 0, 4, false, 0, d));
  channel.Pick();                                  // opens row 4 in bank 0
  channel.Enqueue(Request(1, 0, 0, false, 1, d));  // older, bank closed
  channel.Enqueue(Request(0, 0, 4, false, 2, d));  // younger, row hit once ACT + tRCD passed
  // Rixner et al., ISCA 2000: first-ready before first-come. The pick happens
  // at the previous pick's first command (its ACT), when the row is not yet
  // ready, so the older miss goes first; after that the hit is ready.
  EXPECT_EQ(channel.Pick().tag, 1u);
  EXPECT_EQ(channel.Pick().tag, 2u);

  DramChannel later(d);
  later.Enqueue(Request(0, 0, 4, false, 0, d));
  const uint64_t first_done = later.Pick().times.done_ps;
  DramRequest miss = Request(1, 0, 0, false, 1, d);
  DramRequest hit = Request(0, 0, 4, false, 2, d);
  miss.arrival_ps = hit.arrival_ps = first_done;  // row 4 is open and ready by then
  later.Enqueue(miss);
  later.Enqueue(hit);
  EXPECT_EQ(later.Pick().tag, 2u);
  EXPECT_EQ(later.Pick().tag, 1u);
}

// ---- refresh ----

TEST_F(DramTest, DramIdleChannelStillRefreshesEveryTrefi) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  const uint64_t refi = Ps(d, d.timing.tREFI);
  mem->Finish(10 * refi + 1);  // deadlines at 1..10 x tREFI
  EXPECT_EQ(mem->stats().refreshes, 10u);
  EXPECT_EQ(mem->stats().refresh_ps, 10 * Ps(d, d.timing.tRFC));
}

TEST_F(DramTest, DramRefreshShareIsTrfcOverTrefi) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  const uint64_t done = Stream(*mem, 64 * kMiB);
  mem->Finish(done);
  const double share = static_cast<double>(mem->stats().refresh_ps) / static_cast<double>(done);
  // JESD79-4 (H): tRFC1 350 ns / tREFI 7.8 us = 4.49%. Tolerance 0.5 points:
  // the run ends part-way through a refresh interval.
  EXPECT_NEAR(share, 350.0 / 7800.0, 0.005);
  EXPECT_GT(mem->stats().refreshes, 300u);
}

// ---- streaming bandwidth ----

TEST_F(DramTest, DramSequentialReadStaysUnderPeakAndSustains85Percent) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  const uint64_t bytes = 64 * kMiB;
  const double bw = BytesPerSecond(bytes, Stream(*mem, bytes));
  // JESD79-4 (H): 25.6 GB/s peak for a 64-bit DDR4-3200 channel. 85%: refresh
  // alone costs 4.5%, row switches and bus turnarounds the rest (common practice).
  EXPECT_LE(bw, kDdr4_3200PeakBytesPerSecond);
  EXPECT_GE(bw, 0.85 * kDdr4_3200PeakBytesPerSecond);
  EXPECT_EQ(mem->stats().reads, bytes / 64);
  EXPECT_EQ(mem->stats().busy_ps, bytes / 64 * BurstPs(d));
}

TEST_F(DramTest, DramSequentialWriteStaysUnderPeak) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  const uint64_t bytes = 16 * kMiB;
  const double bw = BytesPerSecond(bytes, Stream(*mem, bytes, true));
  EXPECT_LE(bw, kDdr4_3200PeakBytesPerSecond);  // JESD79-4 (H)
  EXPECT_GE(bw, 0.85 * kDdr4_3200PeakBytesPerSecond);
  EXPECT_EQ(mem->stats().writes, bytes / 64);
}

TEST_F(DramTest, DramClosedPageGivesNoRowHitsOnSequentialStream) {
  DramConfig d = Ddr4();
  d.page_policy = PagePolicy::kClosed;
  auto mem = MakeMemorySystem(d);
  Stream(*mem, 1 * kMiB);
  EXPECT_EQ(mem->stats().row_hits, 0u);
  EXPECT_EQ(mem->stats().row_misses, mem->stats().reads);
  // One ACT per access (JESD79-4 auto-precharge closes the row after each),
  // plus rows opened ahead that a refresh closed before their CAS could
  // issue (at most one per bank per refresh).
  const uint64_t banks = static_cast<uint64_t>(d.bank_groups * d.banks_per_group);
  EXPECT_GE(mem->stats().activates, mem->stats().reads);
  EXPECT_LE(mem->stats().activates, mem->stats().reads + banks * mem->stats().refreshes);
}

TEST_F(DramTest, DramOpenPageHitsMostOfSequentialStream) {
  const DramConfig d = Ddr4();
  auto mem = MakeMemorySystem(d);
  Stream(*mem, 16 * kMiB);
  // One ACT per row of 8192 B = 128 bursts, plus re-opens after each refresh:
  // a hit rate above 1 - 2/128.
  EXPECT_GT(mem->stats().row_hit_rate(), 1.0 - 2.0 / 128.0);
  EXPECT_GT(mem->stats().row_conflicts, 0u);
}

TEST_F(DramTest, DramTwoChannelsDoubleSequentialBandwidth) {
  DramConfig two = Ddr4();
  two.channels = 2;
  auto one_mem = MakeMemorySystem(Ddr4());
  auto two_mem = MakeMemorySystem(two);
  const uint64_t bytes = 32 * kMiB;
  const double bw1 = BytesPerSecond(bytes, Stream(*one_mem, bytes));
  const double bw2 = BytesPerSecond(bytes, Stream(*two_mem, bytes));
  // Channels are independent (JESD79-4 per-channel peak 25.6 GB/s, H).
  EXPECT_NEAR(bw2 / bw1, 2.0, 0.05);
  EXPECT_LE(bw2, 2 * kDdr4_3200PeakBytesPerSecond);
  EXPECT_NEAR(two_mem->peak_bytes_per_second(), 2 * kDdr4_3200PeakBytesPerSecond, 1.0);
}

// ---- outstanding-request window ----

TEST_F(DramTest, DramOneOutstandingRequestSerializesRowHits) {
  const DramConfig d = Ddr4();
  const uint64_t four_bursts = 4 * 64;  // four bank groups, default map
  auto mem = MakeMemorySystem(d);
  const uint64_t cold = mem->Transfer(0, four_bursts, false, 0, 1);
  // Each request waits for the previous one; all four banks are closed.
  EXPECT_EQ(cold, 4 * Ps(d, d.timing.tRCD + d.timing.CL + d.timing.burst_length / 2));
  const uint64_t serial = mem->Transfer(0, four_bursts, false, cold, 1) - cold;
  // Row hits one after another: 4 x (CL + BL/2) (JESD79-4 READ latency).
  EXPECT_EQ(serial, 4 * (Ps(d, d.timing.CL) + BurstPs(d)));
  const uint64_t from = cold + serial;
  const uint64_t overlapped = mem->Transfer(0, four_bursts, false, from, 4) - from;
  // Four in flight to four groups: CAS every tCCD_S, data back to back.
  EXPECT_EQ(overlapped, Ps(d, d.timing.CL + 3 * d.timing.tCCD_S) + BurstPs(d));
}

// ---- determinism ----

TEST_F(DramTest, DramIdenticalRunsGiveIdenticalResults) {
  auto run = [](std::vector<uint64_t>& times) {
    DramConfig d = DramConfig{};
    d.channels = 2;
    auto mem = MakeMemorySystem(d);
    uint64_t state = 12345, start = 0, end = 0;
    for (int i = 0; i < 2000; ++i) {
      state = state * 6364136223846793005ULL + 1442695040888963407ULL;  // Knuth's MMIX LCG
      const uint64_t address = (state >> 20) % (256 * kMiB);
      start += (state >> 44) % 50000;
      const uint64_t done =
          mem->Transfer(address, 64 + (state >> 58) * 64, (state >> 10) & 1, start, 8);
      times.push_back(done);
      end = std::max(end, done);
    }
    mem->Finish(end);
    return mem->stats();
  };
  std::vector<uint64_t> t1, t2;
  const DramStats a = run(t1), b = run(t2);
  EXPECT_EQ(t1, t2);
  EXPECT_EQ(a.reads, b.reads);
  EXPECT_EQ(a.writes, b.writes);
  EXPECT_EQ(a.row_hits, b.row_hits);
  EXPECT_EQ(a.row_misses, b.row_misses);
  EXPECT_EQ(a.row_conflicts, b.row_conflicts);
  EXPECT_EQ(a.activates, b.activates);
  EXPECT_EQ(a.refreshes, b.refreshes);
  EXPECT_EQ(a.busy_ps, b.busy_ps);
  EXPECT_EQ(a.refresh_ps, b.refresh_ps);
  EXPECT_GT(a.row_conflicts, 0u);
  EXPECT_GT(a.writes, 0u);
}

// ---- ideal memory ----

TEST_F(DramTest, DramIdealMemoryDeliversConfiguredBandwidth) {
  // Enough requests in flight to cover the 50 ns latency at every bandwidth.
  constexpr int64_t kCoveringWindow = 1024;
  for (double gbps : {25.6, 30.0, 400.0}) {
    DramConfig d;
    d.preset = "ideal";
    d.ideal_bandwidth_gbps = gbps;
    auto mem = MakeMemorySystem(d);
    const uint64_t bytes = 64 * kMiB;
    const double bw = BytesPerSecond(bytes, mem->Transfer(0, bytes, false, 0, kCoveringWindow));
    EXPECT_NEAR(bw / (gbps * 1e9), 1.0, 0.01) << gbps;
    EXPECT_EQ(mem->stats().row_hits, 0u);
    EXPECT_EQ(mem->stats().refreshes, 0u);
  }
}

TEST_F(DramTest, DramIdealMemoryWithFewRequestsInFlightIsLatencyBound) {
  DramConfig d;
  d.preset = "ideal";
  d.ideal_bandwidth_gbps = 400.0;  // a 64-byte burst takes 0.16 ns
  auto mem = MakeMemorySystem(d);
  const uint64_t bytes = 16 * kMiB;
  const double bw = BytesPerSecond(bytes, Stream(*mem, bytes));
  // Little's law (Little, 1961): throughput = requests in flight / time each
  // one is in flight = 64 x 64 B / (50 ns + 0.16 ns).
  const double expected = kDeepWindow * 64.0 / ((50.0 + 0.16) * 1e-9);
  EXPECT_NEAR(bw / expected, 1.0, 0.01);
}

TEST_F(DramTest, DramIdealMemorySingleRequestCostsLatencyPlusBurst) {
  DramConfig d;
  d.preset = "ideal";  // 25.6 GB/s: a 64-byte burst takes 2.5 ns; 50 ns latency
  auto mem = MakeMemorySystem(d);
  EXPECT_EQ(mem->burst_bytes(), 64u);
  EXPECT_EQ(mem->Transfer(0, 64, false, 1000, 1), 1000u + 2500u + 50000u);
}

}  // namespace
}  // namespace tritsim
