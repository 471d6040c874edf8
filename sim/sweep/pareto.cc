// Pareto fronts. See pareto.h.
#include "sweep/pareto.h"

#include <cmath>
#include <cstdlib>
#include <set>

#include "common/error.h"

namespace tritsim {
namespace {

constexpr size_t kMinObjectives = 2;
constexpr size_t kMaxObjectives = 3;

Objective ParseOne(const std::string& item) {
  const std::string usage = " (expected e.g. --pareto max:tokens_per_second,min:joules_per_token)";
  const size_t colon = item.find(':');
  if (colon == std::string::npos) {
    throw UsageError("--pareto " + item + ": give a direction, max:COLUMN or min:COLUMN" + usage);
  }
  const std::string dir = item.substr(0, colon);
  Objective o;
  o.column = item.substr(colon + 1);
  if (dir != "max" && dir != "min") {
    throw UsageError("--pareto " + item + ": direction must be max or min, got '" + dir + "'" +
                     usage);
  }
  if (o.column.empty()) throw UsageError("--pareto " + item + ": empty column name" + usage);
  o.maximize = dir == "max";
  return o;
}

// True if a is at least as good as b everywhere and better somewhere.
bool Dominates(const std::vector<double>& a, const std::vector<double>& b,
               const std::vector<Objective>& objectives) {
  bool better = false;
  for (size_t k = 0; k < objectives.size(); ++k) {
    const double gain = objectives[k].maximize ? a[k] - b[k] : b[k] - a[k];
    if (gain < 0) return false;
    if (gain > 0) better = true;
  }
  return better;
}

}  // namespace

bool ParseCsvNumber(const std::string& text, double& out) {
  if (text.empty()) return false;
  char* end = nullptr;
  out = std::strtod(text.c_str(), &end);
  return *end == '\0' && std::isfinite(out);
}

std::vector<Objective> ParseObjectives(const std::string& spec) {
  std::vector<Objective> out;
  std::set<std::string> seen;
  size_t start = 0;
  while (start <= spec.size()) {
    const size_t comma = spec.find(',', start);
    const std::string item = spec.substr(start, comma == std::string::npos ? comma : comma - start);
    out.push_back(ParseOne(item));
    if (!seen.insert(out.back().column).second) {
      throw UsageError("--pareto: column " + out.back().column + " is named twice");
    }
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  if (out.size() < kMinObjectives || out.size() > kMaxObjectives) {
    throw UsageError("--pareto " + spec + ": give 2 or 3 objectives, got " +
                     std::to_string(out.size()));
  }
  return out;
}

std::vector<size_t> ParetoFront(const std::vector<std::vector<double>>& values,
                                const std::vector<Objective>& objectives) {
  std::vector<size_t> front;
  for (size_t i = 0; i < values.size(); ++i) {
    bool dominated = false;
    for (size_t j = 0; j < values.size() && !dominated; ++j) {
      dominated = j != i && Dominates(values[j], values[i], objectives);
    }
    if (!dominated) front.push_back(i);
  }
  return front;
}

ObjectiveRows SelectObjectiveRows(const CsvTable& table, const std::vector<Objective>& objectives,
                                  const std::string& csv_path) {
  std::vector<size_t> columns;
  for (const Objective& o : objectives) {
    columns.push_back(ColumnIndex(table.header, o.column, csv_path, "--pareto"));
  }
  const size_t status = ColumnIndex(table.header, "status", csv_path, "--pareto");
  ObjectiveRows out;
  for (size_t r = 0; r < table.rows.size(); ++r) {
    if (table.rows[r][status] != kStatusOk) continue;
    std::vector<double> v(columns.size());
    bool finite = true;
    for (size_t k = 0; k < columns.size(); ++k) {
      finite = finite && ParseCsvNumber(table.rows[r][columns[k]], v[k]);
    }
    if (!finite) continue;
    out.rows.push_back(r);
    out.values.push_back(v);
  }
  return out;
}

}  // namespace tritsim
