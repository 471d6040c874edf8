// The report page of one run. See run_page.h.
#include "report/run_page.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <map>
#include <nlohmann/json.hpp>
#include <vector>

#include "common/build_info.h"
#include "common/error.h"
#include "report/html_page.h"
#include "report/svg_plot.h"
#include "report/svg_style.h"

namespace tritsim {
namespace {

using nlohmann::json;

constexpr size_t kTopOps = 12;         // rows of the top-ops table
constexpr double kRangeMargin = 2.0;   // roofline axes reach this factor past the data
constexpr double kMaxDecadesY = 9.0;   // the roofline's y axis spans at most this many decades
constexpr size_t kNoteLineChars = 38;  // legend note line length
constexpr double kSlopeLabelAt[] = {0.3, 0.55, 0.8};  // where along each slope its label sits

// Reads figures out of the run JSON, naming the source and key on error.
class RunView {
 public:
  RunView(const json& run, const std::string& source) : run_(run), source_(source) {}

  const json& Section(const char* key) const {
    if (!run_.contains(key)) throw InputError(source_, 0, key, "missing from the run JSON");
    return run_[key];
  }
  const json& Member(const json& object, const std::string& where, const std::string& key) const {
    if (!object.is_object() || !object.contains(key))
      throw InputError(source_, 0, where + "." + key, "missing from the run JSON");
    return object[key];
  }
  double Number(const json& object, const std::string& where, const std::string& key) const {
    const json& v = Member(object, where, key);
    if (!v.is_number()) throw InputError(source_, 0, where + "." + key, "expected a number");
    return v.get<double>();
  }
  // A number that older run JSONs lack: NaN when absent.
  static double Optional(const json& object, const std::string& key) {
    if (!object.is_object() || !object.contains(key) || !object[key].is_number()) return NAN;
    return object[key].get<double>();
  }
  std::string Text(const json& object, const std::string& where, const std::string& key) const {
    const json& v = Member(object, where, key);
    if (!v.is_string()) throw InputError(source_, 0, where + "." + key, "expected a string");
    return v.get<std::string>();
  }
  const std::string& source() const { return source_; }

 private:
  const json& run_;
  const std::string& source_;
};

std::string ResourceWords(const std::string& key) {
  for (const NamedColor& r : kResourceColors) {
    if (key == r.key) return r.words;
  }
  return key;
}

// The op class of a layer: GEMMs by weight tensor, other ops by kind (the
// labels of the gnuplot roofline, report/plots.h OpClassLabel).
std::string OpClass(const RunView& v, const json& layer) {
  const std::string kind = v.Text(layer, "layers[]", "kind");
  const std::string tensor = v.Text(layer, "layers[]", "tensor");
  return kind == "gemm" && tensor != "none" ? kind + " " + tensor : kind;
}

// A right-aligned number cell of a table that is not sorted.
HtmlCell NumCell(const std::string& text) { return {text, "", "num"}; }

std::string Percent(double share) { return fmt::format("{:.1f}%", share * 100); }

std::string Tokens(double v) { return SiText(v) + " tokens/s"; }

// ---- headline ---------------------------------------------------------

std::string Headline(const RunView& v, const json& phases, const json& totals) {
  std::string s = "<h2>Headline</h2>\n";
  for (const json& p : phases) {
    const std::string name = v.Text(p, "phases[]", "name");
    s += "<h3>" + HtmlEscape(name) + "</h3>\n<div class=\"cards\">\n";
    s += HeadlineCard("h-" + name + "-tokens_per_second", name + " throughput",
                      Tokens(v.Number(p, "phases[]", "tokens_per_second")),
                      SiText(v.Number(p, "phases[]", "tokens")) + " tokens in " +
                          SiText(v.Number(p, "phases[]", "seconds"), "s"));
    s += HeadlineCard("h-" + name + "-joules_per_token", name + " energy per token",
                      SiText(v.Number(p, "phases[]", "joules_per_token"), "J"),
                      SiText(v.Number(p, "phases[]", "joules"), "J") + " in the phase");
    s += HeadlineCard("h-" + name + "-watts", name + " average power",
                      SiText(v.Number(p, "phases[]", "watts"), "W"), "joules / seconds");
    const std::string bound = v.Text(p, "phases[]", "bound_by");
    s += HeadlineCard("h-" + name + "-bound_by", name + " bound by", bound,
                      ResourceWords(bound) + " sets the phase's floor");
    s += "</div>\n";
  }
  s += "<h3>whole run</h3>\n<div class=\"cards\">\n";
  s += HeadlineCard("h-run-tokens_per_second", "throughput, whole run",
                    Tokens(v.Number(totals, "totals", "tokens_per_second")),
                    "generated tokens / run time, prefill included");
  s += HeadlineCard("h-run-joules_per_token", "energy per generated token",
                    SiText(v.Number(totals, "totals", "joules_per_token"), "J"),
                    SiText(v.Number(totals, "totals", "energy_joules"), "J") + " in all");
  const double seconds = v.Number(totals, "totals", "seconds");
  s += HeadlineCard(
      "h-run-watts", "average power, whole run",
      SiText(seconds > 0 ? v.Number(totals, "totals", "energy_joules") / seconds : 0.0, "W"),
      "energy / run time");
  s += HeadlineCard("h-run-ttft", "time to first token",
                    SiText(v.Number(totals, "totals", "time_to_first_token_seconds"), "s"),
                    "start to the first generated token");
  s += HeadlineCard("h-run-area", "area",
                    SiText(v.Number(totals, "totals", "area_mm2")) + " mm\u00b2",
                    "estimated, all blocks");
  return s + "</div>\n";
}

// ---- per-phase table ----------------------------------------------------

std::string PhaseTable(const RunView& v, const json& phases) {
  const std::vector<HtmlColumn> columns = {{"phase", "name"},
                                           {"core cycles", "cycles"},
                                           {"time", "seconds"},
                                           {"tokens", "tokens"},
                                           {"throughput (tokens/s)", "tokens_per_second"},
                                           {"energy", "joules"},
                                           {"energy per token", "joules_per_token"},
                                           {"average power", "watts"},
                                           {"binding resource", "bound_by"},
                                           {"its cycles at peak", "bound_cycles"},
                                           {"share of the phase at that floor", "bound_share"}};
  std::vector<std::vector<HtmlCell>> rows;
  for (const json& p : phases) {
    const double cycles = v.Number(p, "phases[]", "cycles");
    const double bound = v.Number(p, "phases[]", "bound_cycles");
    const std::string by = v.Text(p, "phases[]", "bound_by");
    rows.push_back({{v.Text(p, "phases[]", "name"), "", ""},
                    NumCell(fmt::format("{}", uint64_t(cycles))),
                    NumCell(SiText(v.Number(p, "phases[]", "seconds"), "s")),
                    NumCell(SiText(v.Number(p, "phases[]", "tokens"))),
                    NumCell(SiText(v.Number(p, "phases[]", "tokens_per_second"))),
                    NumCell(SiText(v.Number(p, "phases[]", "joules"), "J")),
                    NumCell(SiText(v.Number(p, "phases[]", "joules_per_token"), "J")),
                    NumCell(SiText(v.Number(p, "phases[]", "watts"), "W")),
                    {by + " (" + ResourceWords(by) + ")", "", ""},
                    NumCell(fmt::format("{}", uint64_t(bound))),
                    NumCell(Percent(cycles > 0 ? bound / cycles : 0.0))});
  }
  return "<h2>Phases</h2>\n" + HtmlTable("phase-table", columns, rows, false) +
         "<p class=\"note\">The binding resource is the one whose peak rate needs the most cycles "
         "for the phase's work (docs/engine.md, \"Every resource is a ceiling\"); the last "
         "column is those cycles over the phase's cycles: 100% would be running at that "
         "ceiling.</p>\n";
}

// ---- stall and energy bars ---------------------------------------------

template <size_t N>
std::vector<double> Values(const json& object, const std::array<NamedColor, N>& categories) {
  std::vector<double> out;
  for (const NamedColor& c : categories) out.push_back(RunView::Optional(object, c.key));
  return out;
}

template <size_t N>
std::vector<NamedColor> Categories(const std::array<NamedColor, N>& categories) {
  return {categories.begin(), categories.end()};
}

bool AllFinite(const std::vector<double>& values) {
  return std::all_of(values.begin(), values.end(), [](double x) { return std::isfinite(x); });
}

double Sum(const std::vector<double>& values) {
  double s = 0;
  for (double x : values) s += x;
  return s;
}

std::string Breakdowns(const RunView& v, const json& phases) {
  std::vector<BarRow> stalls, energy;
  bool per_phase = true;
  for (const json& p : phases) {
    const std::string name = v.Text(p, "phases[]", "name");
    const std::vector<double> st =
        p.contains("stalls") ? Values(p["stalls"], kStallColors) : std::vector<double>{NAN};
    const std::vector<double> en =
        p.contains("energy") ? Values(p["energy"], kEnergyColors) : std::vector<double>{NAN};
    if (!AllFinite(st) || !AllFinite(en)) {
      per_phase = false;
      continue;
    }
    stalls.push_back({name, SiText(Sum(st)) + " cycles", st});
    energy.push_back({name, SiText(Sum(en), "J"), en});
  }
  const std::vector<double> st = Values(v.Section("stalls"), kStallColors);
  const std::vector<double> en = Values(v.Section("energy"), kEnergyColors);
  if (AllFinite(st)) stalls.push_back({"whole run", SiText(Sum(st)) + " cycles", st});
  if (AllFinite(en)) energy.push_back({"whole run", SiText(Sum(en), "J"), en});
  std::string s = "<h2>Where the cycles and the energy go</h2>\n";
  s += StackedBars("stalls", "Tree array cycles by cause, per phase", Categories(kStallColors),
                   stalls);
  s += StackedBars("energy", "Energy by component, per phase", Categories(kEnergyColors), energy);
  s += "<p class=\"note\">Every core cycle is charged to one cause on the tree array's "
       "timeline. A phase's energy is its ops' own energy plus its share (by cycles) of the "
       "energy no op carries: leakage, DRAM activates and refreshes.";
  if (!per_phase) {
    s += " This run JSON has no per-phase stalls or energy (written by an older tritsim): "
         "only the whole run is shown.";
  }
  return s + "</p>\n";
}

// ---- roofline -----------------------------------------------------------

struct ClassPoint {
  std::string label;
  double ops = 0, dram_bytes = 0, cycles = 0;
  std::map<std::string, double> cycles_by_bound;  // binding resource -> cycles
  double intensity() const { return dram_bytes > 0 ? ops / dram_bytes : NAN; }
  std::string bound_by() const {
    std::string best;
    double most = -1;
    for (const auto& [key, c] : cycles_by_bound) {
      if (c > most) most = c, best = key;
    }
    return best;
  }
};

// The op classes of one phase, in kOpClassStyles order (unknown ones last).
std::vector<ClassPoint> PhaseClasses(const RunView& v, const json& layers,
                                     const std::string& phase) {
  std::map<std::string, ClassPoint> by_label;
  for (const json& layer : layers) {
    if (v.Text(layer, "layers[]", "phase") != phase) continue;
    const std::string label = OpClass(v, layer);
    ClassPoint& c = by_label[label];
    c.label = label;
    c.ops += v.Number(layer, "layers[]", "ops");
    c.dram_bytes += v.Number(layer, "layers[]", "dram_bytes");
    const double cycles = v.Number(layer, "layers[]", "cycles");
    c.cycles += cycles;
    c.cycles_by_bound[v.Text(layer, "layers[]", "bound_by")] += cycles;
  }
  std::vector<ClassPoint> out;
  for (const OpClassStyle& style : kOpClassStyles) {
    auto it = by_label.find(style.label);
    if (it == by_label.end()) continue;
    out.push_back(it->second);
    by_label.erase(it);
  }
  for (auto& [label, c] : by_label) out.push_back(c);
  return out;
}

struct Ceiling {
  std::string key;    // resource key (plot_style.h kResourceColors)
  double rate = 0;    // ops/s (flat) or bytes/s (slanted)
  bool flat = false;  // a compute peak: ops/s whatever the intensity
  std::string dash;
};

std::vector<Ceiling> Ceilings(const RunView& v, const json& arch) {
  std::vector<Ceiling> out = {
      {"tree_array", v.Number(arch, "arch", "peak_ops_per_second"), true, ""},
      {"vector_unit", RunView::Optional(arch, "vector_peak_ops_per_second"), true, "8 3"},
      {"dram_bandwidth", v.Number(arch, "arch", "dram_peak_bytes_per_second"), false, ""},
      {"request_concurrency", RunView::Optional(arch, "concurrency_bytes_per_second"), false,
       "3 3"},
      {"trit_decoder", RunView::Optional(arch, "decoder_bytes_per_second"), false, "10 3 2 3"}};
  out.erase(std::remove_if(out.begin(), out.end(),
                           [](const Ceiling& c) { return !(std::isfinite(c.rate) && c.rate > 0); }),
            out.end());
  return out;
}

double DecadeBelow(double v) { return std::pow(10.0, std::floor(std::log10(v))); }
double DecadeAbove(double v) { return std::pow(10.0, std::ceil(std::log10(v))); }

const char* ColorOf(const std::string& resource) {
  for (const NamedColor& r : kResourceColors) {
    if (resource == r.key) return r.color;
  }
  return "#000000";
}

// Splits `words` into lines of about kNoteLineChars for the legend column.
std::vector<std::string> NoteLines(const std::string& head, const std::vector<std::string>& words) {
  std::vector<std::string> lines = {head};
  std::string line;
  for (size_t i = 0; i < words.size(); ++i) {
    const std::string item = words[i] + (i + 1 < words.size() ? "," : "");
    if (!line.empty() && line.size() + item.size() + 1 > kNoteLineChars) {
      lines.push_back(line);
      line.clear();
    }
    line += (line.empty() ? "" : " ") + item;
  }
  if (!line.empty()) lines.push_back(line);
  return lines;
}

std::string Roofline(const std::string& phase, const std::vector<ClassPoint>& classes,
                     const std::vector<Ceiling>& ceilings, double hz) {
  std::vector<const ClassPoint*> drawn;
  std::vector<std::string> undrawn;
  double x_lo = INFINITY, x_hi = 0, y_lo = INFINITY, y_hi = 0;
  for (const ClassPoint& c : classes) {
    const double x = c.intensity(), y = c.cycles > 0 ? c.ops / (c.cycles / hz) : NAN;
    if (!(std::isfinite(x) && x > 0 && std::isfinite(y) && y > 0)) {
      undrawn.push_back(c.label);
      continue;
    }
    drawn.push_back(&c);
    x_lo = std::min(x_lo, x), x_hi = std::max(x_hi, x);
    y_lo = std::min(y_lo, y), y_hi = std::max(y_hi, y);
  }
  double flat_top = 0, flat_low = INFINITY;
  for (const Ceiling& c : ceilings) {
    if (c.flat) flat_top = std::max(flat_top, c.rate), flat_low = std::min(flat_low, c.rate);
  }
  for (const Ceiling& c : ceilings) {  // every ridge point (where a slope meets a peak)
    if (c.flat) continue;
    x_lo = std::min(x_lo, flat_low / c.rate), x_hi = std::max(x_hi, flat_top / c.rate);
  }
  y_hi = std::max(y_hi, flat_top);
  if (!std::isfinite(y_lo)) y_lo = flat_top / 1e3;
  PlotAxis x{"operational intensity (ops per DRAM byte)", AxisScale::kLog,
             DecadeBelow(x_lo / kRangeMargin), DecadeAbove(x_hi * kRangeMargin)};
  const double y_max = DecadeAbove(y_hi * kRangeMargin);
  PlotAxis y{"achieved throughput (ops per second)", AxisScale::kLog,
             std::max(DecadeBelow(y_lo / kRangeMargin), y_max / std::pow(10.0, kMaxDecadesY)),
             y_max};
  SvgPlot plot("roofline-" + phase, "Roofline, " + phase + " (one marker per op class)", x, y);
  int slanted = 0;
  for (const Ceiling& c : ceilings) {
    const std::string color = ColorOf(c.key);
    std::string text =
        ResourceWords(c.key) + ": " + (c.flat ? SiText(c.rate, "op/s") : SiText(c.rate, "B/s"));
    if (c.key == "trit_decoder") text += " of packed weights";
    if (c.flat) {
      plot.Line({{x.min, c.rate}, {x.max, c.rate}}, color, 1.8, c.dash);
      plot.Text({x.min, c.rate}, ResourceWords(c.key), color, TextAnchor::kStart, 4, -5);
    } else {
      plot.Line({{x.min, c.rate * x.min}, {x.max, c.rate * x.max}}, color, 1.8, c.dash);
      // Labelled along the part of the line inside the plot, each slope at
      // another place along it so the labels do not overlap.
      const double lo = std::max(x.min, y.min / c.rate), hi = std::min(x.max, y.max / c.rate);
      if (lo < hi) {
        plot.LineLabel({lo, c.rate * lo}, {hi, c.rate * hi}, kSlopeLabelAt[slanted % 3],
                       ResourceWords(c.key), color);
      }
      ++slanted;
    }
    plot.LegendLine(text, color, c.dash);
  }
  plot.LegendNote("scratchpad ports: no line (on-chip");
  plot.LegendNote("accesses, not DRAM bytes)");
  for (const ClassPoint* c : drawn) {
    const OpClassStyle style = OpClassStyleOf(c->label);
    const double xi = c->intensity(), yi = c->ops / (c->cycles / hz);
    plot.Marker({xi, yi}, style.shape, style.color,
                c->label + " (" + phase + "): " + SiText(xi, "op/B") + ", " + SiText(yi, "op/s") +
                    ", bound by " + c->bound_by());
    plot.LegendMarker(c->label, style.color, style.shape);
  }
  if (!undrawn.empty()) {
    for (const std::string& line : NoteLines("not drawn (no DRAM bytes or no ops):", undrawn))
      plot.LegendNote(line);
  }
  return plot.Render();
}

std::string ClassTable(const std::string& phase, const std::vector<ClassPoint>& classes,
                       double hz) {
  double phase_cycles = 0;
  for (const ClassPoint& c : classes) phase_cycles += c.cycles;
  const std::vector<HtmlColumn> columns = {{"op class", "class"},
                                           {"share of the phase's op cycles", "cycle_share"},
                                           {"ops", "ops"},
                                           {"DRAM bytes", "dram_bytes"},
                                           {"intensity (op/B)", "intensity_ops_per_byte"},
                                           {"achieved (op/s)", "ops_per_second"},
                                           {"bound by (most cycles)", "bound_by"}};
  std::vector<std::vector<HtmlCell>> rows;
  for (const ClassPoint& c : classes) {
    const double achieved = c.cycles > 0 ? c.ops / (c.cycles / hz) : NAN;
    rows.push_back({{c.label, "", ""},
                    NumCell(Percent(phase_cycles > 0 ? c.cycles / phase_cycles : 0)),
                    NumCell(SiText(c.ops)),
                    NumCell(SiText(c.dram_bytes)),
                    NumCell(SiText(c.intensity())),
                    NumCell(SiText(achieved)),
                    {c.bound_by(), "", ""}});
  }
  return HtmlTable("classes-" + phase, columns, rows, false);
}

std::string Rooflines(const RunView& v, const json& phases, const json& layers) {
  const double mhz = v.Number(v.Section("design"), "design", "core_mhz");
  const double hz = mhz * 1e6;
  const std::vector<Ceiling> ceilings = Ceilings(v, v.Section("arch"));
  std::string s =
      "<h2>Roofline per phase</h2>\n<p class=\"note\">Each marker is one op class (its ops "
      "over its DRAM bytes and its cycles in the phase); a class keeps its marker in every "
      "run. Lines are the design's ceilings: flat for compute peaks, sloped for byte rates "
      "(Williams, Waterman and Patterson, CACM 2009). The trit decoder's line assumes every "
      "DRAM byte is a packed weight, true of GEMMs that stream weights.</p>\n";
  for (const json& p : phases) {
    const std::string name = v.Text(p, "phases[]", "name");
    const std::vector<ClassPoint> classes = PhaseClasses(v, layers, name);
    s += Roofline(name, classes, ceilings, hz);
    s += ClassTable(name, classes, hz);
  }
  return s;
}

// ---- top ops ------------------------------------------------------------

std::string TopOps(const RunView& v, const json& layers, double run_cycles) {
  std::vector<size_t> order(layers.size());
  for (size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    return v.Number(layers[a], "layers[]", "cycles") > v.Number(layers[b], "layers[]", "cycles");
  });
  if (order.size() > kTopOps) order.resize(kTopOps);
  const std::vector<HtmlColumn> columns = {{"phase", "phase"},
                                           {"layer", "layer"},
                                           {"op", "name"},
                                           {"class", "class"},
                                           {"core cycles", "cycles"},
                                           {"share of the run", "cycle_share"},
                                           {"intensity (op/B)", "intensity_ops_per_byte"},
                                           {"bound by", "bound_by"},
                                           {"at its floor", "roofline_efficiency"},
                                           {"energy", "energy_joules"}};
  std::vector<std::vector<HtmlCell>> rows;
  for (size_t i : order) {
    const json& l = layers[i];
    const double cycles = v.Number(l, "layers[]", "cycles");
    rows.push_back({{v.Text(l, "layers[]", "phase"), "", ""},
                    NumCell(fmt::format("{}", int64_t(v.Number(l, "layers[]", "layer")))),
                    {v.Text(l, "layers[]", "name"), "", ""},
                    {OpClass(v, l), "", ""},
                    NumCell(fmt::format("{}", uint64_t(cycles))),
                    NumCell(Percent(run_cycles > 0 ? cycles / run_cycles : 0)),
                    NumCell(SiText(v.Number(l, "layers[]", "intensity_ops_per_byte"))),
                    {v.Text(l, "layers[]", "bound_by"), "", ""},
                    NumCell(Percent(v.Number(l, "layers[]", "roofline_efficiency"))),
                    NumCell(SiText(v.Number(l, "layers[]", "energy_joules"), "J"))});
  }
  return "<h2>Top ops by cycles</h2>\n" + HtmlTable("top-ops", columns, rows, false) +
         "<p class=\"note\">One row per op of the trace, its instances (one per step) summed; "
         "\"at its floor\" is its binding resource's cycles over its cycles.</p>\n";
}

// ---- provenance ---------------------------------------------------------

// Shell-style quoting of one argument, so the command reads as typed.
std::string ShellWord(const std::string& word) {
  if (!word.empty() && word.find_first_not_of("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
                                              "0123456789-_./=:,+@%") == std::string::npos)
    return word;
  std::string out = "'";
  for (char c : word) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return out + "'";
}

void Flatten(const json& value, const std::string& prefix,
             std::vector<std::pair<std::string, std::string>>& out) {
  if (value.is_object() && !value.empty()) {
    for (auto it = value.begin(); it != value.end(); ++it)
      Flatten(it.value(), prefix.empty() ? it.key() : prefix + "." + it.key(), out);
    return;
  }
  out.emplace_back(prefix, value.is_string() ? value.get<std::string>() : value.dump());
}

std::string Provenance(const RunView& v, const json& run) {
  std::string s = "<h2>Provenance</h2>\n";
  const json empty = json::object();
  const json& prov = run.contains("provenance") ? run["provenance"] : empty;
  std::string command;
  if (prov.contains("command") && prov["command"].is_array()) {
    for (const json& word : prov["command"])
      command += (command.empty() ? "" : " ") +
                 ShellWord(word.is_string() ? word.get<std::string>() : word.dump());
  }
  auto text = [&](const char* key) {
    return prov.contains(key) && prov[key].is_string() ? prov[key].get<std::string>()
                                                       : std::string("(not recorded)");
  };
  const json& design = v.Section("design");
  const json& workload = v.Section("workload");
  std::vector<std::vector<HtmlCell>> rows = {
      {{"run JSON", "", ""}, {v.source(), "", ""}},
      {{"tritsim version", "", ""}, {text("version"), "", ""}},
      {{"commit", "", ""}, {text("commit"), "", ""}},
      {{"command", "", ""}, {command.empty() ? "(not recorded)" : command, "", ""}},
      {{"design", "", ""},
       {v.Text(design, "design", "arch") + " at " + SiText(v.Number(design, "design", "core_mhz")) +
            " MHz" +
            (design.value("weights_resident", false) ? ", weights resident (what-if)" : ""),
        "", ""}},
      {{"model", "", ""},
       {design.contains("model") && design["model"].is_string() ? design["model"].get<std::string>()
                                                                : "(replayed trace)",
        "", ""}},
      {{"workload", "", ""},
       {fmt::format("prefill {}, decode {}, context {}, batch {}", workload.value("prefill", 0),
                    workload.value("decode", 0), workload.value("context", 0),
                    workload.value("batch", 0)),
        "", ""}}};
  s += HtmlTable("provenance", {{"", "what"}, {"", "value"}}, rows, false);
  if (run.contains("resolved")) {
    std::vector<std::pair<std::string, std::string>> keys;
    Flatten(run["resolved"], "", keys);
    std::vector<std::vector<HtmlCell>> resolved;
    for (const auto& [key, value] : keys) resolved.push_back({{key, "", ""}, {value, "", ""}});
    s += "<details open><summary>Resolved configuration (" + std::to_string(keys.size()) +
         " keys, after presets and --set; <code>tritsim run --from-report</code> re-runs it)"
         "</summary>\n" +
         HtmlTable("resolved", {{"key", "key"}, {"value", "value"}}, resolved, false) +
         "</details>\n";
  } else {
    s += "<p class=\"note\">This run JSON has no resolved section (written by an older "
         "tritsim).</p>\n";
  }
  return s;
}

}  // namespace

std::string RunReportPage(const json& run, const std::string& source) {
  const RunView v(run, source);
  const json& design = v.Section("design");
  const json& phases = v.Section("phases");
  const json& layers = v.Section("layers");
  const json& totals = v.Section("totals");
  if (!phases.is_array()) throw InputError(source, 0, "phases", "expected an array");
  if (!layers.is_array()) throw InputError(source, 0, "layers", "expected an array");
  const std::string model = design.contains("model") && design["model"].is_string()
                                ? design["model"].get<std::string>()
                                : "a replayed trace";
  const std::string arch = v.Text(design, "design", "arch");
  const std::string title = "tritsim run: " + model + " on " + arch;
  std::string body = "<h1>" + HtmlEscape(title) + "</h1>\n<p class=\"sub\">" + HtmlEscape(source) +
                     " &middot; page by tritsim " + BuildVersion() +
                     " &middot; model estimates for architecture exploration, not sign-off "
                     "numbers</p>\n";
  body += Headline(v, phases, totals);
  body += PhaseTable(v, phases);
  body += Breakdowns(v, phases);
  body += Rooflines(v, phases, layers);
  body += TopOps(v, layers, v.Number(totals, "totals", "cycles"));
  body += Provenance(v, run);
  return HtmlDocument(title, body);
}

}  // namespace tritsim
