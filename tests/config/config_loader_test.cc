// The strict configuration layer: demo files load, defaults and presets
// apply in the documented order, overrides win, DRAM presets match the
// published values (docs/references.md), and every kind of bad input is a
// one-line error naming file, line, key and what is allowed, with the
// documented exit code.
#include "config/config_loader.h"

#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <functional>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/dram_presets.h"
#include "model/model_stats.h"

namespace tritsim {
namespace {

std::string SourcePath(const std::string& relative) {
  return std::string(TRITSIM_SOURCE_DIR) + "/" + relative;
}

std::string BadInput(const std::string& name) {
  return SourcePath("tests/bad_inputs/config/" + name);
}

// Runs `load`, which must throw tritsim::Error; returns it.
Error CaughtError(const std::function<void()>& load) {
  try {
    load();
  } catch (const Error& e) {
    return e;
  }
  ADD_FAILURE() << "no error thrown";
  return Error(ExitCode::kOk, "");
}

void ExpectBadInput(const std::function<void()>& load, const std::string& fragment) {
  const Error e = CaughtError(load);
  EXPECT_EQ(e.code(), ExitCode::kBadInput) << e.what();
  EXPECT_NE(std::string(e.what()).find(fragment), std::string::npos)
      << "message: " << e.what() << "\nexpected to contain: " << fragment;
  EXPECT_EQ(std::string(e.what()).find('\n'), std::string::npos) << "not one line: " << e.what();
}

// ------------------------------------------------------------ demo files

TEST(ConfigLoader, AllDemoModelsLoad) {
  for (const char* name : {"meadowlark-3b", "wren-0.7b", "condor-13b"}) {
    SCOPED_TRACE(name);
    const ModelConfig m = LoadModelFile(SourcePath(std::string("models/") + name + ".yaml"));
    EXPECT_EQ(m.name, name);
  }
}

TEST(ConfigLoader, AllDemoDesignPointsLoad) {
  const std::vector<std::pair<const char*, const char*>> files = {
      {"heron-edge-ddr4", "ddr4-3200"},
      {"finch-phone-lpddr5", "lpddr5-6400"},
      {"osprey-card-hbm2e", "hbm2e"},
      {"ideal-memory", "ideal"}};
  for (const auto& [file, preset] : files) {
    SCOPED_TRACE(file);
    const ArchConfig a = LoadArchFile(SourcePath(std::string("configs/") + file + ".yaml"));
    EXPECT_EQ(a.dram.preset, preset);
  }
}

TEST(ConfigLoader, DemoDesignPointsPeakAtTheirStandardsBandwidth) {
  const auto peak = [](const char* file) {
    return DramPeakBytesPerSecond(LoadArchFile(SourcePath(std::string("configs/") + file)).dram);
  };
  // JESD79-4: one 64-bit DDR4-3200 channel, 25.6 GB/s (H).
  EXPECT_NEAR(peak("heron-edge-ddr4.yaml"), 25.6e9, 1e-3);
  // JESD209-5 via docs/references.md: 4 x16 LPDDR5-6400 channels, 51.2 GB/s (M).
  EXPECT_NEAR(peak("finch-phone-lpddr5.yaml"), 51.2e9, 1e-3);
  // JESD235 family via docs/references.md: one HBM2E stack at 3.6 Gb/s, 460.8 GB/s (H).
  EXPECT_NEAR(peak("osprey-card-hbm2e.yaml"), 460.8e9, 1e-2);
  EXPECT_NEAR(peak("ideal-memory.yaml"), 25.6e9, 1e-3);  // its stated fixed bandwidth
}

TEST(ConfigLoader, Condor13bHasThePublishedParameterCount) {
  const ModelConfig m = LoadModelFile(SourcePath("models/condor-13b.yaml"));
  // Touvron et al. 2023: width 5120, 40 layers, FFN 13824, vocab 32000 ->
  // about 13.0 billion parameters (M; 1% covers "about").
  EXPECT_NEAR(ComputeModelStats(m).parameters.total(), 13.0e9, 0.13e9);
}

TEST(ConfigLoader, Wren07bIsAboutSevenHundredMillionParameters) {
  const ModelConfig m = LoadModelFile(SourcePath("models/wren-0.7b.yaml"));
  EXPECT_EQ(m.kv_heads, 4);
  EXPECT_TRUE(m.tied_embeddings);
  // The name's claim, by hand: 26 x (1536 x 4096 attention with 4 KV heads
  // of 128 + 3 x 1536 x 4096 FFN) + 32000 x 1536 tied = 0.7035e9; norms are
  // negligible. 2% tolerance for the rounding in the name.
  EXPECT_NEAR(ComputeModelStats(m).parameters.total(), 0.70e9, 0.014e9);
}

TEST(ConfigLoader, DefaultsAreTheEmbeddedDemoFiles) {
  const ModelConfig m = DefaultModel();
  const ModelConfig f = LoadModelFile(SourcePath("models/meadowlark-3b.yaml"));
  EXPECT_EQ(m.name, f.name);
  EXPECT_EQ(m.layers, f.layers);
  EXPECT_EQ(m.ffn_width, f.ffn_width);
  const ArchConfig a = DefaultArch();
  EXPECT_EQ(a.name, "heron-edge-ddr4");
  EXPECT_EQ(a.array.trees, LoadArchFile(SourcePath("configs/heron-edge-ddr4.yaml")).array.trees);
}

TEST(ConfigLoader, DefaultsTakeOverrides) {
  EXPECT_EQ(DefaultArch({{"array.trees", "32"}}).array.trees, 32);
  EXPECT_EQ(DefaultModel({{"layers", "2"}}).layers, 2);
}

TEST(ConfigLoader, MissingKeysTakeStructDefaults) {
  const ArchConfig a = LoadArchText("name: bare\n", "bare.yaml");
  const ArchConfig d;
  EXPECT_EQ(a.name, "bare");
  EXPECT_EQ(a.array.trees, d.array.trees);
  EXPECT_EQ(a.sram.capacity_kib, d.sram.capacity_kib);
  EXPECT_EQ(a.dram.timing.tRCD, d.dram.timing.tRCD);
  EXPECT_EQ(a.dram.address_map, d.dram.address_map);
  const ModelConfig m = LoadModelText("name: bare\n", "bare.yaml");
  EXPECT_EQ(m.heads, ModelConfig().heads);
  EXPECT_DOUBLE_EQ(m.weight_zero_fraction, ModelConfig().weight_zero_fraction);
}

TEST(ConfigLoader, PresetIsAppliedFirstThenFileKeysWin) {
  const ArchConfig a =
      LoadArchText("dram:\n  preset: hbm2e\n  channels: 8\n  timing:\n    tRCD: 30\n", "hbm.yaml");
  EXPECT_EQ(a.dram.timing.tRCD, 30);         // the file's key
  EXPECT_EQ(a.dram.timing.burst_length, 4);  // the preset's: HBM2 BL4 (JESD235A; H)
  EXPECT_EQ(a.dram.bus_width_bits, 64);      // pseudo-channel width (JESD235A; H)
  EXPECT_EQ(a.dram.channels, 8);
}

TEST(ConfigLoader, OverrideWinsOverTheFile) {
  const ArchConfig a =
      LoadArchFile(SourcePath("configs/heron-edge-ddr4.yaml"), {{"array.trees", "128"}});
  EXPECT_EQ(a.array.trees, 128);
}

TEST(ConfigLoader, OverriddenPresetStillYieldsToFileKeys) {
  // finch names lpddr5-6400 and 4 channels; switching the preset keeps the
  // file's channel count.
  const ArchConfig a =
      LoadArchFile(SourcePath("configs/finch-phone-lpddr5.yaml"), {{"dram.preset", "hbm2e"}});
  EXPECT_EQ(a.dram.preset, "hbm2e");
  EXPECT_EQ(a.dram.channels, 4);
  EXPECT_EQ(a.dram.timing.burst_length, 4);
}

TEST(ConfigLoader, OverrideCreatesMissingSections) {
  const ArchConfig a =
      LoadArchText("name: bare\n", "bare.yaml",
                   {{"dram.timing.tRCD", "30"}, {"energy.overrides.sram_64bit_32kib", "7.5"}});
  EXPECT_EQ(a.dram.timing.tRCD, 30);
  EXPECT_DOUBLE_EQ(a.energy.overrides_pj.at("sram_64bit_32kib"), 7.5);
}

TEST(ConfigLoader, LaterOverrideWins) {
  const ArchConfig a =
      LoadArchText("name: bare\n", "bare.yaml", {{"array.trees", "8"}, {"array.trees", "16"}});
  EXPECT_EQ(a.array.trees, 16);
}

TEST(ConfigLoader, ReadsEnumsListsAndMaps) {
  const ArchConfig a = LoadArchText(
      "array:\n  kind: fp16_mac\npacking:\n  format: two_bit\n"
      "dram:\n  page_policy: closed\n  address_map: [channel, row, bank_group, bank, column]\n"
      "energy:\n  node: 45nm\n  overrides:\n    int8_add: 0.031\n  dram_pj_per_bit: 3.97\n",
      "enums.yaml");
  EXPECT_EQ(a.array.kind, ArrayKind::kFp16Mac);
  EXPECT_EQ(a.packing.format, TritPacking::kTwoBit);
  EXPECT_EQ(a.dram.page_policy, PagePolicy::kClosed);
  const std::vector<AddressField> expected = {AddressField::kChannel, AddressField::kRow,
                                              AddressField::kBankGroup, AddressField::kBank,
                                              AddressField::kColumn};
  EXPECT_EQ(a.dram.address_map, expected);
  EXPECT_EQ(a.energy.node, "45nm");
  EXPECT_DOUBLE_EQ(a.energy.overrides_pj.at("int8_add"), 0.031);
  EXPECT_DOUBLE_EQ(a.energy.dram_pj_per_bit, 3.97);
}

// ----------------------------------------------------------- DRAM presets

DramConfig Preset(const std::string& name, int64_t channels) {
  DramConfig d;
  ApplyDramPreset(name, d);
  d.channels = channels;
  return d;
}

TEST(DramPresets, Ddr4_3200ChannelPeaksAt25_6GBps) {
  // JESD79-4: 3200 MT/s x 8 bytes = 25.6 GB/s per 64-bit channel (H).
  EXPECT_NEAR(DramPeakBytesPerSecond(Preset("ddr4-3200", 1)), 25.6e9, 25.6e9 * 1e-12);
}

TEST(DramPresets, Hbm2eStackPeaksAt460_8GBps) {
  // JESD235 family (docs/references.md): 16 x 64-bit pseudo-channels at 3.6 Gb/s
  // per pin = 460.8 GB/s per stack (H).
  EXPECT_NEAR(DramPeakBytesPerSecond(Preset("hbm2e", 16)), 460.8e9, 460.8e9 * 1e-12);
}

TEST(DramPresets, Lpddr5FourX16ChannelsPeakAt51_2GBps) {
  // JESD209-5 (docs/references.md): 12.8 GB/s per x16 channel, 51.2 GB/s per
  // 64 bits (M).
  EXPECT_NEAR(DramPeakBytesPerSecond(Preset("lpddr5-6400", 4)), 51.2e9, 51.2e9 * 1e-12);
}

TEST(DramPresets, IdealMemoryPeakIsItsConfiguredBandwidth) {
  DramConfig d = Preset("ideal", 1);
  d.ideal_bandwidth_gbps = 100.0;
  EXPECT_DOUBLE_EQ(DramPeakBytesPerSecond(d), 100.0e9);
}

TEST(DramPresets, Ddr4_3200TimingsMatchJedecNanoseconds) {
  const DramTiming t = Preset("ddr4-3200", 1).timing;
  // JESD79-4 speed bin 3200AA (docs/references.md, H): tRCD = tRP = CL = 13.75 ns,
  // tRFC1 350 ns (8 Gb), tREFI 7.8 us, tRAS >= 32 ns.
  EXPECT_DOUBLE_EQ(t.tRCD * t.tCK_ns, 13.75);
  EXPECT_DOUBLE_EQ(t.tRP * t.tCK_ns, 13.75);
  EXPECT_DOUBLE_EQ(t.CL * t.tCK_ns, 13.75);
  EXPECT_DOUBLE_EQ(t.tRFC * t.tCK_ns, 350.0);
  EXPECT_DOUBLE_EQ(t.tREFI * t.tCK_ns, 7800.0);
  EXPECT_GE(t.tRAS * t.tCK_ns, 32.0);
  // docs/references.md: refresh alone takes tRFC / tREFI = 4.5% (H, arithmetic).
  EXPECT_NEAR(double(t.tRFC) / double(t.tREFI), 0.045, 0.0005);
}

// A delay given in ns becomes the fewest whole cycles covering it.
void ExpectCeilCycles(int64_t cycles, double tck_ns, double ns) {
  EXPECT_GE(cycles * tck_ns, ns - 1e-9);
  EXPECT_LT((cycles - 1) * tck_ns, ns);
}

TEST(DramPresets, Lpddr5NanosecondValuesRoundUpToWholeCycles) {
  const DramTiming t = Preset("lpddr5-6400", 1).timing;
  // tCK in our two-transfers-per-tCK unit: 2 / 6400 MT/s (JESD209-5; H).
  EXPECT_DOUBLE_EQ(t.tCK_ns, 0.3125);
  // docs/references.md LPDDR5-6400 (L, from memory): tRCD 18, tRPpb 18, tRAS 42,
  // tFAW 20 ns, tREFI 3.9 us.
  ExpectCeilCycles(t.tRCD, t.tCK_ns, 18.0);
  ExpectCeilCycles(t.tRP, t.tCK_ns, 18.0);
  ExpectCeilCycles(t.tRAS, t.tCK_ns, 42.0);
  ExpectCeilCycles(t.tFAW, t.tCK_ns, 20.0);
  ExpectCeilCycles(t.tREFI, t.tCK_ns, 3900.0);
  EXPECT_EQ(t.burst_length, 16);  // BL16 (JESD209-5; H)
}

TEST(DramPresets, Hbm2eRefreshIntervalIsWholeCyclesAtOnePointEightGHz) {
  const DramTiming t = Preset("hbm2e", 1).timing;
  // 3.6 Gb/s per pin, two transfers per tCK -> 1.8 GHz (JESD235 family; H);
  // tREFI 3.9 us (L) is exactly 7020 cycles, a check on the rounding slack.
  EXPECT_NEAR(t.tCK_ns, 1.0 / 1.8, 1e-12);
  EXPECT_EQ(t.tREFI, 7020);
}

TEST(DramPresets, EveryPresetPassesTheLoaderChecks) {
  for (const std::string& name : DramPresetNames()) {
    SCOPED_TRACE(name);
    const ArchConfig a = LoadArchText("dram:\n  preset: " + name + "\n", "preset.yaml");
    EXPECT_EQ(a.dram.preset, name);
  }
}

TEST(DramPresets, ResultDoesNotDependOnWhatWasThereBefore) {
  DramConfig switched = Preset("lpddr5-6400", 4);
  ApplyDramPreset("ideal", switched);
  const DramConfig fresh = Preset("ideal", 4);
  EXPECT_EQ(switched.bus_width_bits, fresh.bus_width_bits);
  EXPECT_EQ(switched.row_bytes, fresh.row_bytes);
  EXPECT_EQ(switched.timing.tRCD, fresh.timing.tRCD);
  EXPECT_EQ(switched.channels, 4);  // a system choice, left alone
}

TEST(DramPresets, UnknownPresetListsTheAllowedOnes) {
  DramConfig d;
  ExpectBadInput([&] { ApplyDramPreset("ddr5-4800", d); },
                 "allowed: ddr4-3200, lpddr5-6400, hbm2e, ideal");
}

TEST(DramPresets, BurstBytesAreBusWidthTimesBurstLength) {
  // DDR4 x64 BL8 moves one 64-byte cache line per burst (JESD79-4; common practice).
  EXPECT_EQ(DramBurstBytes(Preset("ddr4-3200", 1)), 64);
  EXPECT_EQ(DramBurstBytes(Preset("hbm2e", 1)), 32);  // 64 bits x BL4 (JESD235A; H)
}

// --------------------------------------------------------- bad input table

enum class Kind { kModel, kArch };

struct BadCase {
  const char* name;  // test suffix
  Kind kind;
  const char* file;  // under tests/bad_inputs/config/, or nullptr
  const char* text;  // inline text when file is nullptr
  ConfigOverrides overrides;
  const char* fragment;  // must appear in the message
};

void PrintTo(const BadCase& c, std::ostream* os) { *os << c.name; }

void Load(const BadCase& c) {
  const ConfigOverrides& o = c.overrides;
  if (c.file) {
    const std::string path = BadInput(c.file);
    if (c.kind == Kind::kModel) {
      LoadModelFile(path, o);
    } else {
      LoadArchFile(path, o);
    }
  } else if (c.kind == Kind::kModel) {
    LoadModelText(c.text, "inline.yaml", o);
  } else {
    LoadArchText(c.text, "inline.yaml", o);
  }
}

class BadConfig : public testing::TestWithParam<BadCase> {};

TEST_P(BadConfig, IsRejectedWithExitCodeAndMessage) {
  const BadCase& c = GetParam();
  ExpectBadInput([&] { Load(c); }, c.fragment);
}

const BadCase kBadCases[] = {
    {"UnknownKeySuggestsNearest",
     Kind::kArch,
     "arch_unknown_key.yaml",
     nullptr,
     {},
     "arch_unknown_key.yaml:6: array.fan_inn: unknown key; did you mean 'fan_in'?"},
    {"UnknownSectionSuggestsNearest",
     Kind::kArch,
     "arch_unknown_section.yaml",
     nullptr,
     {},
     "arch_unknown_section.yaml:3: dramm: unknown key; did you mean 'dram'?"},
    {"ModelTypo",
     Kind::kModel,
     "model_typo_top.yaml",
     nullptr,
     {},
     "model_typo_top.yaml:3: layres: unknown key; did you mean 'layers'?"},
    {"FarOffKeyListsKnownKeys",
     Kind::kModel,
     nullptr,
     "zzzzzzzzzz: 1\n",
     {},
     "inline.yaml:1: zzzzzzzzzz: unknown key; known keys here: name, layers"},
    {"QuotedStringForInteger",
     Kind::kArch,
     "arch_wrong_type.yaml",
     nullptr,
     {},
     "arch_wrong_type.yaml:3: array.trees: must be an integer in [1, 65536], got \"sixty-four\""},
    {"TaggedStringForInteger",
     Kind::kArch,
     nullptr,
     "array:\n  trees: !!str 64\n",
     {},
     "inline.yaml:2: array.trees: must be an integer in [1, 65536], got 64"},
    {"FractionForInteger",
     Kind::kArch,
     "arch_non_integer.yaml",
     nullptr,
     {},
     "arch_non_integer.yaml:3: array.trees: must be an integer in [1, 65536], got 3.5"},
    {"NegativeSize",
     Kind::kArch,
     "arch_negative_size.yaml",
     nullptr,
     {},
     "arch_negative_size.yaml:3: sram.capacity_kib: must be an integer in [16, 1048576], got "
     "-2048"},
    {"NegativeTiming",
     Kind::kArch,
     "arch_negative_timing.yaml",
     nullptr,
     {},
     "arch_negative_timing.yaml:14: dram.timing.tRCD: must be a positive integer number of DRAM "
     "cycles, got -3"},
    {"TimingAboveCap",
     Kind::kArch,
     nullptr,
     "dram:\n  timing:\n    tREFI: 2000000\n",
     {},
     "inline.yaml:3: dram.timing.tREFI: must be at most 1000000 DRAM cycles, got 2000000"},
    {"ZeroBandwidth",
     Kind::kArch,
     "arch_zero_bandwidth.yaml",
     nullptr,
     {},
     "arch_zero_bandwidth.yaml:4: dram.ideal_bandwidth_gbps: must be a number in [0.01, 1000000], "
     "got "
     "0"},
    {"NotANumber",
     Kind::kArch,
     "arch_nan.yaml",
     nullptr,
     {},
     "arch_nan.yaml:3: clock.core_mhz: must be a finite number in [1, 10000], got .nan"},
    {"Infinity",
     Kind::kArch,
     "arch_infinity.yaml",
     nullptr,
     {},
     "arch_infinity.yaml:4: dram.ideal_latency_ns: must be a finite number"},
    {"OverflowingInteger",
     Kind::kModel,
     "model_overflowing_vocab.yaml",
     nullptr,
     {},
     "model_overflowing_vocab.yaml:2: vocab: must be an integer in [1, 4000000], got 9999"},
    {"HugeLayerCount",
     Kind::kModel,
     "model_huge_layers.yaml",
     nullptr,
     {},
     "model_huge_layers.yaml:2: layers: must be an integer in [1, 1024], got 100000"},
    {"BanksNotPowerOfTwo",
     Kind::kArch,
     "arch_sram_banks_not_pow2.yaml",
     nullptr,
     {},
     "arch_sram_banks_not_pow2.yaml:3: sram.banks: must be a power of two in [1, 1024], got 12"},
    {"FanInNotPowerOfTwo",
     Kind::kArch,
     "arch_fan_in_not_pow2.yaml",
     nullptr,
     {},
     "arch_fan_in_not_pow2.yaml:3: array.fan_in: must be a power of two in [2, 4096], got 48"},
    {"BadEnumListsAllowed",
     Kind::kArch,
     "arch_bad_enum.yaml",
     nullptr,
     {},
     "arch_bad_enum.yaml:3: array.kind: must be one of ternary, int8_mac, fp16_mac; got "
     "'int4_mac'"},
    {"BadPresetListsAllowed",
     Kind::kArch,
     "arch_bad_preset.yaml",
     nullptr,
     {},
     "arch_bad_preset.yaml:3: dram.preset: must be one of ddr4-3200, lpddr5-6400, hbm2e, ideal"},
    {"BadActivation",
     Kind::kModel,
     "model_bad_activation.yaml",
     nullptr,
     {},
     "model_bad_activation.yaml:3: ffn.activation: must be one of relu, gelu, silu, relu2"},
    {"BadBusWidth",
     Kind::kArch,
     "arch_bad_bus_width.yaml",
     nullptr,
     {},
     "arch_bad_bus_width.yaml:3: dram.bus_width_bits: must be one of 16, 32, 64, 128; got 48"},
    {"BadKvBits",
     Kind::kModel,
     "model_bad_bits.yaml",
     nullptr,
     {},
     "model_bad_bits.yaml:3: precision.kv_bits: must be one of 8, 16; got 4"},
    {"BoolAsNumber",
     Kind::kArch,
     "arch_bool_as_number.yaml",
     nullptr,
     {},
     "arch_bool_as_number.yaml:3: array.zero_gating: must be true or false, got 1"},
    {"AddressMapRepeat",
     Kind::kArch,
     "arch_address_map_repeat.yaml",
     nullptr,
     {},
     "arch_address_map_repeat.yaml:3: dram.address_map: must list each of row, bank, "
     "bank_group, column, channel exactly once; 'row' appears 2 times"},
    {"AddressMapMissing",
     Kind::kArch,
     "arch_address_map_missing.yaml",
     nullptr,
     {},
     "dram.address_map: must list each of row, bank, bank_group, column, channel exactly once; "
     "'channel' appears 0 times"},
    {"AddressMapUnknownField",
     Kind::kArch,
     "arch_address_map_unknown.yaml",
     nullptr,
     {},
     "arch_address_map_unknown.yaml:3: dram.address_map: entry 3 must be one of"},
    // JESD79-4 timing definitions: tRC = tRAS + tRP, tRAS >= tRCD, tREFI > tRFC.
    {"TrcBelowTrasPlusTrp",
     Kind::kArch,
     "arch_trc_too_small.yaml",
     nullptr,
     {},
     "arch_trc_too_small.yaml:5: dram.timing.tRC: tRC (60) must be at least tRAS + tRP (74)"},
    {"TrasBelowTrcd",
     Kind::kArch,
     "arch_tras_below_trcd.yaml",
     nullptr,
     {},
     "arch_tras_below_trcd.yaml:5: dram.timing.tRAS: tRAS (20) must be at least tRCD (22)"},
    {"TrefiNotAboveTrfc",
     Kind::kArch,
     "arch_trefi_not_above_trfc.yaml",
     nullptr,
     {},
     "arch_trefi_not_above_trfc.yaml:5: dram.timing.tREFI: tREFI (560) must be at least twice "
     "tRFC"},
    {"BadBurstLength",
     Kind::kArch,
     "arch_bad_burst_length.yaml",
     nullptr,
     {},
     "arch_bad_burst_length.yaml:4: dram.timing.burst_length: must be one of 2, 4, 8, 16, 32"},
    {"RowSmallerThanBurst",
     Kind::kArch,
     "arch_row_smaller_than_burst.yaml",
     nullptr,
     {},
     "arch_row_smaller_than_burst.yaml:4: dram.row_bytes: row_bytes (32) must be at least one "
     "burst"},
    {"DuplicateKey",
     Kind::kArch,
     "arch_duplicate_key.yaml",
     nullptr,
     {},
     "arch_duplicate_key.yaml:5: array.trees: duplicate key (first given on line 3)"},
    {"DuplicateSection",
     Kind::kArch,
     "arch_duplicate_section.yaml",
     nullptr,
     {},
     "arch_duplicate_section.yaml:6: array: duplicate key (first given on line 2)"},
    {"SectionNotAMap",
     Kind::kArch,
     "arch_section_not_map.yaml",
     nullptr,
     {},
     "arch_section_not_map.yaml:2: sram: must be a map of keys, got 2048"},
    {"NegativeEnergy",
     Kind::kArch,
     "arch_energy_negative.yaml",
     nullptr,
     {},
     "arch_energy_negative.yaml:4: energy.overrides.int8_add: must be a number in [0, "},
    {"UnknownEnergyEntry",
     Kind::kArch,
     "arch_energy_unknown_entry.yaml",
     nullptr,
     {},
     "arch_energy_unknown_entry.yaml:5: energy.overrides.int8_ad: unknown entry; did you mean "
     "'int8_add'?"},
    {"OverrideUnknownEnergyEntry",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"energy.overrides.fp16_mul", "0.3"}},
     "--set arch.energy.overrides.fp16_mul: unknown entry; did you mean 'fp16_mult'?"},
    {"KvHeadsNotDividingHeads",
     Kind::kModel,
     "model_kv_heads_not_dividing.yaml",
     nullptr,
     {},
     "model_kv_heads_not_dividing.yaml:5: kv_heads: kv_heads (12) must divide heads (32)"},
    {"EmbeddingTernary",
     Kind::kModel,
     "model_embedding_ternary.yaml",
     nullptr,
     {},
     "model_embedding_ternary.yaml:4: precision.embedding: must be one of int8, int16; got "
     "'ternary'"},
    {"ZeroFractionOne",
     Kind::kModel,
     "model_zero_fraction_one.yaml",
     nullptr,
     {},
     "model_zero_fraction_one.yaml:2: weight_zero_fraction: must be a number in [0, 1), got 1.0"},
    {"HeadsTooWide",
     Kind::kModel,
     "model_heads_too_wide.yaml",
     nullptr,
     {},
     "model_heads_too_wide.yaml:4: head_dim: heads * head_dim (8192) must be at most 4 * width"},
    {"MissingFile",
     Kind::kArch,
     "no_such_file.yaml",
     nullptr,
     {},
     "no_such_file.yaml: cannot open file"},
    {"EmptyFile",
     Kind::kArch,
     "empty.yaml",
     nullptr,
     {},
     "empty.yaml: file is empty; expected a map of keys"},
    {"CommentsOnly",
     Kind::kModel,
     "comments_only.yaml",
     nullptr,
     {},
     "comments_only.yaml: file is empty"},
    {"TopLevelList",
     Kind::kModel,
     "not_a_map.yaml",
     nullptr,
     {},
     "not_a_map.yaml:2: top level must be a map of keys, got a list"},
    {"TopLevelScalar",
     Kind::kArch,
     nullptr,
     "just words\n",
     {},
     "inline.yaml:1: top level must be a map of keys, got just words"},
    {"BinaryGarbage",
     Kind::kArch,
     "binary_garbage.yaml",
     nullptr,
     {},
     "binary_garbage.yaml:1: not a text file"},
    {"SyntaxError",
     Kind::kArch,
     "syntax_error.yaml",
     nullptr,
     {},
     "syntax_error.yaml:5: YAML syntax error: "},
    {"BadIndentation",
     Kind::kArch,
     "bad_indentation.yaml",
     nullptr,
     {},
     "bad_indentation.yaml:4: YAML syntax error: "},
    {"Alias",
     Kind::kArch,
     "alias.yaml",
     nullptr,
     {},
     "alias.yaml:4: YAML aliases ('*name') are not supported"},
    {"TwoDocuments",
     Kind::kModel,
     "two_documents.yaml",
     nullptr,
     {},
     "two_documents.yaml:2: holds more than one YAML document"},
    {"OverrideUnknownKey",
     Kind::kArch,
     "../../../configs/heron-edge-ddr4.yaml",
     nullptr,
     {{"array.fan_inn", "32"}},
     "heron-edge-ddr4.yaml: --set arch.array.fan_inn: unknown key; did you mean "
     "'arch.array.fan_in'?"},
    {"ModelOverrideUnknownKey",
     Kind::kModel,
     nullptr,
     "name: x\n",
     {{"laers", "2"}},
     "inline.yaml: --set model.laers: unknown key; did you mean 'model.layers'?"},
    {"OverrideKeyWithoutSection",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"trees", "32"}},
     "inline.yaml: --set arch.trees: unknown key; did you mean 'arch.array.trees'?"},
    {"OverrideBadValue",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"array.trees", "0"}},
     "inline.yaml: --set arch.array.trees: must be an integer in [1, 65536], got 0"},
    {"OverrideBadValueInsideMap",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"dram.timing", "{tRCD: -1}"}},
     "inline.yaml: --set arch.dram.timing: dram.timing.tRCD: must be a positive integer number of "
     "DRAM "
     "cycles, got -1"},
    {"OverrideUnknownKeyInsideMap",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"dram.timing", "{tRDC: 20}"}},
     "--set arch.dram.timing: dram.timing.tRDC: unknown key; did you mean 'tRCD'?"},
    {"OverrideSyntaxError",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"dram.address_map", "[row"}},
     "inline.yaml: --set arch.dram.address_map: YAML syntax error"},
    {"OverrideEmptyValue",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"array.trees", ""}},
     "inline.yaml: --set arch.array.trees: empty value"},
    {"OverrideMalformedKey",
     Kind::kArch,
     nullptr,
     "name: x\n",
     {{"array..trees", "3"}},
     "--set arch.array..trees: malformed key path"},
    {"OverrideThroughScalar",
     Kind::kArch,
     nullptr,
     "sram: 5\n",
     {{"sram.banks", "4"}},
     "--set arch.sram.banks: cannot set inside 'sram', which is not a map in the file"},
};

INSTANTIATE_TEST_SUITE_P(Table, BadConfig, testing::ValuesIn(kBadCases),
                         [](const testing::TestParamInfo<BadCase>& info) {
                           return std::string(info.param.name);
                         });

TEST(BadConfigGuards, FileOverOneMibIsRefusedUnread) {
  const std::string path = testing::TempDir() + "/tritsim_config_too_large.yaml";
  {
    std::ofstream out(path);
    out << "name: big\n" << std::string((1 << 20) + 16, '#') << "\n";
  }
  ExpectBadInput([&] { LoadArchFile(path); },
                 "tritsim_config_too_large.yaml: file is larger than 1 MiB");
  std::remove(path.c_str());
}

TEST(BadConfigGuards, DeepNestingIsOneLineError) {
  ExpectBadInput([] { LoadArchText(std::string(100000, '['), "deep.yaml"); },
                 "deep.yaml:1: nested too deeply");
}

TEST(BadConfigGuards, TooManyNodesIsRefused) {
  std::string text = "dram:\n  address_map: [";
  for (int i = 0; i < 20000; ++i) text += "row, ";
  text += "row]\n";
  ExpectBadInput([&] { LoadArchText(text, "many.yaml"); },
                 "many.yaml:2: more than 10000 YAML nodes");
}

TEST(BadConfigGuards, DirectoryIsNotAFile) {
  ExpectBadInput([] { LoadModelFile(SourcePath("models")); }, "models: cannot open file");
}

// ------------------------------------------------------------- workload

struct BadWorkload {
  const char* name;
  WorkloadConfig workload;
  const char* fragment;
};

class BadWorkloadFlags : public testing::TestWithParam<BadWorkload> {};

void PrintTo(const BadWorkload& c, std::ostream* os) { *os << c.name; }

TEST_P(BadWorkloadFlags, IsAUsageErrorNamingTheFlag) {
  const BadWorkload& c = GetParam();
  const ModelConfig model = LoadModelFile(SourcePath("models/condor-13b.yaml"));
  const Error e = CaughtError([&] { ValidateWorkload(c.workload, model); });
  EXPECT_EQ(e.code(), ExitCode::kUsage);
  EXPECT_NE(std::string(e.what()).find(c.fragment), std::string::npos) << e.what();
}

const BadWorkload kBadWorkloads[] = {
    {"BatchZero", {0, 1, 0, 0}, "--batch: must be an integer in [1, 4096], got 0"},
    {"BatchTooLarge", {0, 1, 0, 4097}, "--batch: must be an integer in [1, 4096], got 4097"},
    {"NegativePrefill", {-1, 1, 0, 1}, "--prefill: must be an integer in [0, 1048576], got -1"},
    {"DecodeTooLong", {0, 1048577, 0, 1}, "--decode: must be an integer in [0, 1048576]"},
    {"ContextTooLong", {0, 1, 16777217, 1}, "--context: must be an integer in [0, 16777216]"},
    {"NothingToDo", {0, 0, 0, 1}, "--prefill/--decode: nothing to simulate"},
    // About 1.3e10 weights x 2 ops x 4096 x 2^20 tokens ~ 1e23 ops: beyond
    // what 64-bit counters may safely sum.
    {"CountersWouldOverflow", {1048576, 0, 0, 4096}, "beyond the 1e18"},
};

INSTANTIATE_TEST_SUITE_P(Table, BadWorkloadFlags, testing::ValuesIn(kBadWorkloads),
                         [](const testing::TestParamInfo<BadWorkload>& info) {
                           return std::string(info.param.name);
                         });

TEST(Workload, TypicalRunsAreAccepted) {
  const ModelConfig model = LoadModelFile(SourcePath("models/condor-13b.yaml"));
  ValidateWorkload(WorkloadConfig{}, model);
  ValidateWorkload(WorkloadConfig{2048, 256, 4096, 8}, model);
  ValidateWorkload(WorkloadConfig{0, 1, 16777216, 1}, model);
}

}  // namespace
}  // namespace tritsim
