// The sweep result CSV: its columns, one row per point, and reading it back
// (for resume, merge and Pareto extraction).
//
// Columns, in order:
//   id, <one column per axis key>, status, error, <kMetricColumns...>, json_path,
//   <IdentityColumns()...> (sweep_identity.h: what the row was computed from)
// status is "ok" or "failed"; error is empty for ok rows. Fields holding a
// comma, quote or leading/trailing space are quoted as in RFC 4180 (quotes
// doubled); no field ever holds a line break, so one line is one row.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include <nlohmann/json_fwd.hpp>

namespace tritsim {

// The headline metric columns, in order (docs/sweeps.md defines each).
const std::vector<std::string>& MetricColumns();

inline constexpr const char* kStatusOk = "ok";
inline constexpr const char* kStatusFailed = "failed";

// The header fields for a sweep over `axis_keys`.
std::vector<std::string> SweepCsvHeader(const std::vector<std::string>& axis_keys);

// One CSV line (terminated by "\n") of `fields`. Line breaks inside a field
// are replaced by spaces.
std::string CsvLine(const std::vector<std::string>& fields);

// Splits one line (without its "\n") into fields. Returns false for a
// malformed line (an unterminated quote).
bool ParseCsvLine(const std::string& line, std::vector<std::string>& fields);

// A CSV file read back.
struct CsvTable {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;  // each has header.size() fields
  size_t complete_bytes = 0;                   // bytes up to and including the last "\n"
  bool torn_tail = false;                      // the file ended in a line without "\n" (ignored)
};

// Reads `path`. A final line without "\n" is a row torn by a kill and is
// left out (torn_tail); a file without one complete line has an empty
// header. Throws tritsim::Error (kBadInput) "PATH:LINE: ..." if the file
// cannot be read or a complete row is malformed or has a different number
// of fields from the header.
CsvTable ReadCsvFile(const std::string& path);

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
