// Sweep CSV columns, lines and reading. See sweep_csv.h.
#include "sweep/sweep_csv.h"

#include <charconv>
#include <cmath>
#include <functional>
#include <nlohmann/json.hpp>

#include "common/error.h"
#include "config/sweep_file.h"
#include "sweep/sweep_identity.h"

namespace tritsim {
namespace {

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

// `section.key` of the run JSON over `denominator`, 0 when it is not positive.
double ShareOf(const nlohmann::json& run, const char* section, const char* key,
               double denominator) {
  return denominator > 0 ? Number(run, section, key) / denominator : 0.0;
}

// A number of the run JSON's totals, as exact decimal text.
std::string Total(const nlohmann::json& run, const char* key) {
  return FormatExact(Number(run, "totals", key));
}

// Cycles spent in stall category `key` over all cycles.
std::string StallShare(const nlohmann::json& run, const char* key) {
  return FormatExact(ShareOf(run, "stalls", key, Number(run, "totals", "cycles")));
}

std::string DramUtilization(const nlohmann::json& run) {
  const double peak = Number(run, "dram", "peak_bytes_per_second");
  return FormatExact(ShareOf(run, "dram", "bandwidth_bytes_per_second", peak));
}

std::string Cycles(const nlohmann::json& run) {
  return std::to_string(At(run, "totals", "cycles").get<uint64_t>());
}

// `key` of the run's phase `phase`, or 0 when the run has no such phase
// (or, from before phases carried it, no such figure).
std::string PhaseFigure(const nlohmann::json& run, const char* phase, const char* key) {
  if (!run.contains("phases") || !run["phases"].is_array()) return FormatExact(0.0);
  for (const nlohmann::json& p : run["phases"]) {
    if (p.value("name", "") == phase && p.contains(key) && p[key].is_number()) {
      return FormatExact(p[key].get<double>());
    }
  }
  return FormatExact(0.0);
}

// Average power over the whole run: energy / time.
std::string Watts(const nlohmann::json& run) {
  const double seconds = Number(run, "totals", "seconds");
  return FormatExact(seconds > 0 ? Number(run, "totals", "energy_joules") / seconds : 0.0);
}

// One metric column: its CSV name and how its value comes from the run JSON.
struct MetricColumn {
  const char* name;                                      // CSV header (docs/sweeps.md)
  std::function<std::string(const nlohmann::json&)> of;  // value text from a tritsim.run/1 JSON
};

// The one table of metric columns, in CSV order.
const std::vector<MetricColumn>& MetricTable() {
  using J = const nlohmann::json&;
  static const std::vector<MetricColumn> kTable = {
      {"tokens_per_second", [](J r) { return Total(r, "tokens_per_second"); }},
      {"time_to_first_token_seconds", [](J r) { return Total(r, "time_to_first_token_seconds"); }},
      {"time_per_output_token_seconds",
       [](J r) { return Total(r, "time_per_output_token_seconds"); }},
      {"joules_per_token", [](J r) { return Total(r, "joules_per_token"); }},
      {"picojoules_per_op", [](J r) { return Total(r, "picojoules_per_op"); }},
      {"area_mm2", [](J r) { return Total(r, "area_mm2"); }},
      {"memory_bound_share", [](J r) { return FormatExact(MemoryBoundShare(r)); }},
      {"dram_bandwidth_utilization", DramUtilization},
      {"busy_share", [](J r) { return StallShare(r, "busy"); }},
      {"dram_wait_share", [](J r) { return StallShare(r, "dram_wait"); }},
      {"sram_conflict_share", [](J r) { return StallShare(r, "sram_conflict"); }},
      {"vector_wait_share", [](J r) { return StallShare(r, "vector_wait"); }},
      {"idle_share", [](J r) { return StallShare(r, "idle"); }},
      {"cycles", Cycles},
      {"prefill_tokens_per_second",
       [](J r) { return PhaseFigure(r, "prefill", "tokens_per_second"); }},
      {"decode_tokens_per_second",
       [](J r) { return PhaseFigure(r, "decode", "tokens_per_second"); }},
      {"decode_joules_per_token", [](J r) { return PhaseFigure(r, "decode", "joules_per_token"); }},
      {"watts", Watts},
  };
  return kTable;
}

}  // namespace

const std::vector<std::string>& MetricColumns() {
  static const std::vector<std::string> kColumns = [] {
    std::vector<std::string> names;
    for (const MetricColumn& column : MetricTable()) names.push_back(column.name);
    return names;
  }();
  return kColumns;
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
  std::vector<std::string> m;
  for (const MetricColumn& column : MetricTable()) m.push_back(column.of(run));
  return m;
} catch (const nlohmann::json::exception& e) {
  throw Error(ExitCode::kBadInput, std::string("run JSON: ") + e.what());
}

}  // namespace tritsim
