// Figures of a study row derived from a run JSON (docs/studies.md).
#include "study/study_table.h"

#include <gtest/gtest.h>

#include <cmath>

#include "common/error.h"

namespace tritsim {
namespace {

// A run of 2 s: prefill 0.5 s (8 tokens), decode 1.5 s (3 tokens); 10 J in
// all, of which layers carry 2 J (prefill) + 6 J (decode), 2 J unattributed.
nlohmann::json SampleRun() {
  return nlohmann::json::parse(R"({
    "totals": {"seconds": 2.0, "energy_joules": 10.0, "joules_per_token": 0.909,
               "time_to_first_token_seconds": 0.5, "time_per_output_token_seconds": 0.5,
               "area_mm2": 3.0},
    "phases": [{"name": "prefill", "seconds": 0.5, "tokens": 8, "tokens_per_second": 16},
               {"name": "decode", "seconds": 1.5, "tokens": 3, "tokens_per_second": 2,
                "bound_by": "dram"}],
    "layers": [{"phase": "prefill", "energy_joules": 2.0},
               {"phase": "decode", "energy_joules": 6.0}]})");
}

double Figure(const StudyRow& row, const std::string& key) {
  for (size_t i = 0; i < StudyFigures().size(); ++i) {
    if (StudyFigures()[i].key == key) return row.figures[i];
  }
  ADD_FAILURE() << key;
  return 0;
}

TEST(StudyTable, DerivedFiguresFollowTheirDefinitions) {
  VariantFacts facts;
  facts.weight_bytes = 100;
  facts.kv_bytes = 20;
  const StudyRow row = RowFromRunJson(SampleRun(), facts);
  // Arithmetic: (6 J + 2 J * 1.5 s / 2 s) / 3 tokens = 2.5 J.
  EXPECT_DOUBLE_EQ(Figure(row, "joules_per_decode_token"), 2.5);
  EXPECT_DOUBLE_EQ(Figure(row, "watts"), 5.0);  // 10 J / 2 s
  EXPECT_DOUBLE_EQ(Figure(row, "memory_bytes"), 120.0);
  EXPECT_DOUBLE_EQ(Figure(row, "prefill_tokens_per_second"), 16.0);
  EXPECT_EQ(row.decode_bound_by, "dram");
  EXPECT_EQ(row.prefill_bound_by, "-");  // absent in the JSON
}

TEST(StudyTable, MissingPhaseIsNotApplicable) {
  nlohmann::json run = SampleRun();
  run["phases"].erase(0);
  const StudyRow row = RowFromRunJson(run, VariantFacts{});
  EXPECT_TRUE(std::isnan(Figure(row, "prefill_tokens_per_second")));
}

TEST(StudyTable, MissingTotalsKeyIsAnError) {
  nlohmann::json run = SampleRun();
  run["totals"].erase("area_mm2");
  EXPECT_THROW(RowFromRunJson(run, VariantFacts{}), Error);
}

}  // namespace
}  // namespace tritsim
