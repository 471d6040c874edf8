// Study table. See study_table.h.
#include "study/study_table.h"

#include <fmt/core.h>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

#include "common/error.h"
#include "sweep/sweep_csv.h"

namespace tritsim {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr int kCellWidth = 22;   // console: one variant column
constexpr int kLabelWidth = 34;  // console: figure and unit

// Indices into StudyFigures(); the order of the list below.
enum Fig : size_t {
  kPrefillTps,
  kDecodeTps,
  kTtft,
  kTpot,
  kJoulesPerToken,
  kJoulesPerDecodeToken,
  kWatts,
  kWeightBytes,
  kKvBytes,
  kMemoryBytes,
  kArea,
  kFigureCount
};

const nlohmann::json& Need(const nlohmann::json& j, const std::string& section,
                           const std::string& key) {
  if (!j.contains(section) || !j[section].is_object() || !j[section].contains(key) ||
      !j[section][key].is_number()) {
    throw Error(ExitCode::kBadInput, "run JSON lacks " + section + "." + key);
  }
  return j[section][key];
}

double Total(const nlohmann::json& run, const std::string& key) {
  return Need(run, "totals", key).get<double>();
}

// The phase named `name` of phases[], or nullptr.
const nlohmann::json* Phase(const nlohmann::json& run, const std::string& name) {
  if (!run.contains("phases") || !run["phases"].is_array()) {
    throw Error(ExitCode::kBadInput, "run JSON lacks phases");
  }
  for (const nlohmann::json& p : run["phases"]) {
    if (p.value("name", "") == name) return &p;
  }
  return nullptr;
}

double PhaseNumber(const nlohmann::json* phase, const char* key) {
  if (!phase || !phase->contains(key) || !(*phase)[key].is_number()) return kNaN;
  return (*phase)[key].get<double>();
}

// phases[].bound_by as text ("-" when the run JSON has none).
std::string BoundBy(const nlohmann::json* phase) {
  if (!phase || !phase->contains("bound_by")) return "-";
  const nlohmann::json& b = (*phase)["bound_by"];
  return b.is_string() ? b.get<std::string>() : b.dump();
}

// Sum of layers[].energy_joules, of one phase or ("") of all.
double LayerJoules(const nlohmann::json& run, const std::string& phase) {
  if (!run.contains("layers") || !run["layers"].is_array()) {
    throw Error(ExitCode::kBadInput, "run JSON lacks layers");
  }
  double sum = 0;
  for (const nlohmann::json& layer : run["layers"]) {
    if (phase.empty() || layer.value("phase", "") == phase)
      sum += layer.value("energy_joules", 0.0);
  }
  return sum;
}

// Joules per decode token: the decode layers' own energy plus the energy no
// layer carries (leakage, refresh) shared by the decode phase's time.
double JoulesPerDecodeToken(const nlohmann::json& run, const nlohmann::json* decode) {
  const double tokens = PhaseNumber(decode, "tokens");
  const double seconds = PhaseNumber(decode, "seconds");
  const double run_seconds = Total(run, "seconds");
  if (!(tokens > 0) || !(run_seconds > 0)) return kNaN;
  const double shared = Total(run, "energy_joules") - LayerJoules(run, "");
  return (LayerJoules(run, "decode") + shared * seconds / run_seconds) / tokens;
}

double Positive(double v) { return v > 0 ? v : kNaN; }

std::string Cell(double v) {
  if (std::isnan(v)) return "-";
  return fmt::format("{:.4g}", v);
}

std::string Csv(double v) { return std::isnan(v) ? "" : FormatExact(v); }

nlohmann::ordered_json JsonNumber(double v) {
  return std::isnan(v) ? nlohmann::ordered_json() : nlohmann::ordered_json(v);
}

std::string Pad(const std::string& s, int width) {
  return s.size() >= size_t(width) ? s + " " : s + std::string(size_t(width) - s.size(), ' ');
}

}  // namespace

const std::vector<StudyFigure>& StudyFigures() {
  static const std::vector<StudyFigure> figures = {
      {"prefill_tokens_per_second", "tok/s", true},
      {"decode_tokens_per_second", "tok/s", true},
      {"time_to_first_token_seconds", "s", false},
      {"time_per_output_token_seconds", "s", false},
      {"joules_per_token", "J", false},
      {"joules_per_decode_token", "J", false},
      {"watts", "W", false},
      {"weight_bytes", "B", false},
      {"kv_bytes", "B", false},
      {"memory_bytes", "B", false},
      {"area_mm2", "mm2", false},
  };
  return figures;
}

StudyRow RowFromRunJson(const nlohmann::json& run, const VariantFacts& facts) {
  const nlohmann::json* prefill = Phase(run, "prefill");
  const nlohmann::json* decode = Phase(run, "decode");
  StudyRow row;
  row.model = facts.model_name;
  row.arch = facts.arch_name;
  row.figures.assign(kFigureCount, kNaN);
  row.figures[kPrefillTps] = PhaseNumber(prefill, "tokens_per_second");
  row.figures[kDecodeTps] = PhaseNumber(decode, "tokens_per_second");
  row.figures[kTtft] = Positive(Total(run, "time_to_first_token_seconds"));
  row.figures[kTpot] = Positive(Total(run, "time_per_output_token_seconds"));
  row.figures[kJoulesPerToken] = Positive(Total(run, "joules_per_token"));
  row.figures[kJoulesPerDecodeToken] = JoulesPerDecodeToken(run, decode);
  row.figures[kWatts] = Positive(Total(run, "energy_joules") / Total(run, "seconds"));
  row.figures[kWeightBytes] = facts.weight_bytes;
  row.figures[kKvBytes] = facts.kv_bytes;
  row.figures[kMemoryBytes] = facts.weight_bytes + facts.kv_bytes;
  row.figures[kArea] = Total(run, "area_mm2");
  row.prefill_bound_by = BoundBy(prefill);
  row.decode_bound_by = BoundBy(decode);
  return row;
}

StudyTable BuildStudyTable(const StudyPlan& plan, const std::vector<nlohmann::json>& runs) {
  StudyTable table;
  table.study = plan.file.name;
  table.reference = plan.file.reference;
  for (size_t i = 0; i < runs.size(); ++i) {
    table.rows.push_back(RowFromRunJson(runs[i], plan.facts[i]));
    table.rows.back().variant = plan.file.variants[i].name;
  }
  const StudyRow& ref = table.rows[plan.file.reference_index];
  for (StudyRow& row : table.rows) {
    for (size_t f = 0; f < row.figures.size(); ++f) {
      const double base = ref.figures[f];
      row.ratios.push_back(base > 0 ? row.figures[f] / base : kNaN);
    }
  }
  return table;
}

std::string StudyTableCsv(const StudyTable& table) {
  std::vector<std::string> header = {"variant", "model", "arch", "reference"};
  for (const StudyFigure& f : StudyFigures()) header.push_back(f.key);
  header.insert(header.end(), {"prefill_bound_by", "decode_bound_by"});
  for (const StudyFigure& f : StudyFigures()) header.push_back(std::string("ratio_") + f.key);
  std::string out = CsvLine(header);
  for (const StudyRow& r : table.rows) {
    std::vector<std::string> line = {r.variant, r.model, r.arch,
                                     r.variant == table.reference ? "yes" : "no"};
    for (double v : r.figures) line.push_back(Csv(v));
    line.insert(line.end(), {r.prefill_bound_by, r.decode_bound_by});
    for (double v : r.ratios) line.push_back(Csv(v));
    out += CsvLine(line);
  }
  return out;
}

std::string StudyTableJson(const StudyTable& table) {
  nlohmann::ordered_json j;
  j["schema"] = "tritsim.study/1";
  j["study"] = table.study;
  j["reference"] = table.reference;
  nlohmann::ordered_json variants = nlohmann::ordered_json::array();
  for (const StudyRow& r : table.rows) {
    nlohmann::ordered_json figures, ratios;
    for (size_t f = 0; f < r.figures.size(); ++f) {
      figures[StudyFigures()[f].key] = JsonNumber(r.figures[f]);
      ratios[StudyFigures()[f].key] = JsonNumber(r.ratios[f]);
    }
    variants.push_back(
        {{"name", r.variant},
         {"model", r.model},
         {"arch", r.arch},
         {"figures", figures},
         {"ratios", ratios},
         {"bound_by", {{"prefill", r.prefill_bound_by}, {"decode", r.decode_bound_by}}}});
  }
  j["variants"] = variants;
  return j.dump(2) + "\n";
}

std::string StudyTableText(const StudyTable& table) {
  std::ostringstream out;
  out << "study " << table.study << ": each cell is value (ratio to " << table.reference << ")\n"
      << Pad("figure [unit]", kLabelWidth);
  for (const StudyRow& r : table.rows) out << Pad(r.variant, kCellWidth);
  out << "\n";
  for (size_t f = 0; f < StudyFigures().size(); ++f) {
    const StudyFigure& fig = StudyFigures()[f];
    out << Pad(std::string(fig.key) + " [" + fig.unit + "]", kLabelWidth);
    for (const StudyRow& r : table.rows) {
      out << Pad(Cell(r.figures[f]) + " (" + Cell(r.ratios[f]) + "x)", kCellWidth);
    }
    out << "\n";
  }
  out << Pad("prefill_bound_by", kLabelWidth);
  for (const StudyRow& r : table.rows) out << Pad(r.prefill_bound_by, kCellWidth);
  out << "\n" << Pad("decode_bound_by", kLabelWidth);
  for (const StudyRow& r : table.rows) out << Pad(r.decode_bound_by, kCellWidth);
  out << "\n";
  return out.str();
}

}  // namespace tritsim
