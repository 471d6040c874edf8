// The sweep result CSV: its columns, one row per point, and reading it back
// (for resume, merge and Pareto extraction).
//
// Columns, in order:
//   id, <one column per axis key>, status, error, <kMetricColumns...>, json_path,
//   <IdentityColumns()...> (sweep_identity.h: what the row was computed from)
// status is "ok" or "failed"; error is empty for ok rows. Lines are written
// and read by common/csv.h (RFC 4180 quoting).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include <nlohmann/json_fwd.hpp>

#include "common/csv.h"  // CsvLine, CsvTable, ReadCsvFile: the one CSV writer and reader

namespace tritsim {

// The headline metric columns, in order (docs/sweeps.md defines each).
const std::vector<std::string>& MetricColumns();

inline constexpr const char* kStatusOk = "ok";
inline constexpr const char* kStatusFailed = "failed";

// The header fields for a sweep over `axis_keys`.
std::vector<std::string> SweepCsvHeader(const std::vector<std::string>& axis_keys);

// Index of `column` in `header`, or throws tritsim::Error (kUsage)
// "WHAT: no column 'X' in PATH; did you mean 'Y'?".
size_t ColumnIndex(const std::vector<std::string>& header, const std::string& column,
                   const std::string& path, const std::string& what);

// The metric values of one run, in MetricColumns() order, computed from
// its run JSON (schema tritsim.run/1). Throws tritsim::Error (kBadInput)
// if a needed key is missing.
std::vector<std::string> MetricsFromRunJson(const nlohmann::json& run);

// Shortest decimal text that reads back as exactly `v`.
std::string FormatExact(double v);

}  // namespace tritsim
