// Streaming efficiency of one DRAM channel per preset, with compute and DMA
// unconstrained: one long sequential stream, far more requests in flight
// than the controller queue holds, through the plain-C++ memory system.
//
// The ceiling is arithmetic: all-bank refresh takes tRFC of every tREFI, so
// no stream beats 1 - tRFC / tREFI of the peak. The floors are this
// project's targets for a controller that opens rows while other banks
// stream row hits (common practice in JEDEC controllers).
#include <gtest/gtest.h>

#include <cstdint>
#include <string>

#include "config/arch_config.h"
#include "config/config_loader.h"
#include "hw/memory_system.h"

namespace tritsim {
namespace {

constexpr uint64_t kStreamBytes = uint64_t{64} << 20;
constexpr int64_t kUnconstrainedWindow = 4096;  // requests in flight: never the limit
constexpr double kPsPerSecond = 1e12;

struct StreamCase {
  const char* preset;
  double floor;  // project target, fraction of peak
};

double Efficiency(const DramConfig& d, bool is_write) {
  auto mem = MakeMemorySystem(d);
  const uint64_t done = mem->Transfer(0, kStreamBytes, is_write, 0, kUnconstrainedWindow);
  const double bytes_per_second = kStreamBytes / (static_cast<double>(done) / kPsPerSecond);
  return bytes_per_second / mem->peak_bytes_per_second();
}

// 1 - tRFC / tREFI (arithmetic on the preset's timing).
double RefreshCeiling(const DramConfig& d) {
  return 1.0 - static_cast<double>(d.timing.tRFC) / static_cast<double>(d.timing.tREFI);
}

void ExpectEfficiency(const StreamCase& c) {
  DramConfig d;
  ApplyDramPreset(c.preset, d);  // one channel, queue_depth 32, open page, default map
  for (bool is_write : {false, true}) {
    const double e = Efficiency(d, is_write);
    EXPECT_GE(e, c.floor) << c.preset << (is_write ? " write" : " read");
    EXPECT_LE(e, RefreshCeiling(d)) << c.preset << (is_write ? " write" : " read");
  }
}

// DDR4-3200 (JESD79-4: tRFC1 350 ns / tREFI 7.8 us, ceiling 95.5%).
TEST(DramStreaming, Ddr4_3200ReachesNinetyThreePercentOfPeak) {
  ExpectEfficiency({"ddr4-3200", 0.93});
}

// LPDDR5-6400 (JESD209-5: tRFCab 280 ns / tREFI 3.9 us, ceiling 92.8%; the
// timing values are from memory, see dram_presets.cc).
TEST(DramStreaming, Lpddr5_6400ReachesNinetyPercentOfPeak) {
  ExpectEfficiency({"lpddr5-6400", 0.90});
}

// HBM2E (JESD235: tRFC 350 ns / tREFI 3.9 us, ceiling 91.0%; timing from
// memory, see dram_presets.cc).
TEST(DramStreaming, Hbm2eReachesEightyEightPercentOfPeak) { ExpectEfficiency({"hbm2e", 0.88}); }

}  // namespace
}  // namespace tritsim
