// Energy table and energy model, checked against published per-op energies
// (docs/references.md) and against their own documented pricing rules.
#include "energy/energy_model.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "common/error.h"
#include "config/energy_table.h"
#include "energy/area_model.h"

namespace tritsim {
namespace {

// Events of one GEMM [m x k] x [k x n] on a tree array of fan-in f.
EventCounts GemmEvents(uint64_t m, uint64_t n, uint64_t k, uint64_t f, double zero_fraction) {
  EventCounts ev;
  ev.weight_uses = m * n * k;
  ev.weight_uses_zero = static_cast<uint64_t>(std::llround(zero_fraction * double(ev.weight_uses)));
  ev.accumulator_adds = m * n * (k / f);
  return ev;
}

RunResult RunWithEvents(const EventCounts& ev, uint64_t sim_ps = 0) {
  RunResult run;
  run.events = ev;
  run.sim_ps = sim_ps;
  return run;
}

std::string ErrorMessage(const EnergyConfig& energy, const std::string& preset) {
  try {
    ResolveEnergyTable(energy, preset);
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    return e.what();
  }
  ADD_FAILURE() << "expected tritsim::Error";
  return "";
}

// Fraction of zero trits left by absmean quantization of Gaussian weights:
// erf(1/(2 sqrt(pi))) = 0.31006 (derivation in docs/references.md).
const double kGaussianZeroFraction = std::erf(1.0 / (2.0 * std::sqrt(std::acos(-1.0))));

TEST(EnergyModel, Fp16MultAddOverInt8AddIs71xAt7nm) {
  EnergyTable t = BuiltinEnergyTable("7nm");
  double ratio = (t.pj("fp16_mult") + t.pj("fp16_add")) / t.pj("int8_add");
  // Wang et al. 2023 (arXiv:2310.11453) Table 2: (0.16 + 0.34) / 0.007 = 71.4x.
  EXPECT_NEAR(ratio, 71.4, 0.01 * 71.4);
}

TEST(EnergyModel, Fp16MultAddOverInt8AddIs50xAt45nm) {
  EnergyTable t = BuiltinEnergyTable("45nm");
  double ratio = (t.pj("fp16_mult") + t.pj("fp16_add")) / t.pj("int8_add");
  // Horowitz ISSCC 2014: (0.4 + 1.1) / 0.03 = 50x (M).
  EXPECT_NEAR(ratio, 50.0, 0.01 * 50.0);
}

TEST(EnergyModel, Int32MultOverInt8AddAt45nmMatchesHorowitz) {
  EnergyTable t = BuiltinEnergyTable("45nm");
  // Horowitz ISSCC 2014: int32 mult 3.1 pJ, int8 add 0.03 pJ (M).
  EXPECT_NEAR(t.pj("int32_mult") / t.pj("int8_add"), 3.1 / 0.03, 1e-9);
}

TEST(EnergyModel, ZeroGatingSavesTheZeroFractionOfTheInputAdders) {
  ArchConfig arch;
  arch.array.kind = ArrayKind::kTernary;
  const uint64_t m = 4, n = 512, k = 1024, f = 64;
  RunResult run = RunWithEvents(GemmEvents(m, n, k, f, kGaussianZeroFraction));
  RunResult no_zeros = run;
  no_zeros.events.weight_uses_zero = 0;
  EnergyTable t = BuiltinEnergyTable("7nm");

  arch.array.zero_gating = true;
  double gated = ComputeEnergy(arch, run).arithmetic_joules;
  arch.array.zero_gating = false;
  double ungated = ComputeEnergy(arch, run).arithmetic_joules;
  double ungated_no_zeros = ComputeEnergy(arch, no_zeros).arithmetic_joules;

  // The gateable energy is one int8 add per weight use (Wang et al. 2023:
  // a ternary GEMM does one int8 add per weight); gating saves the zero
  // fraction of it, erf(1/(2 sqrt(pi))) for Gaussian weights (docs/references.md).
  double gateable = double(run.events.weight_uses) * t.pj("int8_add") * 1e-12;
  EXPECT_NEAR((ungated - gated) / gateable, kGaussianZeroFraction, 1e-6);
  // Without gating the zeros cost exactly what non-zeros do.
  EXPECT_DOUBLE_EQ(ungated, ungated_no_zeros);
}

TEST(EnergyModel, ZeroGatingDoesNotApplyToTheInt8Baseline) {
  ArchConfig arch;
  arch.array.kind = ArrayKind::kInt8Mac;
  RunResult run = RunWithEvents(GemmEvents(1, 256, 256, 64, kGaussianZeroFraction));
  arch.array.zero_gating = true;
  double gated = ComputeEnergy(arch, run).arithmetic_joules;
  arch.array.zero_gating = false;
  EXPECT_DOUBLE_EQ(gated, ComputeEnergy(arch, run).arithmetic_joules);
}

TEST(EnergyModel, TernaryArrayBeatsFp16BaselineByAbout71xOnProducts) {
  // On products alone (no accumulators) the FP16 array pays fp16 mult + add
  // where the ungated ternary array pays one int8 add: 71.4x at 7 nm
  // (Wang et al. 2023, Table 2).
  RunResult run = RunWithEvents(GemmEvents(1, 256, 256, 64, 0.0));
  run.events.accumulator_adds = 0;
  ArchConfig ternary;
  ternary.array.zero_gating = false;
  ArchConfig fp16 = ternary;
  fp16.array.kind = ArrayKind::kFp16Mac;
  double ratio =
      ComputeEnergy(fp16, run).arithmetic_joules / ComputeEnergy(ternary, run).arithmetic_joules;
  EXPECT_NEAR(ratio, 71.4, 0.01 * 71.4);
}

TEST(EnergyModel, ComponentsSumToTotal) {
  ArchConfig arch;
  EventCounts ev = GemmEvents(8, 256, 512, 64, 0.3);
  ev.decoder_bytes = 1000;
  ev.vector_macs = 5000;
  ev.vector_special = 300;
  ev.vector_elementwise = 700;
  ev.sram_reads = 4000;
  ev.sram_writes = 1000;
  ev.dram_bytes_read = 1 << 20;
  ev.dram_bytes_written = 1 << 12;
  ev.dram_activates = 128;
  ev.dram_refreshes = 2;
  EnergyBreakdown e = ComputeEnergy(arch, RunWithEvents(ev, 1000000));
  for (double part :
       {e.arithmetic_joules, e.sram_joules, e.dram_joules, e.decoder_joules, e.leakage_joules}) {
    EXPECT_GT(part, 0.0);
  }
  EXPECT_EQ(e.total_joules(), e.arithmetic_joules + e.sram_joules + e.dram_joules +
                                  e.decoder_joules + e.leakage_joules);
  EXPECT_DOUBLE_EQ(e.arithmetic_joules, e.array_joules + e.vector_joules);
}

TEST(EnergyModel, DecoderCostsNothingWithTwoBitPacking) {
  ArchConfig arch;
  arch.packing.format = TritPacking::kTwoBit;
  EventCounts ev;
  ev.decoder_bytes = 1000;
  EXPECT_EQ(ComputeEnergy(arch, RunWithEvents(ev)).decoder_joules, 0.0);
}

// A pure streaming run: only DRAM events.
EventCounts StreamingEvents() {
  EventCounts ev;
  ev.dram_bytes_read = uint64_t{1} << 30;
  ev.dram_bytes_written = uint64_t{1} << 20;
  ev.dram_activates = (ev.dram_bytes_read + ev.dram_bytes_written) / 8192;  // one per 8 KiB row
  ev.dram_refreshes = 5000;
  return ev;
}

TEST(EnergyModel, HbmStreamingEnergyIsBitsTimesPjPerBitPlusCommands) {
  ArchConfig arch;
  arch.dram.preset = "hbm2e";
  EventCounts ev = StreamingEvents();
  EnergyTable t = ResolveEnergyTable(arch.energy, arch.dram.preset);
  EnergyBreakdown e = ComputeEnergy(arch, RunWithEvents(ev));
  double bits = 8.0 * double(ev.dram_bytes_read + ev.dram_bytes_written);
  // HBM2 3.97 pJ/bit, O'Connor et al. MICRO 2017 (M).
  double expected_pj = bits * 3.97 + double(ev.dram_activates) * t.pj("dram_activate_pj") +
                       double(ev.dram_refreshes) * t.pj("dram_refresh_pj");
  EXPECT_NEAR(e.dram_joules, expected_pj * 1e-12, 1e-9 * e.dram_joules);
  EXPECT_NEAR(e.dram_transfer_joules, bits * 3.97 * 1e-12, 1e-9 * e.dram_transfer_joules);
  EXPECT_EQ(e.arithmetic_joules + e.sram_joules + e.decoder_joules + e.leakage_joules, 0.0);
}

TEST(EnergyModel, DdrAndLpddrPerBitInPublishedRanges) {
  EnergyConfig energy;
  // DDR4 about 15 - 20 pJ/bit, LPDDR4/5 about 4 - 8 pJ/bit (docs/references.md, L).
  double ddr4 = ResolveEnergyTable(energy, "ddr4-3200").pj("dram_pj_per_bit");
  double lpddr5 = ResolveEnergyTable(energy, "lpddr5-6400").pj("dram_pj_per_bit");
  EXPECT_GE(ddr4, 15.0);
  EXPECT_LE(ddr4, 20.0);
  EXPECT_GE(lpddr5, 4.0);
  EXPECT_LE(lpddr5, 8.0);
}

TEST(EnergyModel, RandomDramAccessWithinHorowitzRange) {
  // One activate plus one 64-bit transfer: Horowitz ISSCC 2014 gives
  // 1.3 - 2.6 nJ per 64-bit DRAM access (M).
  EnergyTable t = ResolveEnergyTable(EnergyConfig{}, "ddr4-3200");
  double access_pj = t.pj("dram_activate_pj") + 64.0 * t.pj("dram_pj_per_bit");
  EXPECT_GE(access_pj, 1300.0);
  EXPECT_LE(access_pj, 2600.0);
}

TEST(EnergyModel, ConfigDramPjPerBitWinsOverPresetAndOverride) {
  EnergyConfig energy;
  energy.overrides_pj["dram_pj_per_bit"] = 9.0;
  EXPECT_EQ(ResolveEnergyTable(energy, "ddr4-3200").pj("dram_pj_per_bit"), 9.0);
  energy.dram_pj_per_bit = 2.5;
  EXPECT_EQ(ResolveEnergyTable(energy, "ddr4-3200").pj("dram_pj_per_bit"), 2.5);
}

TEST(EnergyModel, OverrideReplacesEntry) {
  EnergyConfig energy;
  energy.overrides_pj["int8_add"] = 0.011;
  EXPECT_EQ(ResolveEnergyTable(energy, "ddr4-3200").pj("int8_add"), 0.011);
}

TEST(EnergyModel, SramAccessReproducesHorowitzPoints) {
  EnergyTable t = BuiltinEnergyTable("45nm");
  // Horowitz ISSCC 2014, 64-bit access: 8 KB 10 pJ, 32 KB 20 pJ, 1 MB 100 pJ (M).
  EXPECT_NEAR(SramAccessPj(t, 8 * 1024.0, 8.0), 10.0, 1e-9);
  EXPECT_NEAR(SramAccessPj(t, 32 * 1024.0, 8.0), 20.0, 1e-9);
  EXPECT_NEAR(SramAccessPj(t, 1024 * 1024.0, 8.0), 100.0, 1e-9);
  // Linear in access width: a 64-byte access is eight 64-bit ones.
  EXPECT_NEAR(SramAccessPj(t, 32 * 1024.0, 64.0), 160.0, 1e-9);
}

TEST(EnergyModel, SramAccessIsMonotonicAndLogLogBetweenPoints) {
  EnergyTable t = BuiltinEnergyTable("45nm");
  double previous = 0.0;
  for (double bytes = 1024.0; bytes <= 64.0 * 1024 * 1024; bytes *= 1.25) {
    double pj = SramAccessPj(t, bytes, 8.0);
    EXPECT_GT(pj, previous) << bytes;
    previous = pj;
  }
  // Log-log interpolation puts 16 KiB at the geometric mean of 10 and 20 pJ.
  EXPECT_NEAR(SramAccessPj(t, 16 * 1024.0, 8.0), std::sqrt(10.0 * 20.0), 1e-9);
}

TEST(EnergyModel, SramAccessExtrapolatesWithEndSegmentSlopes) {
  EnergyTable t = BuiltinEnergyTable("45nm");
  // From the Horowitz ISSCC 2014 points (M): 8 KB -> 32 KB doubles the energy
  // over 4x the size (slope 1/2 in log-log), so 4 KiB costs 10 / sqrt(2) pJ;
  // 32 KB -> 1 MB is 5x over 32x (slope ln 5 / ln 32), so 2 MiB costs
  // 100 * 2^(ln 5 / ln 32) pJ.
  EXPECT_NEAR(SramAccessPj(t, 4 * 1024.0, 8.0), 10.0 / std::sqrt(2.0), 1e-9);
  EXPECT_NEAR(SramAccessPj(t, 2048 * 1024.0, 8.0),
              100.0 * std::pow(2.0, std::log(5.0) / std::log(32.0)), 1e-9);
}

TEST(EnergyModel, UnknownOverrideNameListsKnownEntries) {
  EnergyConfig energy;
  energy.overrides_pj["int8_ad"] = 0.01;
  std::string msg = ErrorMessage(energy, "ddr4-3200");
  EXPECT_NE(msg.find("energy.overrides.int8_ad: unknown entry"), std::string::npos) << msg;
  EXPECT_NE(msg.find("did you mean 'int8_add'"), std::string::npos) << msg;
  EXPECT_NE(msg.find("known: "), std::string::npos) << msg;
  EXPECT_NE(msg.find("fp16_mult"), std::string::npos) << msg;
  EXPECT_EQ(msg.find('\n'), std::string::npos) << msg;
}

TEST(EnergyModel, NegativeOverrideIsRejected) {
  EnergyConfig energy;
  energy.overrides_pj["fp16_add"] = -1.0;
  EXPECT_NE(ErrorMessage(energy, "ddr4-3200").find("energy.overrides.fp16_add"), std::string::npos);
}

TEST(EnergyModel, UnknownNodeAndPresetListAllowedValues) {
  EnergyConfig energy;
  energy.node = "5nm";
  EXPECT_NE(ErrorMessage(energy, "ddr4-3200").find("7nm | 45nm"), std::string::npos);
  EXPECT_NE(ErrorMessage(EnergyConfig{}, "ddr5").find("ddr4-3200 | lpddr5-6400 | hbm2e | ideal"),
            std::string::npos);
}

TEST(EnergyModel, LeakageIsPowerDensityTimesAreaTimesTime) {
  ArchConfig arch;
  const uint64_t one_ms_ps = 1000000000;  // 1 ms
  EnergyBreakdown e = ComputeEnergy(arch, RunWithEvents(EventCounts{}, one_ms_ps));
  double mw_per_mm2 = BuiltinEnergyTable(arch.energy.node).pj("leakage_mw_per_mm2");
  double expected = mw_per_mm2 * 1e-3 * EstimateArea(arch).total_mm2() * 1e-3;
  EXPECT_GT(expected, 0.0);
  EXPECT_NEAR(e.leakage_joules, expected, 1e-12 * expected);
}

TEST(EnergyModel, AccumulatorWidthPicksNarrowestAdderThatHolds) {
  EnergyTable t = BuiltinEnergyTable("45nm");
  // Horowitz ISSCC 2014 int adds 0.03 / 0.05 / 0.1 pJ (M).
  EXPECT_EQ(AccumulatorAddPj(t, 8), 0.03);
  EXPECT_EQ(AccumulatorAddPj(t, 12), 0.05);
  EXPECT_EQ(AccumulatorAddPj(t, 24), 0.1);
  EXPECT_EQ(AccumulatorAddPj(t, 64), 0.2);
  EXPECT_THROW(AccumulatorAddPj(t, 4), Error);
}

}  // namespace
}  // namespace tritsim
