// The law of opening rows ahead: a controller that opens rows for queued
// requests while other banks stream row hits must not be slower than the
// same FR-FCFS controller opening rows only for the request it picks
// (RowOpening::kInOrder), beyond a small tolerance for the different
// refresh and arrival phases the two end up in. Checked on sequential
// streams (every preset, one and several channels, windows from one request
// in flight to unconstrained) and on random traffic.
//
// The tolerance, 0.5 % of the in-order completion time, is this project's
// rule (docs/dram-log.md); the other numbers are test parameters.
#include <gtest/gtest.h>

#include <algorithm>
#include <cstdint>
#include <string>

#include "config/arch_config.h"
#include "config/config_loader.h"
#include "hw/memory_system.h"

namespace tritsim {
namespace {

constexpr double kTolerance = 0.005;  // project rule: at most 0.5 % slower
constexpr uint64_t kMiB = uint64_t{1} << 20;

// Completion time of one sequential read or write of `bytes` from address 0.
uint64_t SequentialPs(const DramConfig& d, RowOpening opening, uint64_t bytes, bool is_write,
                      int64_t window) {
  auto mem = MakeMemorySystem(d, opening);
  return mem->Transfer(0, bytes, is_write, 0, window);
}

// Completion time of the last of 1500 transfers at random addresses, sizes
// and start times, reads and writes mixed (Knuth's MMIX LCG constants).
uint64_t RandomPs(const DramConfig& d, RowOpening opening, int64_t window) {
  auto mem = MakeMemorySystem(d, opening);
  uint64_t state = 11, start = 0, end = 0;
  for (int i = 0; i < 1500; ++i) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    const uint64_t address = (state >> 20) % (64 * kMiB);
    start += (state >> 44) % 20000;
    const uint64_t bytes = 64 + (state >> 56) * 64;  // up to 16 KiB
    end = std::max(end, mem->Transfer(address, bytes, (state >> 10) & 1, start, window));
  }
  return end;
}

void ExpectNotSlower(uint64_t ahead_ps, uint64_t in_order_ps, const std::string& what) {
  EXPECT_LE(static_cast<double>(ahead_ps), static_cast<double>(in_order_ps) * (1.0 + kTolerance))
      << what << ": ahead " << ahead_ps << " ps, in order " << in_order_ps << " ps";
}

DramConfig Preset(const char* preset, int64_t channels) {
  DramConfig d;
  ApplyDramPreset(preset, d);
  d.channels = channels;
  return d;
}

TEST(DramRowOpening, SequentialStreamsAreNotSlowerThanInOrderOpening) {
  for (const char* preset : {"ddr4-3200", "lpddr5-6400", "hbm2e"}) {
    for (int64_t channels : {1, 4, 16}) {
      const DramConfig d = Preset(preset, channels);
      for (int64_t per_channel : {1, 4, 16, 64}) {
        for (bool is_write : {false, true}) {
          const int64_t window = per_channel * channels;
          const uint64_t bytes = 2 * kMiB;
          ExpectNotSlower(SequentialPs(d, RowOpening::kAhead, bytes, is_write, window),
                          SequentialPs(d, RowOpening::kInOrder, bytes, is_write, window),
                          std::string(preset) + " x" + std::to_string(channels) + " window " +
                              std::to_string(window) + (is_write ? " write" : " read"));
        }
      }
    }
  }
}

TEST(DramRowOpening, RandomTrafficIsNotSlowerThanInOrderOpening) {
  for (const char* preset : {"ddr4-3200", "lpddr5-6400", "hbm2e"}) {
    for (int64_t channels : {1, 2}) {
      const DramConfig d = Preset(preset, channels);
      for (int64_t window : {4, 32}) {
        ExpectNotSlower(RandomPs(d, RowOpening::kAhead, window),
                        RandomPs(d, RowOpening::kInOrder, window),
                        std::string(preset) + " x" + std::to_string(channels) + " window " +
                            std::to_string(window));
      }
    }
  }
}

}  // namespace
}  // namespace tritsim
