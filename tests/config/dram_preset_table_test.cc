// The DRAM preset table is the one place a preset's facts live: the loader,
// the energy table and docs/config-reference.md must agree with it, and the
// energy it implies per bit moved must fall in the published ranges
// (docs/references.md).
#include "config/dram_presets.h"

#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "config/config_loader.h"
#include "config/energy_table.h"

namespace tritsim {
namespace {

std::string ReadSource(const std::string& relative) {
  std::ifstream in(std::string(TRITSIM_SOURCE_DIR) + "/" + relative);
  std::stringstream text;
  text << in.rdbuf();
  return text.str();
}

// The row of the docs' preset table that starts with `label`.
std::string DocsPresetRow(const std::string& label) {
  const std::string docs = ReadSource("docs/config-reference.md");
  const size_t start = docs.find("| " + label + " |");
  if (start == std::string::npos) return "";
  return docs.substr(start, docs.find('\n', start) - start);
}

std::string Number(double value) {
  std::ostringstream s;
  s << value;
  return s.str();
}

TEST(DramPresetTable, NamesComeFromTheTableInDocumentedOrder) {
  ASSERT_EQ(DramPresetTable().size(), DramPresetNames().size());
  EXPECT_EQ(DramPresetNames(),
            (std::vector<std::string>{"ddr4-3200", "lpddr5-6400", "hbm2e", "ideal"}));
}

TEST(DramPresetTable, EnergyTableTakesEachPresetsPerBitEnergy) {
  for (const DramPreset& preset : DramPresetTable()) {
    EXPECT_EQ(ResolveEnergyTable(EnergyConfig{}, preset.name).pj(kDramPjPerBitEntry),
              preset.pj_per_bit)
        << preset.name;
  }
}

TEST(DramPresetTable, Ddr4RefreshIsARankOfEightDevices) {
  // docs/references.md (L, from memory): (IDD5B - IDD3N) ~ 0.2 A x 1.2 V x
  // tRFC 350 ns ~ 84 nJ per 8 Gb x8 device; a 64-bit rank holds eight.
  const DramPreset& ddr4 = DramPresetOrThrow("ddr4-3200");
  EXPECT_NEAR(ddr4.RefreshPjPerChannel(), 8 * 0.2 * 1.2 * 350.0 * 1e3, 1.0);
}

TEST(DramPresetTable, LpddrAndHbmRefreshChargeOneDeviceChannel) {
  // docs/references.md (L): an LPDDR5 x16 channel or an HBM2E pseudo-channel
  // is one device's channel, not a rank of eight.
  EXPECT_EQ(DramPresetOrThrow("lpddr5-6400").devices_per_channel, 1);
  EXPECT_EQ(DramPresetOrThrow("hbm2e").devices_per_channel, 1);
  EXPECT_LT(DramPresetOrThrow("lpddr5-6400").RefreshPjPerChannel(),
            DramPresetOrThrow("ddr4-3200").RefreshPjPerChannel() / 8);
}

TEST(DramPresetTable, IdealMemoryHasNoRefresh) {
  EXPECT_EQ(DramPresetOrThrow("ideal").RefreshPjPerChannel(), 0.0);
}

TEST(DramPresetTable, RefreshOverrideWinsOverThePreset) {
  EnergyConfig energy;
  energy.overrides_pj[kDramRefreshEntry] = 1234.0;
  EXPECT_EQ(ResolveEnergyTable(energy, "hbm2e").pj(kDramRefreshEntry), 1234.0);
}

TEST(DramPresetTable, DocsListEveryPresetsEnergyPerBit) {
  const std::string row = DocsPresetRow("energy per bit");
  ASSERT_FALSE(row.empty()) << "docs/config-reference.md lacks the 'energy per bit' row";
  for (const DramPreset& preset : DramPresetTable()) {
    if (preset.devices_per_channel == 0) continue;  // ideal: described in prose
    EXPECT_NE(row.find(Number(preset.pj_per_bit) + " pJ/bit"), std::string::npos)
        << preset.name << " in: " << row;
  }
}

TEST(DramPresetTable, DocsListEveryPresetsRefreshEnergy) {
  const std::string row = DocsPresetRow("refresh energy per REF per channel");
  ASSERT_FALSE(row.empty());
  for (const DramPreset& preset : DramPresetTable()) {
    if (preset.devices_per_channel == 0) continue;
    const double pj = std::round(preset.RefreshPjPerChannel());
    EXPECT_NE(row.find(Number(pj) + " pJ"), std::string::npos) << preset.name << " in: " << row;
  }
}

TEST(DramPresetTable, DocsListEveryPresetsCapacityPerChannel) {
  const std::string docs = ReadSource("docs/config-reference.md");
  const size_t start = docs.find("| capacity per channel");
  ASSERT_NE(start, std::string::npos);
  const std::string row = docs.substr(start, docs.find('\n', start) - start);
  for (const DramPreset& preset : DramPresetTable()) {
    if (preset.devices_per_channel == 0) continue;  // ideal: described in prose
    EXPECT_NE(row.find("| " + Number(preset.capacity_gib) + " GiB"), std::string::npos)
        << preset.name << " in: " << row;
  }
}

// DRAM energy per bit moved, implied by a golden run's report: everything
// charged to DRAM (bits, activates, refreshes) over the bits moved.
double ImpliedPjPerBit(const std::string& golden) {
  const auto run = nlohmann::json::parse(ReadSource("tests/golden/" + golden + ".json"));
  const double bits =
      8.0 * (run["dram"]["bytes_read"].get<double>() + run["dram"]["bytes_written"].get<double>());
  return run["energy"]["dram"].get<double>() * 1e12 / bits;
}

TEST(DramPresetTable, ImpliedEnergyPerBitFallsInThePublishedRanges) {
  // docs/references.md: DDR4 about 15 - 20 pJ/bit, LPDDR4/5 about 4 - 8
  // pJ/bit (L); HBM2 3.97 pJ/bit (O'Connor et al. 2017, M), held to +-25%
  // because its activation share (1.21 of 3.97) depends on row locality.
  EXPECT_GE(ImpliedPjPerBit("ddr4-wren-prefill-decode"), 15.0);
  EXPECT_LE(ImpliedPjPerBit("ddr4-wren-prefill-decode"), 20.0);
  EXPECT_GE(ImpliedPjPerBit("lpddr5-wren-decode"), 4.0);
  EXPECT_LE(ImpliedPjPerBit("lpddr5-wren-decode"), 8.0);
  EXPECT_NEAR(ImpliedPjPerBit("hbm2e-meadowlark-batch"), 3.97, 0.25 * 3.97);
}

}  // namespace
}  // namespace tritsim
