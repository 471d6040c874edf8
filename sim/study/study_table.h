// The side-by-side table of a study: per variant a fixed list of figures
// computed from its run JSON (schema tritsim.run/1) and its VariantFacts,
// and each figure's ratio to the reference variant. docs/studies.md
// defines every figure and how the ones a run JSON lacks are derived.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "study/study_plan.h"

namespace tritsim {

// One figure of the table.
struct StudyFigure {
  const char* key;   // CSV column and JSON key, e.g. "decode_tokens_per_second"
  const char* unit;  // for the console, e.g. "tok/s"
  bool higher_is_better;
};

// The figures, in table order.
const std::vector<StudyFigure>& StudyFigures();

// What a run JSON lacks a figure for (no such phase, no decode tokens), and
// the ratio of a figure whose reference value is 0 or absent: NaN, shown
// as "-" on the console and as an empty CSV field / null JSON value.
struct StudyRow {
  std::string variant;
  std::string model;            // model name
  std::string arch;             // architecture name
  std::vector<double> figures;  // parallel to StudyFigures()
  std::vector<double> ratios;   // figure / the reference's figure
  // phases[].bound_by of the run JSON when present, else "-".
  std::string prefill_bound_by = "-";
  std::string decode_bound_by = "-";
};

struct StudyTable {
  std::string study;           // study name
  std::string reference;       // reference variant name
  std::vector<StudyRow> rows;  // file order
};

// The figures of one run. Throws tritsim::Error (kBadInput) "run JSON
// lacks SECTION.KEY" when a needed key is missing.
StudyRow RowFromRunJson(const nlohmann::json& run, const VariantFacts& facts);

// The table of `plan` from its variants' run JSON (parallel to the
// variants); fills the ratios against plan.file.reference_index.
StudyTable BuildStudyTable(const StudyPlan& plan, const std::vector<nlohmann::json>& runs);

std::string StudyTableCsv(const StudyTable& table);   // one row per variant
std::string StudyTableJson(const StudyTable& table);  // schema tritsim.study/1
std::string StudyTableText(const StudyTable& table);  // console: one line per figure

}  // namespace tritsim
