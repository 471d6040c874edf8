// Skipping steady runs (SteadyRuns::kSkip, memory_system.cc) is an exact
// shortcut: every transfer's completion time and every DRAM counter must be
// the same as when each request is simulated (SteadyRuns::kSimulate). The
// reference here is the simulator's own request-by-request model; the
// workloads reach the edges of a steady run: the column wrapping into the
// next bank or row, the end of a transfer, refresh deadlines inside long
// streams, windows and queues from one entry to deep, several channels,
// other address maps, closed pages, writes, and random traffic. The sizes
// and seeds are test parameters.
#include <gtest/gtest.h>

#include <algorithm>
#include <cstdint>
#include <string>
#include <vector>

#include "config/arch_config.h"
#include "config/config_loader.h"
#include "hw/memory_system.h"

namespace tritsim {
namespace {

constexpr uint64_t kKiB = uint64_t{1} << 10;

struct Op {
  uint64_t address = 0;
  uint64_t bytes = 0;
  bool is_write = false;
  uint64_t gap_ps = 0;  // start after the previous transfer's completion or start
  int64_t window = 1;
  bool after_start = false;  // gap from the previous start (the channels may still be busy)
};

struct Outcome {
  std::vector<uint64_t> done_ps;
  DramStats stats;
  uint64_t skipped = 0;
};

// Runs `ops` back to back (each starts gap_ps after the previous one ends).
Outcome Run(const DramConfig& d, const std::vector<Op>& ops, SteadyRuns steady) {
  auto mem = MakeMemorySystem(d, RowOpening::kAhead, steady);
  Outcome out;
  uint64_t start = 0, done = 0, end = 0;
  for (const Op& op : ops) {
    start = (op.after_start ? start : done) + op.gap_ps;
    done = mem->Transfer(op.address, op.bytes, op.is_write, start, op.window);
    end = std::max(end, done);
    out.done_ps.push_back(done);
  }
  mem->Finish(end + 1);
  out.stats = mem->stats();
  out.skipped = mem->skipped_requests();
  return out;
}

void ExpectSame(const DramConfig& d, const std::vector<Op>& ops, const std::string& what,
                bool expect_skips) {
  const Outcome skip = Run(d, ops, SteadyRuns::kSkip);
  const Outcome sim = Run(d, ops, SteadyRuns::kSimulate);
  ASSERT_EQ(skip.done_ps.size(), sim.done_ps.size());
  for (size_t i = 0; i < sim.done_ps.size(); ++i)
    ASSERT_EQ(skip.done_ps[i], sim.done_ps[i]) << what << ": transfer " << i;
  EXPECT_EQ(skip.stats.reads, sim.stats.reads) << what;
  EXPECT_EQ(skip.stats.writes, sim.stats.writes) << what;
  EXPECT_EQ(skip.stats.row_hits, sim.stats.row_hits) << what;
  EXPECT_EQ(skip.stats.row_misses, sim.stats.row_misses) << what;
  EXPECT_EQ(skip.stats.row_conflicts, sim.stats.row_conflicts) << what;
  EXPECT_EQ(skip.stats.activates, sim.stats.activates) << what;
  EXPECT_EQ(skip.stats.refreshes, sim.stats.refreshes) << what;
  EXPECT_EQ(skip.stats.busy_ps, sim.stats.busy_ps) << what;
  EXPECT_EQ(skip.stats.refresh_ps, sim.stats.refresh_ps) << what;
  EXPECT_EQ(sim.skipped, 0u) << what;
  if (expect_skips) {
    EXPECT_GT(skip.skipped, (sim.stats.reads + sim.stats.writes) / 4) << what << ": few skipped";
  }
}

DramConfig Preset(const char* preset, int64_t channels) {
  DramConfig d;
  ApplyDramPreset(preset, d);
  d.channels = channels;
  return d;
}

// Long streams in alternating directions, unaligned starts and ends, idle
// gaps that let refreshes fall inside and between transfers.
std::vector<Op> Streams(int64_t window) {
  std::vector<Op> ops;
  uint64_t address = 3 * kKiB + 40;
  for (int i = 0; i < 6; ++i) {
    Op op;
    op.address = address;
    op.bytes = (i % 3 == 0 ? 1024 : 200) * kKiB + 72;
    op.is_write = i % 2 == 1;
    op.gap_ps = i % 2 == 0 ? 0 : 9000000;
    op.window = window;
    ops.push_back(op);
    address += op.bytes + (i % 2 == 0 ? 0 : 7 * kKiB);
  }
  return ops;
}

// Random traffic (Knuth's MMIX LCG). Back to back: any address, 1 B to
// 96 KiB, windows 1 to 256, reads and writes, idle gaps now and then.
// Overlapping: transfers that start on their own clock, often while the
// channels still work on the last one (the next transfer's first requests
// come before this one's last events), up to 16 KiB, window 32.
std::vector<Op> Random(uint64_t seed, bool overlapping) {
  std::vector<Op> ops;
  uint64_t state = seed;
  for (int i = 0; i < (overlapping ? 1500 : 400); ++i) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    Op op;
    op.address = (state >> 20) % (64 * 1024 * kKiB);
    op.after_start = overlapping;
    if (overlapping) {
      op.gap_ps = (state >> 44) % 20000;
      op.bytes = 64 + (state >> 56) * 64;
      op.is_write = ((state >> 10) & 1) != 0;
      op.window = 32;
    } else {
      op.gap_ps = (state >> 44) % 4 == 0 ? (state >> 30) % 20000 : 0;
      op.bytes = 1 + (state >> 50) % (96 * kKiB);
      op.is_write = ((state >> 10) & 3) == 0;
      op.window = int64_t{1} << ((state >> 12) % 9);
    }
    ops.push_back(op);
  }
  return ops;
}

TEST(DramSteadyRuns, StreamsGiveTheSameResultsOnEveryPreset) {
  for (const char* preset : {"ddr4-3200", "lpddr5-6400", "hbm2e"}) {
    for (int64_t channels : {1, 3, 4, 16}) {
      for (int64_t per_channel : {1, 8, 32}) {
        const DramConfig d = Preset(preset, channels);
        const int64_t window = per_channel * channels;
        ExpectSame(d, Streams(window),
                   std::string(preset) + " x" + std::to_string(channels) + " window " +
                       std::to_string(window),
                   per_channel >= 8);
      }
    }
  }
}

TEST(DramSteadyRuns, OtherControllersAndMapsGiveTheSameResults) {
  struct Variant {
    std::string name;
    void (*apply)(DramConfig&);
  };
  const std::vector<Variant> variants = {
      {"closed page", [](DramConfig& d) { d.page_policy = PagePolicy::kClosed; }},
      {"queue depth 1", [](DramConfig& d) { d.queue_depth = 1; }},
      {"queue depth 4", [](DramConfig& d) { d.queue_depth = 4; }},
      {"column first",
       [](DramConfig& d) {
         d.address_map = {AddressField::kRow, AddressField::kBank, AddressField::kBankGroup,
                          AddressField::kChannel, AddressField::kColumn};
       }},
      {"bank below column",
       [](DramConfig& d) {
         d.address_map = {AddressField::kRow, AddressField::kColumn, AddressField::kBank,
                          AddressField::kBankGroup, AddressField::kChannel};
       }},
      {"tCK 0.833 ns", [](DramConfig& d) { d.timing.tCK_ns = 0.833; }},
      {"short tREFI", [](DramConfig& d) { d.timing.tREFI /= 8; }},
  };
  for (const Variant& v : variants) {
    for (int64_t channels : {1, 3}) {
      DramConfig d = Preset("ddr4-3200", channels);
      v.apply(d);
      ExpectSame(d, Streams(32 * channels), v.name + " x" + std::to_string(channels), false);
    }
  }
}

TEST(DramSteadyRuns, RandomTrafficGivesTheSameResults) {
  for (const char* preset : {"ddr4-3200", "lpddr5-6400", "hbm2e"}) {
    for (int64_t channels : {1, 2, 8}) {
      for (uint64_t seed : {7u, 11u}) {
        const std::string what =
            std::string(preset) + " x" + std::to_string(channels) + " seed " + std::to_string(seed);
        ExpectSame(Preset(preset, channels), Random(seed, false), what, false);
        ExpectSame(Preset(preset, channels), Random(seed, true), what + " overlapping", false);
      }
    }
  }
}

}  // namespace
}  // namespace tritsim
