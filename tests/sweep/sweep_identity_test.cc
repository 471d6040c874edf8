// Sweep row identity: the FNV-1a hash, the input hashes of points and the
// check that refuses rows of other inputs on resume and merge.
#include "sweep/sweep_identity.h"

#include <gtest/gtest.h>

#include <string>

#include "common/error.h"
#include "common/fnv1a.h"
#include "sweep/sweep_csv.h"
#include "sweep/sweep_plan.h"

namespace tritsim {
namespace {

SweepPlan Plan(const std::string& text) {
  return BuildSweepPlan(LoadSweepText(text, "study.yaml", "/nowhere"));
}

const char* const kStudy =
    "name: s\naxes:\n  arch.array.trees: [32, 64]\n  workload.batch: [1, 4]\n";

// A CSV as `plan` would write it, with empty metrics.
CsvTable TableOf(const SweepPlan& plan) {
  CsvTable t;
  t.header = SweepCsvHeader(plan.axis_keys);
  for (const SweepPoint& p : plan.points) {
    std::vector<std::string> row = {p.id};
    row.insert(row.end(), p.values.begin(), p.values.end());
    row.resize(t.header.size() - IdentityColumns().size());
    const std::vector<std::string> id = IdentityFields(plan, p);
    row.insert(row.end(), id.begin(), id.end());
    t.rows.push_back(row);
  }
  return t;
}

std::string CheckError(const SweepPlan& plan, const CsvTable& t) {
  try {
    CheckRowsBelong(plan, t, "out.csv", "HINT");
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    return e.what();
  }
  return "no error";
}

// Test vectors published with FNV (Fowler, Noll, Vo; "FNV-1a 64-bit" test
// suite by Landon Curt Noll): "" hashes to the offset basis, "a" and "foobar".
TEST(Fnv1a, MatchesThePublishedTestVectors) {
  EXPECT_EQ(Fnv1a64(""), 0xcbf29ce484222325ull);
  EXPECT_EQ(Fnv1a64("a"), 0xaf63dc4c8601ec8cull);
  EXPECT_EQ(Fnv1a64("foobar"), 0x85944171f73967e8ull);
  EXPECT_EQ(Hex64(0xaf63dc4c8601ec8cull), "af63dc4c8601ec8c");
}

TEST(SweepIdentity, InputHashCoversWorkloadOverridesAndVersion) {
  const SweepIdentity id = Plan(kStudy).identity;
  const std::vector<SweepSetting> set = {{"arch.array.trees", "32"}};
  WorkloadConfig w;
  const std::string h = InputHash(id, set, w);
  EXPECT_EQ(h.size(), 16u);
  EXPECT_EQ(InputHash(id, set, w), h);  // stable
  WorkloadConfig longer = w;
  longer.context_tokens = 2048;
  EXPECT_NE(InputHash(id, set, longer), h);
  EXPECT_NE(InputHash(id, {{"arch.array.trees", "64"}}, w), h);
  SweepIdentity newer = id;
  newer.tritsim_version += "-next";
  EXPECT_NE(InputHash(newer, set, w), h);
  SweepIdentity edited = id;
  edited.model_file_hash = Hex64(1);
  EXPECT_NE(InputHash(edited, set, w), h);
}

TEST(SweepIdentity, RowsOfTheSamePlanPass) {
  const SweepPlan plan = Plan(kStudy);
  EXPECT_EQ(CheckError(plan, TableOf(plan)), "no error");
}

TEST(SweepIdentity, AnotherSweepNameIsRefused) {
  const SweepPlan plan = Plan(kStudy);
  const SweepPlan other = Plan(std::string(kStudy).replace(6, 1, "t"));
  EXPECT_EQ(CheckError(plan, TableOf(other)),
            "out.csv:2: sweep name: 't' in the CSV, 's' now; HINT");
}

TEST(SweepIdentity, AChangedBaseWorkloadIsRefused) {
  const SweepPlan plan = Plan(std::string(kStudy) + "base:\n  workload: {context: 2048}\n");
  const std::string e = CheckError(plan, TableOf(Plan(kStudy)));
  EXPECT_NE(e.find("out.csv:2: workload of point p0000-"), std::string::npos) << e;
  EXPECT_NE(e.find("'prefill=0 decode=1 context=0 batch=1' in the CSV, "
                   "'prefill=0 decode=1 context=2048 batch=1' now"),
            std::string::npos)
      << e;
}

TEST(SweepIdentity, AChangedAxisValueIsNamed) {
  const SweepPlan plan =
      Plan("name: s\naxes:\n  arch.array.trees: [32, 96]\n  workload.batch: [1, 4]\n");
  const std::string e = CheckError(plan, TableOf(Plan(kStudy)));
  EXPECT_NE(e.find("out.csv:4: axis arch.array.trees of point p0002-"), std::string::npos) << e;
  EXPECT_NE(e.find("'64' in the CSV, '96' now"), std::string::npos) << e;
}

TEST(SweepIdentity, ATamperedInputHashIsRefused) {
  const SweepPlan plan = Plan(kStudy);
  CsvTable t = TableOf(plan);
  t.rows[1].back() = Hex64(0);
  EXPECT_NE(CheckError(plan, t).find("out.csv:3: resolved inputs of point p0001-"),
            std::string::npos);
}

TEST(SweepIdentity, ACsvWithoutIdentityColumnsIsRefused) {
  const SweepPlan plan = Plan(kStudy);
  CsvTable t = TableOf(plan);
  t.header.resize(t.header.size() - IdentityColumns().size());
  for (auto& row : t.rows) row.resize(t.header.size());
  EXPECT_NE(CheckError(plan, t).find("out.csv:1: no input_hash column"), std::string::npos);
}

}  // namespace
}  // namespace tritsim
