// Pareto fronts on hand-made data whose front is known by construction.
#include "sweep/pareto.h"

#include <gtest/gtest.h>

#include "common/error.h"

namespace tritsim {
namespace {

const std::vector<Objective> kMaxMin = {{"tps", true}, {"jpt", false}};

TEST(Pareto, TwoObjectivesMixedDirections) {
  // (tokens/s up, joules/token down). Front by hand: A (fast, costly),
  // C (middle), E (slow, frugal). B is dominated by C (slower and costlier),
  // D by C, F by E.
  const std::vector<std::vector<double>> v = {
      {100, 5.0},  // A
      {60, 4.0},   // B
      {80, 3.0},   // C
      {70, 3.5},   // D
      {40, 1.0},   // E
      {30, 1.0},   // F: equal energy to E, slower
  };
  EXPECT_EQ(ParetoFront(v, kMaxMin), (std::vector<size_t>{0, 2, 4}));
}

TEST(Pareto, DirectionsMatter) {
  const std::vector<std::vector<double>> v = {{1, 1}, {2, 2}};
  EXPECT_EQ(ParetoFront(v, {{"a", true}, {"b", true}}), (std::vector<size_t>{1}));
  EXPECT_EQ(ParetoFront(v, {{"a", false}, {"b", false}}), (std::vector<size_t>{0}));
  EXPECT_EQ(ParetoFront(v, {{"a", true}, {"b", false}}), (std::vector<size_t>{0, 1}));
}

TEST(Pareto, ExactTiesAreAllKept) {
  // Identical points do not dominate each other; a point equal in one
  // objective and worse in the other is dominated.
  const std::vector<std::vector<double>> v = {{10, 2}, {10, 2}, {10, 3}, {5, 1}};
  EXPECT_EQ(ParetoFront(v, kMaxMin), (std::vector<size_t>{0, 1, 3}));
}

TEST(Pareto, ThreeObjectives) {
  // max tps, min jpt, min area. P3 is best in area only and stays; P4 is
  // dominated by P0 in all three; P2 is dominated by P1 (equal tps and area,
  // more energy).
  const std::vector<std::vector<double>> v = {
      {100, 2, 10},  // P0
      {80, 1, 8},    // P1
      {80, 1.5, 8},  // P2
      {20, 9, 1},    // P3
      {90, 3, 12},   // P4
  };
  const std::vector<Objective> o = {{"tps", true}, {"jpt", false}, {"area", false}};
  EXPECT_EQ(ParetoFront(v, o), (std::vector<size_t>{0, 1, 3}));
  // In the first two objectives alone P3 is dominated by P1.
  std::vector<std::vector<double>> two;
  for (const auto& row : v) two.push_back({row[0], row[1]});
  EXPECT_EQ(ParetoFront(two, kMaxMin), (std::vector<size_t>{0, 1}));
}

TEST(Pareto, ParsesSpecs) {
  const std::vector<Objective> o = ParseObjectives("max:tokens_per_second,min:joules_per_token");
  ASSERT_EQ(o.size(), 2u);
  EXPECT_EQ(o[0].column, "tokens_per_second");
  EXPECT_TRUE(o[0].maximize);
  EXPECT_FALSE(o[1].maximize);
  for (const std::string bad : {"tokens_per_second,min:x", "up:a,min:b", "max:a", "max:a,min:a",
                                "max:a,min:b,min:c,max:d", "max:,min:b"}) {
    try {
      ParseObjectives(bad);
      ADD_FAILURE() << "no error for " << bad;
    } catch (const Error& e) {
      EXPECT_EQ(e.code(), ExitCode::kUsage) << bad;
      EXPECT_EQ(std::string(e.what()).rfind("--pareto", 0), 0u) << e.what();
    }
  }
}

TEST(Pareto, SelectsOkRowsWithNumbers) {
  CsvTable t;
  t.header = {"id", "x", "status", "error", "tps", "jpt"};
  t.rows = {{"p0", "1", "ok", "", "10", "1"},
            {"p1", "2", "failed", "exit 4: tile", "", ""},
            {"p2", "3", "ok", "", "nan", "1"},
            {"p3", "4", "ok", "", "20", "2"}};
  const ObjectiveRows sel = SelectObjectiveRows(t, kMaxMin, "t.csv");
  EXPECT_EQ(sel.rows, (std::vector<size_t>{0, 3}));
  EXPECT_EQ(sel.values[1], (std::vector<double>{20, 2}));
  try {
    SelectObjectiveRows(t, {{"tsp", true}, {"jpt", false}}, "t.csv");
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_EQ(std::string(e.what()), "--pareto: no column 'tsp' in t.csv; did you mean 'tps'?");
  }
}

}  // namespace
}  // namespace tritsim
