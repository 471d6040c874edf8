// `tritsim diff A.json B.json`: two run JSONs side by side. Headline
// totals, each phase, and each op class (layers[] grouped by kind/tensor),
// with the ratio B/A, and the resolved-config keys that differ
// (docs/report-format.md, "Comparing two runs").
#pragma once

#include <ostream>
#include <string>

#include <nlohmann/json.hpp>

namespace tritsim {

inline constexpr const char* kDiffSchema = "tritsim.diff/1";

// The comparison as JSON: {"schema", "a", "b", "totals", "phases",
// "op_classes", "resolved_differences"}. Every figure is {"a", "b",
// "ratio"}; ratio is B/A, null when A is 0. A figure only one run has shows
// null for the other. resolved_differences is null when either run lacks
// the resolved section.
nlohmann::ordered_json DiffJson(const nlohmann::json& a, const nlohmann::json& b,
                                const std::string& a_path, const std::string& b_path);

// The comparison as a console table.
void PrintDiff(const nlohmann::ordered_json& diff, std::ostream& out);

}  // namespace tritsim
