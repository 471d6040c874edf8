// Run plots: gnuplot output is well-formed SVG (checked with xmllint), the
// roofline data has one row per op class, and failures leave no partial SVG.
#include "report/plots.h"

#include <gtest/gtest.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <string>
#include <tuple>

#include "common/error.h"
#include "report/plot_style.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

OpResult Layer(OpKind kind, TensorClass tensor, uint64_t ops, uint64_t dram_bytes,
               uint64_t cycles) {
  OpResult r;
  r.op.kind = kind;
  r.op.tensor = tensor;
  r.ops = ops;
  r.dram_bytes = dram_bytes;
  r.cycles = cycles;
  return r;
}

// A small hand-made run: 1 GHz core, a 64 x 64 tree array (2 ops per
// weight use: 8.192e12 ops/s) and one DDR4-3200 channel (25.6 GB/s, JESD79-4).
RunResult SmallRun() {
  RunResult run;
  run.arch_name = "heron-test";
  run.model_name = "tiny";
  run.core_mhz = 1000.0;
  run.peak_ops_per_second = 2.0 * 64 * 64 * 1e9;
  run.dram_peak_bytes_per_second = 25.6e9;
  run.layers = {
      Layer(OpKind::kNorm, TensorClass::kNorm, 4096, 8192, 100),
      Layer(OpKind::kGemm, TensorClass::kAttention, 2 * 2048 * 2048, 1 << 20, 50000),
      Layer(OpKind::kAttnScores, TensorClass::kNone, 2 * 16 * 128 * 512, 65536, 4000),
      Layer(OpKind::kSoftmax, TensorClass::kNone, 16 * 512, 0, 600),  // all on chip
      Layer(OpKind::kGemm, TensorClass::kAttention, 2 * 2048 * 2048, 1 << 20, 50000),
      Layer(OpKind::kGemm, TensorClass::kFfn, 2 * 2048 * 5632, 3 << 20, 140000),
      Layer(OpKind::kGemm, TensorClass::kHead, 2 * 2048 * 32000, 64 << 20, 2700000),
  };
  run.stalls = {600000, 2200000, 10000, 40000, 50000};
  run.cycles = run.stalls.total();
  run.sim_ps = run.cycles * 1000;
  run.tokens = 4;
  run.phases = {{Phase::kPrefill, 1500000, 16}, {Phase::kDecode, 1400000, 4}};
  run.phases[0].stalls = {400000, 1000000, 10000, 40000, 50000};
  run.phases[1].stalls = {200000, 1200000, 0, 0, 0};
  return run;
}

EnergyBreakdown SmallEnergy() {
  EnergyBreakdown e;
  e.arithmetic_joules = 2e-6;
  e.sram_joules = 5e-6;
  e.dram_joules = 9e-3;
  e.decoder_joules = 1e-7;
  e.leakage_joules = 4e-5;
  return e;
}

bool HaveTool(const std::string& tool) {
  return std::system(("command -v " + tool + " >/dev/null 2>&1").c_str()) == 0;
}

std::string ReadFile(const fs::path& path) {
  std::ifstream in(path);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

// Data rows of a .dat file: lines that are neither blank nor comments.
std::vector<std::string> DataRows(const fs::path& path) {
  std::vector<std::string> rows;
  std::istringstream in(ReadFile(path));
  for (std::string line; std::getline(in, line);) {
    if (!line.empty() && line[0] != '#') rows.push_back(line);
  }
  return rows;
}

class Plots : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() /
           ("tritsim-plots-" + std::string(info->name()) + "-" + std::to_string(::getpid())) /
           "out";  // a missing parent: WriteRunPlots must create it
    fs::remove_all(dir_.parent_path());
  }
  void TearDown() override { fs::remove_all(dir_.parent_path()); }

  void WritePlots() { WriteRunPlots(dir_.string(), SmallRun(), SmallEnergy()); }
  bool Exists(const std::string& name) const { return fs::exists(dir_ / name); }
  bool AnyTemporaryLeft() const {
    for (const auto& entry : fs::directory_iterator(dir_)) {
      if (entry.path().string().find(".tmp") != std::string::npos) return true;
    }
    return false;
  }

  fs::path dir_;
};

TEST_F(Plots, WritesThreeWellFormedSvgsWithDataAndScripts) {
  if (!HaveTool("xmllint")) GTEST_SKIP() << "xmllint not found (Debian package libxml2-utils)";
  WritePlots();
  for (const std::string name : {"roofline", "stalls", "energy"}) {
    ASSERT_TRUE(Exists(name + ".dat")) << name;
    ASSERT_TRUE(Exists(name + ".gp")) << name;
    ASSERT_TRUE(Exists(name + ".svg")) << name;
    // Well-formed XML (SVG 1.1 is an XML language, W3C).
    const std::string check = "xmllint --noout '" + (dir_ / (name + ".svg")).string() + "'";
    EXPECT_EQ(std::system(check.c_str()), 0) << check;
  }
  EXPECT_FALSE(AnyTemporaryLeft());
}

TEST_F(Plots, RooflineDataHasOneRowPerOpClass) {
  WritePlots();
  std::vector<std::string> rows = DataRows(dir_ / "roofline.dat");
  // The run holds six classes: norm, two attention GEMMs (one class),
  // attn_scores, softmax, the FFN GEMM and the head GEMM.
  const std::set<std::string> expected = {"\"norm\"",    "\"gemm attention\"", "\"attn_scores\"",
                                          "\"softmax\"", "\"gemm ffn\"",       "\"gemm head\""};
  ASSERT_EQ(rows.size(), expected.size());
  std::set<std::string> labels;
  for (const auto& row : rows) labels.insert(row.substr(0, row.find('"', 1) + 1));
  EXPECT_EQ(labels, expected);
}

TEST_F(Plots, OpClassSumsOpsAndBytesOfItsLayers) {
  std::vector<OpClassPoint> classes = GroupOpClasses(SmallRun());
  ASSERT_EQ(classes.size(), 6u);
  const OpClassPoint& attention = classes[1];
  EXPECT_EQ(attention.label, "gemm attention");
  EXPECT_EQ(attention.ops, 2u * 2 * 2048 * 2048);
  EXPECT_EQ(attention.dram_bytes, 2u << 20);
  EXPECT_EQ(attention.cycles, 100000u);
}

TEST_F(Plots, ClassWithoutDramBytesHasNoPoint) {
  WritePlots();
  int softmax_rows = 0;
  for (const auto& row : DataRows(dir_ / "roofline.dat")) {
    if (row.rfind("\"softmax\"", 0) != 0) continue;
    ++softmax_rows;
    EXPECT_NE(row.find("NaN NaN"), std::string::npos) << row;
  }
  EXPECT_EQ(softmax_rows, 1);
}

TEST_F(Plots, ScriptRedrawsFromItsOwnDirectory) {
  WritePlots();
  fs::remove(dir_ / "energy.svg");
  const std::string redraw = "cd '" + dir_.string() + "' && gnuplot energy.gp 2>/dev/null";
  ASSERT_EQ(std::system(redraw.c_str()), 0);
  EXPECT_TRUE(Exists("energy.svg"));
}

TEST_F(Plots, MissingGnuplotIsBadInputAndLeavesNoSvg) {
  const char* old_path = std::getenv("PATH");
  const std::string saved = old_path ? old_path : "";
  ::setenv("PATH", "/nonexistent-tritsim-path", 1);
  try {
    WritePlots();
    ADD_FAILURE() << "expected tritsim::Error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    EXPECT_EQ(std::string(e.what()).rfind("--plots " + dir_.string() + ": gnuplot failed", 0), 0u)
        << e.what();
  }
  ::setenv("PATH", saved.c_str(), 1);
  EXPECT_FALSE(Exists("roofline.svg"));
  EXPECT_FALSE(AnyTemporaryLeft());
}

TEST_F(Plots, DirectoryThatCannotBeMadeIsBadInput) {
  fs::create_directories(dir_.parent_path());
  std::ofstream(dir_.parent_path() / "blocker") << "a file, not a directory";
  const std::string bad = (dir_.parent_path() / "blocker" / "plots").string();
  try {
    WriteRunPlots(bad, SmallRun(), SmallEnergy());
    ADD_FAILURE() << "expected tritsim::Error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    EXPECT_EQ(std::string(e.what()).rfind("--plots " + bad + ": ", 0), 0u) << e.what();
  }
}

// The same class in two phases is two points: the roofline must not merge
// a prefill GEMM (high intensity) with a decode one (low intensity).
TEST_F(Plots, RooflineHasOnePointPerPhaseAndClass) {
  RunResult run = SmallRun();
  OpResult prefill_ffn =
      Layer(OpKind::kGemm, TensorClass::kFfn, 2 * 64 * 2048 * 5632, 3 << 20, 90000);
  prefill_ffn.op.phase = Phase::kPrefill;
  run.layers.insert(run.layers.begin(), prefill_ffn);
  const std::vector<OpClassPoint> classes = GroupOpClasses(run);
  int ffn_points = 0;
  for (const OpClassPoint& c : classes) ffn_points += c.label == "gemm ffn";
  EXPECT_EQ(ffn_points, 2);
  EXPECT_EQ(classes[0].phase, Phase::kPrefill);
  EXPECT_EQ(classes[0].ops, prefill_ffn.ops);
}

TEST_F(Plots, StallsDataHasOneRowPerPhaseInPercentAndCycles) {
  WritePlots();
  const std::vector<std::string> rows = DataRows(dir_ / "stalls.dat");
  // index 0 (percent) and index 1 (cycles), each a prefill and a decode row:
  // busy dram_wait sram_conflict vector_wait idle.
  ASSERT_EQ(rows.size(), 4u);
  EXPECT_EQ(rows[0].rfind("\"prefill\" ", 0), 0u) << rows[0];
  EXPECT_EQ(rows[2], "\"prefill\" 400000 1000000 10000 40000 50000");
  EXPECT_EQ(rows[3], "\"decode\" 200000 1200000 0 0 0");
  // 200000 of 1400000 decode cycles busy: 14.2857 %.
  EXPECT_EQ(rows[1].rfind("\"decode\" 14.2857 85.7143 0 0 0", 0), 0u) << rows[1];
}

// Every ceiling that applies is its own labelled line, in both phase panels.
TEST_F(Plots, RooflineDrawsEveryCeilingInEachPhasePanel) {
  RunResult run = SmallRun();
  run.layers[0].op.phase = Phase::kPrefill;
  run.vector_peak_ops_per_second = 256e9;
  run.concurrency_bytes_per_second = 12e9;  // below the 25.6 GB/s: drawn
  run.decoder_bytes_per_second = 64e9;
  WriteRunPlots(dir_.string(), run, SmallEnergy());
  const std::string gp = ReadFile(dir_ / "roofline.gp");
  EXPECT_NE(gp.find("set multiplot layout 1,2"), std::string::npos);
  for (const std::string label :
       {"\"tree array: 8.19 Tops/s\"", "\"vector unit: 256 Gops/s\"",
        "\"DRAM bandwidth: 25.6 GB/s\"", "\"request concurrency (Little's law): 12 GB/s\"",
        "\"trit decoder (if every byte is a weight): 64 GB/s\""}) {
    size_t count = 0;
    for (size_t at = gp.find(label); at != std::string::npos; at = gp.find(label, at + 1)) ++count;
    EXPECT_EQ(count, 2u) << label << " in each of the two panels";
  }
  // Concurrency above DRAM bandwidth is no ceiling: not drawn.
  run.concurrency_bytes_per_second = 30e9;
  WriteRunPlots(dir_.string(), run, SmallEnergy());
  EXPECT_EQ(ReadFile(dir_ / "roofline.gp").find("request concurrency"), std::string::npos);
}

// A class's marker comes from a fixed table, not from the order in which
// classes appear, so two runs draw "gemm ffn" alike.
TEST(PlotStyle, OpClassMarkersAreFixedAndDistinct) {
  const std::vector<std::string> classes = {
      "gemm attention", "gemm ffn", "gemm head",   "gemm embedding", "gemm",
      "embed",          "norm",     "quantize",    "rope",           "kv_append",
      "attn_scores",    "softmax",  "attn_values", "activation",     "residual"};
  std::set<std::pair<std::string, int>> seen;
  for (const std::string& c : classes) {
    const PlotStyle st = OpClassStyle(c);
    EXPECT_NE(st.colour, OpClassStyle("no such class").colour) << c;
    EXPECT_TRUE(seen.insert({st.colour, st.point_type}).second) << c << " shares a marker";
  }
  EXPECT_EQ(OpClassStyle("gemm ffn").colour, OpClassStyle("gemm ffn").colour);
}

TEST(PlotStyle, SeriesNeverRepeatWithinAPlot) {
  std::set<std::tuple<std::string, int, int>> seen;
  for (size_t i = 0; i < kPaletteSize * kDashTypes; ++i) {
    const PlotStyle st = SeriesStyle(i);
    EXPECT_TRUE(seen.insert({st.colour, st.point_type, st.dash_type}).second) << "series " << i;
  }
  std::set<std::string> colours;
  for (size_t i = 0; i < kPaletteSize; ++i) colours.insert(SeriesStyle(i).colour);
  EXPECT_EQ(colours.size(), kPaletteSize);
}

TEST(PlotStyle, PowersOfTwoGetALogTwoAxis) {
  EXPECT_EQ(ScaleFor({32, 64, 128, 256}), AxisScale::kLog2);            // trees
  EXPECT_EQ(ScaleFor({256, 512, 1024, 2048, 4096}), AxisScale::kLog2);  // KiB
  EXPECT_EQ(ScaleFor({1, 2}), AxisScale::kLinear);                      // too narrow a span
  EXPECT_EQ(ScaleFor({100, 300, 3000}), AxisScale::kLog10);             // not powers of two
  EXPECT_EQ(ScaleFor({0, 1, 2, 4, 8}), AxisScale::kLinear);             // zero has no log
  EXPECT_EQ(ScaleFor({1.5, 3, 6}), AxisScale::kLinear);
  const std::string lines = GnuplotScale("x", AxisScale::kLog2, {32, 64, 32});
  EXPECT_NE(lines.find("set logscale x 2"), std::string::npos) << lines;
  EXPECT_NE(lines.find("set xtics (\"32\" 32, \"64\" 64)"), std::string::npos) << lines;
}

TEST(PlotStyle, AxisWordsCarryUnitsAndScale) {
  const AxisWords energy = WordsFor("joules_per_token");
  EXPECT_EQ(AxisTitle(energy), "energy per token (mJ)");
  EXPECT_EQ(energy.scale, 1e3);  // 1 J = 1000 mJ (SI)
  EXPECT_EQ(AxisTitle(WordsFor("arch.sram.capacity_kib")), "scratchpad (KiB)");
  EXPECT_EQ(AxisTitle(WordsFor("arch.array.trees")), "adder trees");
  EXPECT_EQ(ValueWords("arch.array.trees", "128"), "128 trees");
  EXPECT_EQ(ValueWords("workload.batch", "16"), "batch 16");
  EXPECT_EQ(AxisTitle(WordsFor("some_new_column")), "some_new_column");
}

TEST_F(Plots, OpClassLabels) {
  TraceOp op;
  op.kind = OpKind::kGemm;
  op.tensor = TensorClass::kFfn;
  EXPECT_EQ(OpClassLabel(op), "gemm ffn");
  op.kind = OpKind::kAttnValues;
  op.tensor = TensorClass::kNone;
  EXPECT_EQ(OpClassLabel(op), "attn_values");
}

}  // namespace
}  // namespace tritsim
