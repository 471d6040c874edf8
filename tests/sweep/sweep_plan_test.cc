// Sweep files and plans: value forms, product order, ids, constraints,
// explicit points and the one-line errors for bad sweep files.
#include "sweep/sweep_plan.h"

#include <gtest/gtest.h>

#include <set>
#include <string>

#include "common/error.h"
#include "config/config_loader.h"
#include "config/sweep_file.h"
#include "energy/area_model.h"

namespace tritsim {
namespace {

const std::string kWren = std::string(TRITSIM_SOURCE_DIR) + "/models/wren-0.7b.yaml";

SweepFile Parse(const std::string& text) { return LoadSweepText(text, "study.yaml", "/nowhere"); }

SweepPlan Plan(const std::string& text) { return BuildSweepPlan(Parse(text)); }

// The message and exit code of the error `text` raises when planned.
std::string PlanError(const std::string& text, ExitCode* code = nullptr) {
  try {
    Plan(text);
  } catch (const Error& e) {
    if (code) *code = e.code();
    return e.what();
  }
  return "no error";
}

TEST(SweepFile, ListsAndRangesExpandInOrder) {
  const SweepFile f = Parse(
      "name: s\n"
      "axes:\n"
      "  arch.array.trees: {from: 32, to: 256, factor: 2}\n"
      "  workload.batch: {from: 1, to: 10, step: 3}\n"
      "  arch.dram.preset: [ddr4-3200, hbm2e]\n");
  ASSERT_EQ(f.axes.size(), 3u);
  EXPECT_EQ(f.axes[0].key, "arch.array.trees");
  EXPECT_EQ(f.axes[0].line, 3);
  EXPECT_EQ(f.axes[0].values, (std::vector<std::string>{"32", "64", "128", "256"}));
  EXPECT_EQ(f.axes[1].values, (std::vector<std::string>{"1", "4", "7", "10"}));
  EXPECT_EQ(f.axes[2].values, (std::vector<std::string>{"ddr4-3200", "hbm2e"}));
}

TEST(SweepFile, FractionalStepEndsOnTheUpperBound) {
  const SweepFile f = Parse(
      "name: s\naxes:\n  model.weight_zero_fraction: {from: 0.1, to: 0.3, "
      "step: 0.1}\n");
  EXPECT_EQ(f.axes[0].values, (std::vector<std::string>{"0.1", "0.2", "0.3"}));
}

TEST(SweepFile, BasePathsResolveAgainstTheSweepFolder) {
  const SweepFile f = Parse(
      "name: s\nbase: {arch: ../a.yaml, model: /abs/m.yaml}\n"
      "axes: {workload.batch: [1]}\n");
  EXPECT_EQ(f.arch_path, "/a.yaml");
  EXPECT_EQ(f.model_path, "/abs/m.yaml");
}

TEST(SweepPlan, FirstAxisVariesSlowest) {
  const SweepPlan p = Plan(
      "name: s\naxes:\n  arch.array.trees: [32, 64]\n"
      "  workload.batch: [1, 4, 16]\n");
  ASSERT_EQ(p.points.size(), 6u);
  const std::vector<std::vector<std::string>> expected = {{"32", "1"}, {"32", "4"}, {"32", "16"},
                                                          {"64", "1"}, {"64", "4"}, {"64", "16"}};
  for (size_t i = 0; i < 6; ++i) {
    EXPECT_EQ(p.points[i].values, expected[i]) << i;
    EXPECT_EQ(p.points[i].index, i);
  }
  EXPECT_EQ(p.points[4].workload.batch, 4);
}

TEST(SweepPlan, IdsAreStableAndDistinct) {
  const std::string text =
      "name: s\naxes:\n  arch.array.trees: [32, 64]\n  workload.batch: [1, 4]\n";
  const SweepPlan a = Plan(text), b = Plan(text);
  std::set<std::string> ids;
  for (size_t i = 0; i < a.points.size(); ++i) {
    EXPECT_EQ(a.points[i].id, b.points[i].id);
    EXPECT_EQ(a.points[i].id.rfind("p000" + std::to_string(i) + "-", 0), 0u) << a.points[i].id;
    ids.insert(a.points[i].id);
  }
  EXPECT_EQ(ids.size(), 4u);
  // Changing one value changes that point's id, not only its index.
  const SweepPlan c =
      Plan("name: s\naxes:\n  arch.array.trees: [32, 96]\n  workload.batch: [1, 4]\n");
  EXPECT_EQ(c.points[0].id, a.points[0].id);
  EXPECT_NE(c.points[2].id, a.points[2].id);
}

TEST(SweepPlan, AreaConstraintUsesTheAreaModel) {
  const SweepPlan p = Plan(
      "name: s\naxes:\n  arch.sram.capacity_kib: [512, 1024, 2048, 4096]\n"
      "constraints: [area_mm2 <= 1.0]\n");
  for (const SweepPoint& pt : p.points) {
    const double expected =
        EstimateArea(DefaultArch({{"sram.capacity_kib", pt.values[0]}})).total_mm2();
    EXPECT_DOUBLE_EQ(pt.area_mm2, expected);
    EXPECT_LE(pt.area_mm2, 1.0);
  }
  EXPECT_EQ(p.points.size() + p.excluded, 4u);
  EXPECT_GE(p.excluded, 1u);  // 4 MiB of 7 nm SRAM is over 1 mm^2 (Wu et al. IEDM 2016 bitcell)
}

TEST(SweepPlan, AxisConstraintsFilterCombinations) {
  const SweepPlan p = Plan(
      "name: s\naxes:\n  arch.array.trees: [32, 64, 128]\n"
      "  workload.batch: [1, 4]\n"
      "constraints: ['arch.array.trees > 32', 'workload.batch != 4']\n");
  ASSERT_EQ(p.points.size(), 2u);
  EXPECT_EQ(p.points[0].values, (std::vector<std::string>{"64", "1"}));
  EXPECT_EQ(p.points[1].values, (std::vector<std::string>{"128", "1"}));
  EXPECT_EQ(p.excluded, 4u);
}

TEST(SweepPlan, ExplicitPointsKeepTheirOrderAndUnionOfKeys) {
  const SweepPlan p = Plan(
      "name: s\npoints:\n  - {arch.array.trees: 32}\n"
      "  - {workload.batch: 8, arch.array.trees: 64}\n");
  EXPECT_EQ(p.axis_keys, (std::vector<std::string>{"arch.array.trees", "workload.batch"}));
  EXPECT_EQ(p.points[0].values, (std::vector<std::string>{"32", ""}));
  EXPECT_EQ(p.points[1].values, (std::vector<std::string>{"64", "8"}));
  EXPECT_EQ(p.points[0].workload.batch, 1);
  EXPECT_EQ(p.points[1].workload.batch, 8);
}

TEST(SweepPlan, ShardsPartitionThePlan) {
  const SweepPlan p = Plan("name: s\naxes:\n  workload.batch: {from: 1, to: 7, step: 1}\n");
  std::set<size_t> seen;
  for (size_t s = 0; s < 3; ++s) {
    for (const SweepPoint* pt : ShardPoints(p, s, 3)) {
      EXPECT_EQ(pt->index % 3, s);
      EXPECT_TRUE(seen.insert(pt->index).second);
    }
  }
  EXPECT_EQ(seen.size(), 7u);
}

TEST(SweepPlan, RunArgumentsCarryOverridesAndWorkload) {
  const SweepPlan p = Plan("name: s\nbase: {model: " + kWren +
                           ", workload: {decode: 2}}\n"
                           "axes:\n  arch.array.trees: [32]\n  workload.batch: [4]\n");
  const std::vector<std::string> args = PointRunArgs(p, p.points[0], "/o/x.json");
  const std::vector<std::string> expected = {
      "run",       "--model", kWren,      "--set",  "arch.array.trees=32",
      "--prefill", "0",       "--decode", "2",      "--context",
      "0",         "--batch", "4",        "--json", "/o/x.json",
      "-q"};
  EXPECT_EQ(args, expected);
}

TEST(SweepPlanErrors, UnknownArchKeyNamesLineAndSuggestion) {
  ExitCode code = ExitCode::kOk;
  const std::string msg =
      PlanError("name: s\naxes:\n  workload.batch: [1]\n  arch.array.tres: [32]\n", &code);
  EXPECT_EQ(code, ExitCode::kBadInput);
  EXPECT_EQ(msg.rfind("study.yaml:4: axes.arch.array.tres:", 0), 0u) << msg;
  EXPECT_NE(msg.find("did you mean 'arch.array.trees'"), std::string::npos) << msg;
}

TEST(SweepPlanErrors, UnknownWorkloadKeySuggestsTheNearest) {
  ExitCode code = ExitCode::kOk;
  const std::string msg = PlanError("name: s\naxes:\n  workload.btch: [1]\n", &code);
  EXPECT_EQ(code, ExitCode::kBadInput);
  EXPECT_EQ(msg, "study.yaml:3: axes.workload.btch: unknown key; did you mean 'workload.batch'?");
}

TEST(SweepPlanErrors, BadValueNamesTheValue) {
  const std::string msg = PlanError("name: s\naxes:\n  arch.array.trees: [64, 0]\n");
  EXPECT_EQ(msg.rfind("study.yaml:3: axes.arch.array.trees: value 0:", 0), 0u) << msg;
}

TEST(SweepPlanErrors, NonIntegerWorkloadValue) {
  const std::string msg = PlanError("name: s\naxes:\n  workload.batch: [1, 2.5]\n");
  EXPECT_NE(msg.find("study.yaml:3: axes.workload.batch"), std::string::npos) << msg;
  EXPECT_NE(msg.find("2.5"), std::string::npos) << msg;
}

TEST(SweepPlanErrors, BadSweepFileShapes) {
  struct Case {
    std::string text;
    std::string expected;  // start of the message
  };
  const std::vector<Case> cases = {
      {"axes: {workload.batch: [1]}\n", "study.yaml: name: missing"},
      {"name: s\n", "study.yaml: axes: give exactly one of axes"},
      {"name: s\naxes: {workload.batch: [1]}\npoints: [{workload.batch: 2}]\n",
       "study.yaml:3: points: give exactly one"},
      {"name: s\naxs: {workload.batch: [1]}\n",
       "study.yaml:2: axs: unknown key; did you mean 'axes'?"},
      {"name: s\naxes:\n  workload.batch: [1, 1]\n",
       "study.yaml:3: axes.workload.batch: value 1 is "
       "listed twice"},
      {"name: s\naxes:\n  workload.batch: {from: 1, to: 4, stp: 1}\n",
       "study.yaml:3: axes.workload.batch.stp: unknown key; did you mean 'step'?"},
      {"name: s\naxes:\n  workload.batch: {from: 4, to: 1, step: 1}\n",
       "study.yaml:3: axes.workload.batch.to: must be at least from"},
      {"name: s\naxes:\n  workload.batch: {from: 1, to: 8, factor: 1}\n",
       "study.yaml:3: axes.workload.batch.factor: a geometric range needs factor > 1"},
      {"name: s\naxes:\n  workload.batch: [[1, 2]]\n",
       "study.yaml:3: axes.workload.batch: each value"},
      {"name: s\naxes:\n  other.thing: [1]\n",
       "study.yaml:3: axes.other.thing: unknown key; a key "
       "is arch.<key>"},
      {"name: s\naxes: {workload.batch: [1]}\nconstraints: ['workload.batch ~ 3']\n",
       "study.yaml:3: constraints[0]: must be 'KEY OP NUMBER'"},
      {"name: s\naxes: {workload.batch: [1]}\nconstraints: ['area_mm2 <= big']\n",
       "study.yaml:3: constraints[0]: must be 'KEY OP NUMBER'"},
      {"name: s\naxes: {workload.batch: [1]}\nconstraints: ['area_mm2 < 0']\n",
       "study.yaml: constraints: no point satisfies the constraints"},
      {"name: s\naxes: {arch.dram.preset: [ddr4-3200]}\nconstraints: ['arch.dram.preset < 3']\n",
       "study.yaml:3: constraints: arch.dram.preset < 3: arch.dram.preset is 'ddr4-3200'"},
  };
  for (const Case& c : cases) {
    ExitCode code = ExitCode::kOk;
    const std::string msg = PlanError(c.text, &code);
    EXPECT_EQ(msg.rfind(c.expected, 0), 0u) << "got: " << msg << "\nfor:\n" << c.text;
    EXPECT_EQ(code, ExitCode::kBadInput) << c.text;
    EXPECT_EQ(msg.find('\n'), std::string::npos) << msg;
  }
}

TEST(SweepPlanErrors, InconsistentCombinationNamesThePoint) {
  // Each value alone suits the embedded model (heads 32, head_dim 100, width
  // 3200), but head_dim 400 with width 1600 breaks heads * head_dim <= 4 * width.
  const std::string msg =
      PlanError("name: s\naxes:\n  model.head_dim: [400]\n  model.width: [3200, 1600]\n");
  EXPECT_EQ(msg.rfind("study.yaml:3: axes: point (model.head_dim=400 model.width=1600):", 0), 0u)
      << msg;
  EXPECT_NE(msg.find("must be at most 4 * width"), std::string::npos) << msg;
}

}  // namespace
}  // namespace tritsim
