// Pareto fronts over sweep results: the points no other point dominates.
//
// Point a dominates point b when a is at least as good as b in every
// objective and strictly better in at least one (the usual definition of
// Pareto dominance, e.g. Deb 2001, "Multi-Objective Optimization using
// Evolutionary Algorithms", ch. 2). Points equal in every objective do not
// dominate each other, so ties are all kept.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "sweep/sweep_csv.h"

namespace tritsim {

struct Objective {
  std::string column;     // a CSV column holding numbers, e.g. "tokens_per_second"
  bool maximize = false;  // true: larger is better ("max:"), false: smaller ("min:")
};

// Parses "max:COL,min:COL[,...]" (2 or 3 objectives). Throws tritsim::Error
// (kUsage) naming --pareto for a missing direction, an unknown direction,
// an empty column, a repeated column or a count outside 2..3.
std::vector<Objective> ParseObjectives(const std::string& spec);

// A CSV field as a finite number: true when the whole of `text` reads as
// one (strtod), false for empty text, trailing characters, inf or nan.
bool ParseCsvNumber(const std::string& text, double& out);

// Indices into `values` of the non-dominated rows, in input order.
// values[i][k] is row i's value of objective k; every row has one value
// per objective and none is NaN.
std::vector<size_t> ParetoFront(const std::vector<std::vector<double>>& values,
                                const std::vector<Objective>& objectives);

// The ok rows of `table` (status "ok", every objective a finite number)
// and their objective values. Throws tritsim::Error (kUsage) for an
// objective column not in the table (suggesting the nearest).
struct ObjectiveRows {
  std::vector<size_t> rows;                 // indices into table.rows
  std::vector<std::vector<double>> values;  // per row, per objective
};
ObjectiveRows SelectObjectiveRows(const CsvTable& table, const std::vector<Objective>& objectives,
                                  const std::string& csv_path);

}  // namespace tritsim
