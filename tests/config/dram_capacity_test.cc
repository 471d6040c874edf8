// DRAM capacity: the per-preset default, the dram.capacity_gib override,
// what inspect reports of it and run's refusal of a workload that does not fit.
#include <gtest/gtest.h>
#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "common/error.h"
#include "config/config_loader.h"
#include "config/dram_presets.h"
#include "model/model_stats.h"
#include "report/inspect_report.h"

namespace tritsim {
namespace {

constexpr double kGib = 1024.0 * 1024.0 * 1024.0;

std::string Source(const std::string& relative) {
  return std::string(TRITSIM_SOURCE_DIR) + "/" + relative;
}

TEST(DramCapacity, PresetDefaultsFollowCommonDeviceDensities) {
  // docs/references.md, "Capacities" (common practice, L): a DDR4 channel
  // holds 8 - 32 GiB; a phone 8 - 16 GB of LPDDR5 over four x16 channels.
  EXPECT_EQ(DramPresetOrThrow("ddr4-3200").capacity_gib, 16.0);
  EXPECT_GE(4 * DramPresetOrThrow("lpddr5-6400").capacity_gib, 8.0);
  EXPECT_LE(4 * DramPresetOrThrow("lpddr5-6400").capacity_gib, 16.0);
  // Eight 16 Gb dies = 16 GiB per HBM2E stack over 16 pseudo-channels
  // (JESD235 stack heights; M): 1 GiB each (arithmetic).
  EXPECT_EQ(16 * DramPresetOrThrow("hbm2e").capacity_gib, 8 * 16.0 / 8.0);
}

TEST(DramCapacity, DefaultIsPerChannelTimesChannelsAndTheKeyIsATotal) {
  // Arithmetic: 16 pseudo-channels x 1 GiB; an explicit capacity_gib is the total.
  const ArchConfig osprey = LoadArchFile(Source("configs/osprey-card-hbm2e.yaml"));
  EXPECT_EQ(DramCapacityBytes(osprey.dram), 16.0 * kGib);
  const ArchConfig set =
      LoadArchFile(Source("configs/osprey-card-hbm2e.yaml"), {{"dram.capacity_gib", "24"}});
  EXPECT_EQ(DramCapacityBytes(set.dram), 24.0 * kGib);
}

TEST(DramCapacity, CapacityOutOfRangeIsRefusedNotClamped) {
  EXPECT_THROW(DefaultArch({{"dram.capacity_gib", "0"}}), Error);
  EXPECT_THROW(DefaultArch({{"dram.capacity_gib", "-4"}}), Error);
}

TEST(DramCapacity, EightBitKvHoldsExactlyTwiceTheTokensOfSixteenBit) {
  // Arithmetic: K and V entries of half the bits take half the bytes, so the
  // same free bytes hold twice the tokens. Free bytes are set to 1000.25
  // sixteen-bit tokens so flooring cannot blur the factor.
  const ArchConfig base = LoadArchFile(Source("configs/heron-edge-ddr4.yaml"));
  const WorkloadConfig workload{16, 16, 0, 1};
  const ModelConfig kv16 = DefaultModel({{"precision.kv_bits", "16"}});
  const ModelConfig kv8 = DefaultModel({{"precision.kv_bits", "8"}});
  const DramCapacity probe = ComputeDramCapacity(kv16, base, workload);
  ArchConfig arch = base;
  arch.dram.capacity_gib =
      (probe.weight_bytes + probe.activation_bytes + 1000.25 * probe.kv_bytes_per_token) / kGib;
  const DramCapacity c16 = ComputeDramCapacity(kv16, arch, workload);
  const DramCapacity c8 = ComputeDramCapacity(kv8, arch, workload);
  EXPECT_EQ(c8.free_bytes, c16.free_bytes);
  EXPECT_EQ(c16.kv_bytes_per_token, 2 * c8.kv_bytes_per_token);
  EXPECT_EQ(c16.max_kv_tokens, 1000);
  EXPECT_EQ(c8.max_kv_tokens, 2 * c16.max_kv_tokens);
}

// Inspect's capacity keys, for every demo design with condor-13b (the
// largest demo model), obey their definitions (docs/config-reference.md).
TEST(DramCapacity, InspectJsonHasTheKeysWithConsistentArithmetic) {
  const ModelConfig model = LoadModelFile(Source("models/condor-13b.yaml"));
  const WorkloadConfig workload{128, 64, 1024, 2};
  for (const char* design :
       {"heron-edge-ddr4", "finch-phone-lpddr5", "osprey-card-hbm2e", "ideal-memory"}) {
    const ArchConfig arch = LoadArchFile(Source(std::string("configs/") + design + ".yaml"));
    const nlohmann::ordered_json c = InspectJson({model, arch, workload})["capacity"];
    const double free = c["dram_bytes"].get<double>() - c["weight_bytes"].get<double>() -
                        c["activation_bytes"].get<double>();
    EXPECT_EQ(c["free_bytes"].get<double>(), std::max(0.0, free)) << design;
    const int64_t tokens = c["max_kv_tokens"].get<int64_t>();
    EXPECT_EQ(tokens, int64_t(std::floor(c["free_bytes"].get<double>() /
                                         c["kv_bytes_per_token"].get<double>())))
        << design;
    EXPECT_EQ(c["max_context_at_batch"].get<int64_t>(), tokens / workload.batch) << design;
    EXPECT_EQ(c["max_batch_at_context"].get<int64_t>(), tokens / (1024 + 128 + 64)) << design;
    EXPECT_EQ(c["weight_bytes"].get<double>(), WeightBytesOnArch(model, arch)) << design;
  }
}

TEST(DramCapacity, RunThatCannotFitFailsWithExitFourBeforeSimulating) {
  // condor-13b on the 12 GiB phone at a 200k-token context needs far more
  // than 12 GiB of KV cache (inspect), so run must refuse with exit 4 (a
  // simulation that cannot run, sim/common/error.h) naming both sizes.
  const std::string err = testing::TempDir() + "tritsim_capacity_test.err";
  const std::string cmd = std::string(TRITSIM_BINARY) + " run --model " +
                          Source("models/condor-13b.yaml") + " --arch " +
                          Source("configs/finch-phone-lpddr5.yaml") +
                          " --context 200000 --decode 1 --quiet >/dev/null 2>" + err;
  const int status = std::system(cmd.c_str());
  ASSERT_TRUE(WIFEXITED(status));
  EXPECT_EQ(WEXITSTATUS(status), 4);
  std::ifstream in(err);
  std::stringstream text;
  text << in.rdbuf();
  EXPECT_NE(text.str().find("cannot hold the weights of"), std::string::npos) << text.str();
  EXPECT_NE(text.str().find("plus its KV cache"), std::string::npos) << text.str();
}

}  // namespace
}  // namespace tritsim
