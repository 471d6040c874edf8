// Sweep CSV columns, lines and reading. See sweep_csv.h.
#include "sweep/sweep_csv.h"

#include <charconv>
#include <cmath>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "common/error.h"
#include "config/sweep_file.h"
#include "sweep/sweep_identity.h"

namespace tritsim {
namespace {

const std::vector<std::string> kStallKeys = {"busy", "dram_wait", "sram_conflict", "vector_wait",
                                             "idle"};

bool NeedsQuotes(const std::string& f) {
  return f.find_first_of(",\"") != std::string::npos ||
         (!f.empty() && (f.front() == ' ' || f.back() == ' '));
}

const nlohmann::json& At(const nlohmann::json& j, const std::string& section,
                         const std::string& key) {
  if (!j.contains(section) || !j[section].contains(key)) {
    throw Error(ExitCode::kBadInput, "run JSON lacks " + section + "." + key);
  }
  return j[section][key];
}

double Number(const nlohmann::json& j, const std::string& section, const std::string& key) {
  const nlohmann::json& v = At(j, section, key);
  if (!v.is_number())
    throw Error(ExitCode::kBadInput, "run JSON: " + section + "." + key + " is not a number");
  return v.get<double>();
}

// Share of layer cycles spent in layers whose roofline regime is "memory".
double MemoryBoundShare(const nlohmann::json& run) {
  if (!run.contains("layers") || !run["layers"].is_array()) {
    throw Error(ExitCode::kBadInput, "run JSON lacks layers");
  }
  double memory = 0, all = 0;
  for (const nlohmann::json& layer : run["layers"]) {
    const double cycles = layer.at("cycles").get<double>();
    all += cycles;
    if (layer.at("regime").get<std::string>() == "memory") memory += cycles;
  }
  return all > 0 ? memory / all : 0.0;
}

}  // namespace

const std::vector<std::string>& MetricColumns() {
  static const std::vector<std::string> columns = {"tokens_per_second",
                                                   "time_to_first_token_seconds",
                                                   "time_per_output_token_seconds",
                                                   "joules_per_token",
                                                   "picojoules_per_op",
                                                   "area_mm2",
                                                   "memory_bound_share",
                                                   "dram_bandwidth_utilization",
                                                   "busy_share",
                                                   "dram_wait_share",
                                                   "sram_conflict_share",
                                                   "vector_wait_share",
                                                   "idle_share",
                                                   "cycles"};
  return columns;
}

std::vector<std::string> SweepCsvHeader(const std::vector<std::string>& axis_keys) {
  std::vector<std::string> h = {"id"};
  h.insert(h.end(), axis_keys.begin(), axis_keys.end());
  h.insert(h.end(), {"status", "error"});
  h.insert(h.end(), MetricColumns().begin(), MetricColumns().end());
  h.push_back("json_path");
  h.insert(h.end(), IdentityColumns().begin(), IdentityColumns().end());
  return h;
}

std::string CsvLine(const std::vector<std::string>& fields) {
  std::string line;
  for (size_t i = 0; i < fields.size(); ++i) {
    std::string f = fields[i];
    for (char& c : f) {
      if (c == '\n' || c == '\r') c = ' ';
    }
    if (i > 0) line += ',';
    if (!NeedsQuotes(f)) {
      line += f;
      continue;
    }
    line += '"';
    for (char c : f) line += c == '"' ? std::string("\"\"") : std::string(1, c);
    line += '"';
  }
  return line + "\n";
}

bool ParseCsvLine(const std::string& line, std::vector<std::string>& fields) {
  fields.assign(1, "");
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted) {
      if (c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
        fields.back() += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        fields.back() += c;
      }
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      fields.emplace_back();
    } else if (c != '\r') {
      fields.back() += c;
    }
  }
  return !quoted;
}

CsvTable ReadCsvFile(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, 0, "", "cannot open CSV file");
  std::ostringstream text_stream;
  text_stream << in.rdbuf();
  const std::string text = text_stream.str();
  CsvTable table;
  const size_t last_newline = text.rfind('\n');
  table.complete_bytes = last_newline == std::string::npos ? 0 : last_newline + 1;
  table.torn_tail = table.complete_bytes < text.size();
  std::istringstream lines(text.substr(0, table.complete_bytes));
  std::string line;
  int number = 0;
  while (std::getline(lines, line)) {
    ++number;
    std::vector<std::string> fields;
    if (!ParseCsvLine(line, fields)) throw InputError(path, number, "", "unterminated quote");
    if (number == 1) {
      table.header = fields;
      continue;
    }
    if (fields.size() != table.header.size()) {
      throw InputError(path, number, "",
                       "row has " + std::to_string(fields.size()) + " fields, the header " +
                           std::to_string(table.header.size()));
    }
    table.rows.push_back(fields);
  }
  return table;
}

size_t ColumnIndex(const std::vector<std::string>& header, const std::string& column,
                   const std::string& path, const std::string& what) {
  for (size_t i = 0; i < header.size(); ++i) {
    if (header[i] == column) return i;
  }
  const std::string near = NearestKey(column, header);
  throw UsageError(what + ": no column '" + column + "' in " + path +
                   (near.empty() ? "" : "; did you mean '" + near + "'?"));
}

std::string FormatExact(double v) {
  if (!std::isfinite(v)) return "nan";
  char buf[64];
  const auto result = std::to_chars(buf, buf + sizeof buf, v);
  return std::string(buf, result.ptr);
}

std::vector<std::string> MetricsFromRunJson(const nlohmann::json& run) try {
  const double cycles = Number(run, "totals", "cycles");
  const double peak = Number(run, "dram", "peak_bytes_per_second");
  std::vector<std::string> m;
  for (const char* key :
       {"tokens_per_second", "time_to_first_token_seconds", "time_per_output_token_seconds",
        "joules_per_token", "picojoules_per_op", "area_mm2"}) {
    m.push_back(FormatExact(Number(run, "totals", key)));
  }
  m.push_back(FormatExact(MemoryBoundShare(run)));
  m.push_back(FormatExact(peak > 0 ? Number(run, "dram", "bandwidth_bytes_per_second") / peak : 0));
  for (const std::string& key : kStallKeys) {
    m.push_back(FormatExact(cycles > 0 ? Number(run, "stalls", key) / cycles : 0));
  }
  m.push_back(std::to_string(At(run, "totals", "cycles").get<uint64_t>()));
  return m;
} catch (const nlohmann::json::exception& e) {
  throw Error(ExitCode::kBadInput, std::string("run JSON: ") + e.what());
}

}  // namespace tritsim
