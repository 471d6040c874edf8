// The run reports: the JSON document's keys and totals, the per-layer CSV's
// shape and the console summary's headline numbers. A hand-made run (invented
// numbers) for the writers' format; one simulated prefill + decode run (its
// own ctest process: SystemC elaborates once) for totals over phases.
#include "report/run_report.h"

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <cstdint>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "config/config_loader.h"
#include "config/energy_table.h"
#include "energy/area_model.h"
#include "energy/energy_model.h"
#include "mapping/resource_bounds.h"
#include "model/trace_builder.h"
#include "run/simulation.h"

namespace tritsim {
namespace {

using nlohmann::ordered_json;

constexpr double kMhz = 1000.0;
constexpr uint64_t kCycles = 2000000;  // 2 ms at 1 GHz
constexpr uint64_t kTokens = 4;

OpResult Layer(const std::string& name, OpKind kind, uint64_t cycles) {
  OpResult r;
  r.op.name = name;
  r.op.kind = kind;
  r.op.layer = 0;
  r.cycles = cycles;
  r.ops = 1000;
  r.dram_bytes = 500;
  r.bound_cycles = cycles / 2;
  return r;
}

// Invented figures of a small run; stalls and phases add up to kCycles.
RunResult HandMadeRun() {
  RunResult run;
  run.arch_name = "demo-arch";
  run.model_name = "demo-model";
  run.core_mhz = kMhz;
  run.cycles = kCycles;
  run.sim_ps = kCycles * 1000;
  run.tokens = kTokens;
  run.ops = 3000;
  run.first_token_cycles = 1500000;
  run.phases = {{Phase::kPrefill, 1500000, 16}, {Phase::kDecode, 500000, kTokens}};
  run.stalls = {800000, 900000, 10000, 240000, 50000};
  run.layers = {Layer("attn.norm", OpKind::kNorm, 1000), Layer("attn.qkv", OpKind::kGemm, 90000),
                Layer("ffn.down", OpKind::kGemm, 120000)};
  run.peak_ops_per_second = 8.192e12;
  run.dram_peak_bytes_per_second = 25.6e9;
  return run;
}

// Invented component energies, J: arithmetic, SRAM, DRAM, decoder, leakage.
EnergyBreakdown HandMadeEnergy() { return EnergyBreakdown{3e-6, 6e-6, 8e-3, 2e-7, 5e-5}; }

// Owns everything a RunReport refers to.
class ReportTest : public ::testing::Test {
 protected:
  ReportTest()
      : run_(HandMadeRun()),
        energy_(HandMadeEnergy()),
        area_(EstimateArea(arch_)),
        table_(ResolveEnergyTable(arch_.energy, arch_.dram.preset)) {
    workload_.prefill_tokens = 16;
    workload_.decode_tokens = int64_t(kTokens);
  }
  RunReport Report() const { return {arch_, workload_, run_, energy_, area_, table_}; }
  ordered_json Json() const { return RunJson(Report()); }
  std::string Csv() const { return RunCsv(Report()); }
  std::string Summary() const {
    std::ostringstream out;
    PrintRunSummary(Report(), out);
    return out.str();
  }

  ArchConfig arch_;
  WorkloadConfig workload_;
  RunResult run_;
  EnergyBreakdown energy_;
  AreaBreakdown area_;
  EnergyTable table_;
};

std::vector<std::string> Lines(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);) lines.push_back(line);
  return lines;
}

size_t Fields(const std::string& csv_line) {
  return size_t(std::count(csv_line.begin(), csv_line.end(), ',')) + 1;
}

double SumOf(const ordered_json& object, const std::vector<std::string>& keys) {
  double sum = 0;
  for (const std::string& key : keys) sum += object.at(key).get<double>();
  return sum;
}

// ---- JSON ----

TEST_F(ReportTest, JsonHasTheSchemaAndEverySectionInOrder) {
  const ordered_json j = Json();
  EXPECT_EQ(j.at("schema"), "tritsim.run/1");
  std::vector<std::string> keys;
  for (auto it = j.begin(); it != j.end(); ++it) keys.push_back(it.key());
  const std::vector<std::string> expected = {
      "schema", "design", "workload", "totals", "phases", "stalls", "utilization",
      "dram",   "energy", "area",     "arch",   "events", "layers"};
  EXPECT_EQ(keys, expected);
}

TEST_F(ReportTest, JsonTotalEnergyIsTheSumOfItsComponents) {
  const ordered_json j = Json();
  const double parts = SumOf(j.at("energy"), {"arithmetic", "sram", "dram", "decoder", "leakage"});
  EXPECT_DOUBLE_EQ(j.at("totals").at("energy_joules").get<double>(), parts);
  EXPECT_DOUBLE_EQ(parts, 3e-6 + 6e-6 + 8e-3 + 2e-7 + 5e-5);  // the invented components
}

TEST_F(ReportTest, JsonTotalAreaIsTheSumOfItsParts) {
  const ordered_json j = Json();
  const ordered_json& area = j.at("area");
  const double parts =
      SumOf(area, {"array_mm2", "vector_mm2", "sram_mm2", "decoder_mm2", "other_mm2"});
  EXPECT_DOUBLE_EQ(area.at("total_mm2").get<double>(), parts);
  EXPECT_DOUBLE_EQ(j.at("totals").at("area_mm2").get<double>(), parts);
}

// 4 tokens in 2 ms = 2000 tokens/s; the decode phase (0.5 ms) over 4 output
// tokens = 125 us per token; the first token after 1.5 ms.
TEST_F(ReportTest, JsonTotalsDeriveRatesFromCyclesAndTokens) {
  const ordered_json totals = Json().at("totals");
  EXPECT_EQ(totals.at("cycles"), kCycles);
  EXPECT_DOUBLE_EQ(totals.at("seconds").get<double>(), 2e-3);
  EXPECT_DOUBLE_EQ(totals.at("tokens_per_second").get<double>(), 2000.0);
  EXPECT_DOUBLE_EQ(totals.at("time_per_output_token_seconds").get<double>(), 125e-6);
  EXPECT_DOUBLE_EQ(totals.at("time_to_first_token_seconds").get<double>(), 1.5e-3);
}

TEST_F(ReportTest, JsonStallsAreTheFiveCausesOfTheRun) {
  const ordered_json stalls = Json().at("stalls");
  EXPECT_EQ(stalls.size(), 5u);
  EXPECT_DOUBLE_EQ(SumOf(stalls, {"busy", "dram_wait", "sram_conflict", "vector_wait", "idle"}),
                   double(kCycles));
}

TEST_F(ReportTest, JsonHasOneLayerEntryPerOpInOrder) {
  const ordered_json layers = Json().at("layers");
  ASSERT_EQ(layers.size(), run_.layers.size());
  for (size_t i = 0; i < layers.size(); ++i) {
    EXPECT_EQ(layers[i].at("name"), run_.layers[i].op.name);
    EXPECT_EQ(layers[i].at("cycles"), run_.layers[i].cycles);
    EXPECT_DOUBLE_EQ(layers[i].at("roofline_efficiency").get<double>(), 0.5)
        << "bound / cycles of the invented layers";
  }
}

// ---- CSV ----

TEST_F(ReportTest, CsvHasOneRowPerOpWithTheHeadersFieldCount) {
  const std::vector<std::string> lines = Lines(Csv());
  ASSERT_EQ(lines.size(), 1 + run_.layers.size());
  EXPECT_EQ(lines[0].rfind("phase,layer,name,", 0), 0u) << lines[0];
  const size_t fields = Fields(lines[0]);
  EXPECT_EQ(fields, 19u);  // 18 figures, then bound_by
  for (size_t i = 1; i < lines.size(); ++i) {
    EXPECT_EQ(Fields(lines[i]), fields) << lines[i];
    EXPECT_NE(lines[i].find(run_.layers[i - 1].op.name), std::string::npos) << lines[i];
  }
}

// ---- console ----

TEST_F(ReportTest, ConsoleSummaryShowsTheHeadlineNumbers) {
  const std::string text = Summary();
  for (const std::string expected :
       {"demo-model on demo-arch", "2000000 cycles = 2.000 ms", "2000.00 tokens/s",
        "first token     1.500 ms", "per output tok  125.000 us",
        "8.059 mJ total"}) {  // 3e-6 + 6e-6 + 8e-3 + 2e-7 + 5e-5 J = 8.0592 mJ
    EXPECT_NE(text.find(expected), std::string::npos) << "missing '" << expected << "' in\n"
                                                      << text;
  }
}

// ---- a simulated run ----

ModelConfig TinyModel() {
  return DefaultModel({{"layers", "1"},
                       {"width", "256"},
                       {"heads", "4"},
                       {"kv_heads", "4"},
                       {"head_dim", "64"},
                       {"ffn.width", "512"},
                       {"vocab", "1000"}});
}

// Sequencer::Collect reports a prefill and a decode phase; their cycles add
// up to the total, as do the stall causes, and the CSV has a row per op.
TEST(RunReportOfASimulation, TotalsAddUpOverPhasesAndStalls) {
  const ArchConfig arch = DefaultArch();
  WorkloadConfig workload;
  workload.prefill_tokens = 8;
  workload.decode_tokens = 2;
  workload.batch = 2;
  auto trace = BuildTrace(TinyModel(), workload);
  const RunResult run = RunSimulation(arch, *trace, SimOptions{});
  const EnergyBreakdown energy = ComputeEnergy(arch, run);
  const AreaBreakdown area = EstimateArea(arch);
  const EnergyTable table = ResolveEnergyTable(arch.energy, arch.dram.preset);
  const RunReport report{arch, workload, run, energy, area, table};
  const ordered_json j = RunJson(report);

  const ordered_json& phases = j.at("phases");
  ASSERT_EQ(phases.size(), 2u);
  EXPECT_EQ(phases[0].at("name"), "prefill");
  EXPECT_EQ(phases[1].at("name"), "decode");
  EXPECT_EQ(phases[0].at("tokens"), 16u) << "8 prompt tokens x batch 2";
  EXPECT_EQ(phases[1].at("tokens"), 4u) << "2 decode tokens x batch 2";
  EXPECT_EQ(j.at("totals").at("tokens"), 4u) << "generated tokens";
  const uint64_t total = j.at("totals").at("cycles");
  EXPECT_EQ(phases[0].at("cycles").get<uint64_t>() + phases[1].at("cycles").get<uint64_t>(), total);
  EXPECT_DOUBLE_EQ(
      SumOf(j.at("stalls"), {"busy", "dram_wait", "sram_conflict", "vector_wait", "idle"}),
      double(total));
  EXPECT_EQ(j.at("layers").size(), run.layers.size());
  EXPECT_EQ(Lines(RunCsv(report)).size(), 1 + run.layers.size());
  // Per-phase energy is a partition of the run's (docs/report-format.md):
  // the phases' joules add up to the total, and watts = joules / seconds.
  const double joules = phases[0].at("joules").get<double>() + phases[1].at("joules").get<double>();
  EXPECT_NEAR(joules, j.at("totals").at("energy_joules").get<double>(), 1e-12);
  for (const auto& p : phases) {
    EXPECT_NEAR(p.at("watts").get<double>(),
                p.at("joules").get<double>() / p.at("seconds").get<double>(), 1e-9);
    EXPECT_GE(p.at("cycles").get<uint64_t>(), p.at("bound_cycles").get<uint64_t>())
        << "a phase never beats its binding resource";
    // Each phase's stall causes cover exactly its cycles, and its energy
    // components add up to its joules.
    const std::vector<std::string> causes = {"busy", "dram_wait", "sram_conflict", "vector_wait",
                                             "idle"};
    EXPECT_DOUBLE_EQ(SumOf(p.at("stalls"), causes), p.at("cycles").get<double>());
    EXPECT_NEAR(SumOf(p.at("energy"), {"arithmetic", "sram", "dram", "decoder", "leakage"}),
                p.at("joules").get<double>(), 1e-15);
  }
  // Phase by phase, each stall cause and energy component adds up to the run's.
  for (const char* cause : {"busy", "dram_wait", "sram_conflict", "vector_wait", "idle"}) {
    EXPECT_EQ(phases[0].at("stalls").at(cause).get<uint64_t>() +
                  phases[1].at("stalls").at(cause).get<uint64_t>(),
              j.at("stalls").at(cause).get<uint64_t>())
        << cause;
  }
  for (const char* part : {"arithmetic", "sram", "dram", "decoder", "leakage"}) {
    EXPECT_NEAR(phases[0].at("energy").at(part).get<double>() +
                    phases[1].at("energy").at(part).get<double>(),
                j.at("energy").at(part).get<double>(), 1e-15)
        << part;
  }
}

// The binding resource's name is one of the six the reports promise, and no
// op beats the ceiling of any resource (every resource is a ceiling).
TEST(RunReportOfASimulation, EveryOpNamesItsBindingResourceAndBeatsNoCeiling) {
  const ArchConfig arch = DefaultArch();
  WorkloadConfig workload;
  workload.prefill_tokens = 16;
  workload.decode_tokens = 2;
  auto trace = BuildTrace(TinyModel(), workload);
  const RunResult run = RunSimulation(arch, *trace, SimOptions{});
  const std::set<std::string> names = {"dram_bandwidth", "request_concurrency", "trit_decoder",
                                       "tree_array",     "vector_unit",         "sram_ports"};
  const ResourceRates rates = RatesOf(arch);
  for (const OpResult& layer : run.layers) {
    EXPECT_EQ(names.count(ResourceName(layer.bound_by)), 1u) << layer.op.name;
    const ResourceBounds bounds = BoundsOf(layer.demand, rates);
    for (double cycles : bounds.cycles) EXPECT_GE(double(layer.cycles) + 1.0, cycles);
    EXPECT_EQ(layer.regime, RegimeOf(layer.bound_by));
  }
}

}  // namespace
}  // namespace tritsim
