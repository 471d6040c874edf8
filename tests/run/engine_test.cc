// End-to-end checks of the cycle-level engine. Every TEST runs one
// simulation, in its own ctest process (SystemC elaborates once per process).
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include <systemc>

#include "common/error.h"
#include "config/config_loader.h"
#include "config/dram_presets.h"
#include "model/trace_builder.h"
#include "run/simulation.h"
#include "run/vector_trace.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

using testing::Gemm;
using testing::VectorTrace;

uint64_t CeilDiv(uint64_t a, uint64_t b) { return (a + b - 1) / b; }

void ExpectStallsSumToTotal(const RunResult& run) {
  EXPECT_EQ(run.stalls.total(), run.cycles) << "stall causes must cover every cycle exactly";
  // And each phase's own split covers exactly that phase's cycles.
  for (const PhaseResult& p : run.phases) {
    EXPECT_EQ(p.stalls.total(), p.cycles) << PhaseName(p.phase);
  }
}

// Roofline (Williams, Waterman, Patterson, CACM 2009): an op cannot beat
// max(ops / peak ops, DRAM bytes / peak bandwidth). 40 random GEMM shapes
// per design point, five design points (five tests) = 200 shapes.
// `streaming_only`: every GEMM decode-like, so that no compute-bound op
// ahead of a streaming one holds its prefetched tiles back (an op's cycles
// run from its first load to its retirement, docs/engine.md).
RunResult RunRandomGemms(const ArchConfig& arch, unsigned seed, bool streaming_only = false) {
  std::mt19937 rng(seed);
  std::uniform_int_distribution<int> m_dist(0, 8), dim_dist(6, 13);
  std::vector<TraceOp> ops;
  for (int i = 0; i < 40; ++i) {
    const bool streaming = streaming_only || i % 8 == 0;  // decode-like: one row, big weights
    const int64_t m = streaming ? 1 : int64_t(1) << m_dist(rng);
    const int64_t n =
        (int64_t(1) << (streaming ? 13 : dim_dist(rng))) + 7 * i;  // not always tile multiples
    const int64_t k = (int64_t(1) << (streaming ? 12 : dim_dist(rng))) + 3 * i;
    TraceOp op = Gemm("gemm" + std::to_string(i), m, n, k);
    op.layer = i;
    ops.push_back(op);
  }
  VectorTrace trace = VectorTrace::OneStep(ops);
  return RunSimulation(arch, trace, SimOptions{});
}

void ExpectNoOpBeatsRoofline(const RunResult& run) {
  ASSERT_EQ(run.layers.size(), 40u);
  for (const OpResult& layer : run.layers) {
    EXPECT_GE(layer.cycles, layer.bound_cycles) << layer.op.name;
    // The bound itself, recomputed here from the design's peaks.
    const double seconds_per_cycle = 1.0 / (run.core_mhz * 1e6);
    const double compute = double(layer.ops) / (run.peak_ops_per_second * seconds_per_cycle);
    const double memory =
        double(layer.dram_bytes) / (run.dram_peak_bytes_per_second * seconds_per_cycle);
    EXPECT_GE(double(layer.cycles) + 1.0, std::max(compute, memory)) << layer.op.name;
  }
  ExpectStallsSumToTotal(run);
}

TEST(EngineRoofline, RandomGemmsOnDefaultDdr4DesignNeverBeatTheBound) {
  ExpectNoOpBeatsRoofline(RunRandomGemms(DefaultArch(), 1));
}

TEST(EngineRoofline, RandomGemmsOnSmallSramTwoBitDesignNeverBeatTheBound) {
  ExpectNoOpBeatsRoofline(RunRandomGemms(
      DefaultArch({{"sram.capacity_kib", "256"}, {"packing.format", "two_bit"}}), 2));
}

TEST(EngineRoofline, RandomGemmsOnWideArrayHbmDesignNeverBeatTheBound) {
  ExpectNoOpBeatsRoofline(RunRandomGemms(DefaultArch({{"array.trees", "256"},
                                                      {"array.fan_in", "128"},
                                                      {"dram.preset", "hbm2e"},
                                                      {"dram.channels", "8"},
                                                      {"sram.capacity_kib", "8192"}}),
                                         3));
}

TEST(EngineRoofline, RandomGemmsOnLpddr5DesignNeverBeatTheBound) {
  ExpectNoOpBeatsRoofline(RunRandomGemms(DefaultArch({{"dram.preset", "lpddr5-6400"},
                                                      {"dram.channels", "4"},
                                                      {"clock.core_mhz", "800"},
                                                      {"array.trees", "32"}}),
                                         4));
}

TEST(EngineRoofline, RandomGemmsOnIdealMemoryBeatNothingAndLargeStreamsComeClose) {
  const RunResult run = RunRandomGemms(
      DefaultArch({{"dram.preset", "ideal"}, {"dram.ideal_bandwidth_gbps", "25.6"}}), 5, true);
  ExpectNoOpBeatsRoofline(run);
  // Large streaming ops (memory-bound, at least 4 MiB of weights) come within
  // 15% of the bound on ideal memory (the margin the engine issue sets).
  int large = 0;
  for (const OpResult& layer : run.layers) {
    if (layer.regime != Regime::kMemory || layer.dram_bytes < (4u << 20)) continue;
    ++large;
    EXPECT_LE(double(layer.cycles), 1.15 * double(layer.bound_cycles)) << layer.op.name;
  }
  EXPECT_GE(large, 3) << "the random shapes should include several large streaming GEMMs";
}

// Compute-bound exactness: with weights already in the scratchpad, a GEMM
// takes ceil(N/T) * ceil(K/F) weight passes of max(M, weight fetch) cycles
// each, plus the adder pipeline (ceil(log2 F) levels + register cut) once.
TEST(EngineExactness, OnChipGemmTakesTheClosedFormCycleCount) {
  const ArchConfig arch = DefaultArch();
  const uint64_t T = uint64_t(arch.array.trees), F = uint64_t(arch.array.fan_in);
  const uint64_t M = 96, N = 1000, K = 3000;
  const uint64_t depth =
      uint64_t(std::ceil(std::log2(double(F)))) + uint64_t(arch.array.register_cut);
  // Base-3 decoder: F*T trits = F*T/5 bytes per pass, decoder_bytes_per_cycle
  // per cycle; with M = 96 rows the rows, not the decoder, set the pass time.
  const uint64_t decode_cycles =
      CeilDiv(CeilDiv(F * T, 5), uint64_t(arch.packing.decoder_bytes_per_cycle));
  ASSERT_LT(decode_cycles, M);
  const uint64_t expected = CeilDiv(N, T) * CeilDiv(K, F) * M + depth;

  SimOptions options;
  options.weights_resident = true;
  VectorTrace trace = VectorTrace::OneStep({Gemm("gemm", int64_t(M), int64_t(N), int64_t(K))});
  const RunResult run = RunSimulation(arch, trace, options);
  ASSERT_EQ(run.layers.size(), 1u);
  EXPECT_EQ(run.layers[0].cycles, expected);
  EXPECT_EQ(run.cycles, expected);
  EXPECT_EQ(run.stalls.busy, expected);
  EXPECT_EQ(run.events.weight_uses, M * N * K);
  ExpectStallsSumToTotal(run);
}

// JESD79-4 (docs/references.md): a 64-bit DDR4-3200 channel peaks at 25.6 GB/s.
// A weight stream through the whole engine (DMA, scratchpad slots, DRAM
// scheduler) stays under it and sustains at least 85% of it; refresh takes
// tRFC/tREFI = 350 ns / 7.8 us = 4.5% of the time, within 0.5 points.
TEST(EngineDram, Ddr4WeightStreamStaysUnderPeakAndSustainsIt) {
  const ArchConfig arch = DefaultArch();
  VectorTrace trace = VectorTrace::OneStep({Gemm("stream", 1, 16384, 16384)});
  const RunResult run = RunSimulation(arch, trace, SimOptions{});
  const double seconds = double(run.sim_ps) * 1e-12;
  const double bytes = double(run.events.dram_bytes_read);
  const double peak = 25.6e9;
  EXPECT_DOUBLE_EQ(DramPeakBytesPerSecond(arch.dram), peak);
  EXPECT_LE(bytes / seconds, peak);
  EXPECT_GE(bytes / seconds, 0.85 * peak);
  const double refresh = double(run.dram.refresh_ps) / double(run.sim_ps);
  EXPECT_NEAR(refresh, 350.0 / 7800.0, 0.005);
  ExpectStallsSumToTotal(run);
}

// Regimes: batch-1 decode of the 3B-class demo model on the DDR4 design is
// memory-bound in every projection (intensity ~10 op/B, ridge 320 op/B).
TEST(EngineRegimes, BatchOneDecodeOfDemoModelIsMemoryBoundInEveryProjection) {
  const ArchConfig arch = DefaultArch();
  const ModelConfig model = DefaultModel();
  WorkloadConfig workload;
  workload.decode_tokens = 1;
  workload.context_tokens = 128;
  auto trace = BuildTrace(model, workload);
  const RunResult run = RunSimulation(arch, *trace, SimOptions{});
  int projections = 0;
  for (const OpResult& layer : run.layers) {
    if (layer.op.kind != OpKind::kGemm || layer.op.layer < 0) continue;
    ++projections;
    EXPECT_EQ(layer.regime, Regime::kMemory) << layer.op.name << " in layer " << layer.op.layer;
  }
  EXPECT_GE(projections, int(model.layers) * 3);
  ExpectStallsSumToTotal(run);
}

// Raising the batch moves the projections past the ridge point, and the
// achieved rate of each projection follows min(peak, bandwidth x intensity)
// (Williams et al. 2009): never above it, and within a margin below it.
class EngineBatchSweep : public ::testing::TestWithParam<int> {};

TEST_P(EngineBatchSweep, ProjectionsFollowTheRoofline) {
  const int batch = GetParam();
  const ArchConfig arch = DefaultArch();
  const ModelConfig model = DefaultModel({{"layers", "2"}});
  WorkloadConfig workload;
  workload.decode_tokens = 1;
  workload.batch = batch;
  auto trace = BuildTrace(model, workload);
  const RunResult run = RunSimulation(arch, *trace, SimOptions{});
  const double ridge = run.peak_ops_per_second / run.dram_peak_bytes_per_second;
  for (const OpResult& layer : run.layers) {
    if (layer.op.kind != OpKind::kGemm || layer.op.layer < 0) continue;
    const double seconds = double(layer.cycles) / (run.core_mhz * 1e6);
    const double achieved = double(layer.ops) / seconds;
    const double roof =
        std::min(run.peak_ops_per_second, run.dram_peak_bytes_per_second * layer.intensity());
    EXPECT_LE(achieved, roof * 1.0001) << layer.op.name;
    // Margin: refresh (4.5%), row switches, DMA setup and the pipeline fill
    // keep real ops below the roof; 35% covers the small shapes of a 2-layer run.
    EXPECT_GE(achieved, 0.65 * roof) << layer.op.name << " at batch " << batch;
    const Regime expected = layer.intensity() >= ridge ? Regime::kCompute : Regime::kMemory;
    EXPECT_EQ(layer.regime, expected) << layer.op.name;
    if (batch == 1) {
      EXPECT_EQ(layer.regime, Regime::kMemory) << layer.op.name;
    }
    if (batch >= 256) {
      EXPECT_EQ(layer.regime, Regime::kCompute) << layer.op.name;
    }
  }
  ExpectStallsSumToTotal(run);
}

INSTANTIATE_TEST_SUITE_P(Batches, EngineBatchSweep, ::testing::Values(1, 4, 16, 64, 256, 512));

// A trace source that stalls forever on its second record: the issue
// thread blocks on an event nobody notifies, so the simulation runs out of
// events with work left. The watchdog must turn that into exit 4 naming
// what each thread waits for, not a hang or half a result.
class StallingTrace : public TraceSource {
 public:
  const TraceHeader& header() const override { return header_; }
  bool next(TraceRecord& record) override {
    if (calls_++ == 0) {
      record = TraceRecord();
      record.is_step = true;
      return true;
    }
    sc_core::wait(never_);
    return false;
  }

 private:
  TraceHeader header_;
  int calls_ = 0;
  sc_core::sc_event never_;
};

TEST(EngineErrors, WatchdogNamesTheStuckUnitInsteadOfHanging) {
  StallingTrace trace;
  try {
    RunSimulation(DefaultArch(), trace, SimOptions{});
    FAIL() << "expected the watchdog to fire";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kSimFailed);
    const std::string what = e.what();
    EXPECT_NE(what.find("watchdog"), std::string::npos) << what;
    EXPECT_NE(what.find("issue thread: the next trace record"), std::string::npos) << what;
    EXPECT_NE(what.find("compute thread: the next tile"), std::string::npos) << what;
  }
}

TEST(EngineErrors, TileThatCannotFitIsASimulationErrorNamingTheOp) {
  const ArchConfig arch =
      DefaultArch({{"sram.capacity_kib", "16"}, {"array.trees", "512"}, {"array.fan_in", "512"}});
  VectorTrace trace = VectorTrace::OneStep({Gemm("ffn.big", 1, 4096, 4096)});
  try {
    RunSimulation(arch, trace, SimOptions{});
    FAIL() << "expected a tile-does-not-fit error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kSimFailed);
    EXPECT_NE(std::string(e.what()).find("ffn.big"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("KiB"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace tritsim
