// The report page of a sweep. See sweep_page.h.
#include "sweep/sweep_page.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include "common/build_info.h"
#include "report/html_page.h"
#include "report/svg_plot.h"
#include "report/svg_style.h"
#include "sweep/column_words.h"
#include "sweep/pareto.h"
#include "sweep/sweep_plots.h"

namespace tritsim {
namespace {

constexpr size_t kMaxLegendRows = 20;   // legend rows before "... and N more"
constexpr double kLogSpan = 10.0;       // a metric spanning this factor gets a log axis
constexpr double kLinearMargin = 0.08;  // linear metric axes reach 8% of the span past the data
constexpr const char* kOtherPoints = "#b0b0b0";
constexpr const char* kFrontLine = "#333333";

// The metric columns the page plots and tabulates, in table order.
const std::vector<std::string>& TableMetrics() {
  static const std::vector<std::string> kMetrics = {"tokens_per_second",
                                                    "decode_tokens_per_second",
                                                    "prefill_tokens_per_second",
                                                    "joules_per_token",
                                                    "watts",
                                                    "area_mm2",
                                                    "time_to_first_token_seconds",
                                                    "time_per_output_token_seconds",
                                                    "memory_bound_share"};
  return kMetrics;
}

bool IsPowerOfTwo(double v) {
  if (!(v >= 1) || v != std::floor(v) || v > 9.007199254740992e15) return false;
  const auto n = uint64_t(v);
  return (n & (n - 1)) == 0;
}

// A sweep CSV with column lookups by name.
class Sweep {
 public:
  explicit Sweep(const CsvTable& t) : table_(t) {
    for (size_t i = 0; i < t.header.size(); ++i) index_[t.header[i]] = i;
    axes_ = AxisColumnsOf(t);
    for (size_t r = 0; r < t.rows.size(); ++r) {
      if (Cell(r, "status") == kStatusOk) ok_.push_back(r);
    }
    for (const std::string& axis : axes_) {
      if (Values(axis).size() > 1) varying_.push_back(axis);
    }
  }
  bool Has(const std::string& column) const { return index_.count(column) > 0; }
  std::string Cell(size_t row, const std::string& column) const {
    auto it = index_.find(column);
    return it == index_.end() ? "" : table_.rows[row][it->second];
  }
  double Number(size_t row, const std::string& column) const {
    double v = NAN;
    return ParseCsvNumber(Cell(row, column), v) ? v : NAN;
  }
  const std::vector<std::string>& axes() const { return axes_; }
  const std::vector<size_t>& ok() const { return ok_; }
  size_t rows() const { return table_.rows.size(); }
  const CsvTable& table() const { return table_; }

  // The axes with more than one value among the ok rows.
  const std::vector<std::string>& varying() const { return varying_; }
  // "trees=128, batch=4": the row's values of the varying axes, short key names.
  std::string Settings(size_t row, const std::string& skip = "") const {
    std::string s;
    for (const std::string& axis : varying_) {
      if (axis == skip) continue;
      const std::string value = Cell(row, axis);
      s += (s.empty() ? "" : ", ") + axis.substr(axis.rfind('.') + 1) + "=" +
           (value.empty() ? "base" : value);
    }
    return s;
  }
  // The distinct values of `column` over the ok rows, in order of first appearance.
  std::vector<std::string> Values(const std::string& column) const {
    std::vector<std::string> out;
    for (size_t r : ok_) {
      const std::string v = Cell(r, column);
      if (std::find(out.begin(), out.end(), v) == out.end()) out.push_back(v);
    }
    return out;
  }

 private:
  const CsvTable& table_;
  std::map<std::string, size_t> index_;
  std::vector<std::string> axes_;
  std::vector<std::string> varying_;
  std::vector<size_t> ok_;
};

std::string ShortId(const std::string& id) { return id.substr(0, id.find('-')); }

// A metric axis: log when all values are positive and span kLogSpan or
// more, else linear over the values' range.
PlotAxis MetricAxis(const std::string& column, const std::vector<double>& values) {
  double lo = INFINITY, hi = -INFINITY;
  for (double v : values) {
    if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  }
  if (!std::isfinite(lo)) return {ColumnWords(column), AxisScale::kLinear, 0, 1};
  if (lo > 0 && hi / lo >= kLogSpan) {
    return {ColumnWords(column) + ", log scale", AxisScale::kLog,
            std::pow(10.0, std::floor(std::log10(lo / 1.2))),
            std::pow(10.0, std::ceil(std::log10(hi * 1.2)))};
  }
  // Linear: the values' own range with a margin (not from 0, so small
  // differences, e.g. of area, stay visible; the ticks say where it starts).
  const double pad = hi > lo ? (hi - lo) * kLinearMargin : std::max(std::abs(hi), 1.0) * 0.5;
  return {ColumnWords(column), AxisScale::kLinear, lo - pad, hi + pad};
}

// An axis column as a plot axis and each row's position on it: numbers
// (log with a tick per value for powers of two or a wide geometric
// range), else categories in order of first appearance.
struct AxisPlacement {
  PlotAxis axis;
  std::map<std::string, double> position;  // CSV text -> x
};

AxisPlacement PlaceAxis(const Sweep& sweep, const std::string& column) {
  const std::vector<std::string> values = sweep.Values(column);
  std::vector<double> numbers;
  bool numeric = true, powers = true;
  for (const std::string& v : values) {
    double x = 0;
    numeric = numeric && ParseCsvNumber(v, x);
    numbers.push_back(x);
    powers = powers && numeric && IsPowerOfTwo(x);
  }
  AxisPlacement out;
  if (numeric && !numbers.empty()) {
    const double lo = *std::min_element(numbers.begin(), numbers.end());
    const double hi = *std::max_element(numbers.begin(), numbers.end());
    const bool log = lo > 0 && numbers.size() >= 3 && (powers || hi / lo >= 16);
    std::vector<double> ticks = numbers;
    std::sort(ticks.begin(), ticks.end());
    out.axis = {ColumnWords(column) + (log ? ", log scale" : ""),
                log ? AxisScale::kLog : AxisScale::kLinear,
                log ? lo / 1.4 : lo - (hi - lo) * 0.06 - (hi == lo ? 1 : 0),
                log ? hi * 1.4 : hi + (hi - lo) * 0.06 + (hi == lo ? 1 : 0)};
    out.axis.ticks = ticks;
    for (size_t i = 0; i < values.size(); ++i) out.position[values[i]] = numbers[i];
    for (double t : ticks) out.axis.tick_labels.push_back(SiText(t));
    return out;
  }
  out.axis = {ColumnWords(column), AxisScale::kLinear, -0.5, double(values.size()) - 0.5};
  for (size_t i = 0; i < values.size(); ++i) {
    out.position[values[i]] = double(i);
    out.axis.ticks.push_back(double(i));
    out.axis.tick_labels.push_back(values[i].empty() ? "base" : values[i]);
  }
  return out;
}

// ---- Pareto fronts ------------------------------------------------------

struct FrontSpec {
  std::string id;
  std::vector<Objective> objectives;
};

std::string FrontSection(const Sweep& sweep, const FrontSpec& spec, const std::string& source) {
  const ObjectiveRows selected = SelectObjectiveRows(sweep.table(), spec.objectives, source);
  if (selected.rows.empty()) return "";
  std::vector<size_t> front = ParetoFront(selected.values, spec.objectives);
  // Sorted by the first objective, best first (as tritsim sweep --pareto prints).
  const bool max0 = spec.objectives[0].maximize;
  std::stable_sort(front.begin(), front.end(), [&](size_t a, size_t b) {
    return max0 ? selected.values[a][0] > selected.values[b][0]
                : selected.values[a][0] < selected.values[b][0];
  });
  std::vector<double> xs, ys;
  for (const auto& v : selected.values) xs.push_back(v[0]), ys.push_back(v[1]);
  const std::string& xc = spec.objectives[0].column;
  const std::string& yc = spec.objectives[1].column;
  auto direction = [](const Objective& o) { return o.maximize ? "higher" : "lower"; };
  const std::string title =
      "Pareto front: " + ColumnWords(xc).substr(0, ColumnWords(xc).find(" (")) + " vs " +
      ColumnWords(yc).substr(0, ColumnWords(yc).find(" ("));
  SvgPlot plot("front-" + spec.id, title, MetricAxis(xc, xs), MetricAxis(yc, ys));
  std::vector<PlotPoint> line;
  for (size_t f : front) line.push_back({selected.values[f][0], selected.values[f][1]});
  std::vector<PlotPoint> by_x = line;
  std::sort(by_x.begin(), by_x.end(), [](PlotPoint a, PlotPoint b) { return a.x < b.x; });
  plot.Line(by_x, kFrontLine, 1.4, "5 3");
  const std::set<size_t> on_front(front.begin(), front.end());
  for (size_t i = 0; i < selected.rows.size(); ++i) {
    if (on_front.count(i)) continue;
    const size_t r = selected.rows[i];
    plot.Marker({xs[i], ys[i]}, MarkerShape::kCircle, kOtherPoints,
                sweep.Cell(r, "id") + ": " + sweep.Settings(r) + " (dominated)", true);
  }
  plot.LegendMarker("dominated point", kOtherPoints, MarkerShape::kCircle, true);
  plot.LegendLine("Pareto front", kFrontLine, "5 3");
  for (size_t k = 0; k < front.size(); ++k) {
    const size_t i = front[k], r = selected.rows[i];
    const SeriesStyle style = SeriesStyleOf(k);
    const std::string id = sweep.Cell(r, "id");
    plot.Marker({xs[i], ys[i]}, style.shape, style.color,
                id + ": " + sweep.Settings(r) + "; " + SiText(xs[i]) + ", " + SiText(ys[i]));
    plot.Text({xs[i], ys[i]}, ShortId(id), "#222222", TextAnchor::kStart, 7, k % 2 ? 12 : -6);
    if (k < kMaxLegendRows)
      plot.LegendMarker(ShortId(id) + ": " + sweep.Settings(r), style.color, style.shape);
  }
  if (front.size() > kMaxLegendRows)
    plot.LegendNote("... and " + std::to_string(front.size() - kMaxLegendRows) + " more (table)");
  std::string s = "<p class=\"note\">" + std::to_string(front.size()) + " of " +
                  std::to_string(selected.rows.size()) + " ok points are on the front (" +
                  direction(spec.objectives[0]) + " " + HtmlEscape(xc) + " and " +
                  direction(spec.objectives[1]) + " " + HtmlEscape(yc) +
                  " is better; no other point is at least as good in both and better in "
                  "one).</p>\n";
  s += plot.Render();
  std::vector<HtmlColumn> columns = {{"point", "id"}};
  for (const std::string& a : sweep.axes()) columns.push_back({ColumnWords(a), a});
  columns.push_back({ColumnWords(xc), xc});
  columns.push_back({ColumnWords(yc), yc});
  std::vector<std::vector<HtmlCell>> rows;
  for (size_t i : front) {
    const size_t r = selected.rows[i];
    std::vector<HtmlCell> row = {{sweep.Cell(r, "id"), "", ""}};
    for (const std::string& a : sweep.axes()) row.push_back({sweep.Cell(r, a), "", ""});
    row.push_back({SiText(xs[i]), "", "num"});
    row.push_back({SiText(ys[i]), "", "num"});
    rows.push_back(row);
  }
  return s + HtmlTable("front-table-" + spec.id, columns, rows, false);
}

std::string Fronts(const Sweep& sweep, const std::string& source) {
  std::vector<FrontSpec> specs = {
      {"tps-jpt", {{"tokens_per_second", true}, {"joules_per_token", false}}},
      {"tps-area", {{"tokens_per_second", true}, {"area_mm2", false}}}};
  bool decode = false;
  for (size_t r : sweep.ok()) decode = decode || sweep.Number(r, "decode_tokens_per_second") > 0;
  if (decode && sweep.Has("watts"))
    specs.push_back({"decode-watts", {{"decode_tokens_per_second", true}, {"watts", false}}});
  std::string s = "<h2>Pareto fronts</h2>\n";
  for (const FrontSpec& spec : specs) {
    bool have = true;
    for (const Objective& o : spec.objectives) have = have && sweep.Has(o.column);
    if (have) s += FrontSection(sweep, spec, source);
  }
  return s;
}

// ---- metric by axis -----------------------------------------------------

std::string AxisPlot(const Sweep& sweep, const std::string& axis, const std::string& metric) {
  const AxisPlacement place = PlaceAxis(sweep, axis);
  // One series per combination of the other axes' values, in order of first appearance.
  std::vector<std::string> series_names;
  std::map<std::string, std::vector<std::pair<PlotPoint, size_t>>> series;
  std::vector<double> ys;
  for (size_t r : sweep.ok()) {
    const double y = sweep.Number(r, metric);
    if (!std::isfinite(y)) continue;
    const std::string name = sweep.Settings(r, axis);
    if (!series.count(name)) series_names.push_back(name);
    series[name].push_back({{place.position.at(sweep.Cell(r, axis)), y}, r});
    ys.push_back(y);
  }
  if (ys.empty()) return "";
  // Series in the order of the other axes' values (numbers numerically), not
  // the CSV's completion order.
  std::stable_sort(series_names.begin(), series_names.end(),
                   [&](const std::string& a, const std::string& b) {
                     const size_t ra = series[a].front().second, rb = series[b].front().second;
                     for (const std::string& other : sweep.varying()) {
                       if (other == axis) continue;
                       const std::string va = sweep.Cell(ra, other), vb = sweep.Cell(rb, other);
                       double na = 0, nb = 0;
                       if (ParseCsvNumber(va, na) && ParseCsvNumber(vb, nb)) {
                         if (na != nb) return na < nb;
                       } else if (va != vb) {
                         return va < vb;
                       }
                     }
                     return false;
                   });
  const std::string what = ColumnWords(metric).substr(0, ColumnWords(metric).find(" ("));
  const std::string by = ColumnWords(axis).substr(0, ColumnWords(axis).find(" ("));
  SvgPlot plot("axis-" + metric + "-by-" + axis, what + " by " + by, place.axis,
               MetricAxis(metric, ys));
  for (size_t k = 0; k < series_names.size(); ++k) {
    auto points = series[series_names[k]];
    std::stable_sort(points.begin(), points.end(),
                     [](const auto& a, const auto& b) { return a.first.x < b.first.x; });
    const SeriesStyle style = SeriesStyleOf(k);
    std::vector<PlotPoint> line;
    for (const auto& [p, r] : points) {
      line.push_back(p);
      plot.Marker(p, style.shape, style.color,
                  sweep.Cell(r, "id") + ": " + sweep.Settings(r) + "; " + SiText(p.y));
    }
    plot.Line(line, style.color, 1.6);
    const std::string label = series_names[k].empty() ? "all points" : series_names[k];
    if (k < kMaxLegendRows) plot.LegendMarker(label, style.color, style.shape);
  }
  if (series_names.size() > kMaxLegendRows)
    plot.LegendNote("... and " + std::to_string(series_names.size() - kMaxLegendRows) + " more");
  return plot.Render();
}

std::string AxisPlots(const Sweep& sweep) {
  std::string s =
      "<h2>Metrics by axis</h2>\n<p class=\"note\">One line per combination of "
      "the other axes; hover a marker for its point id.</p>\n";
  for (const std::string& axis : sweep.varying()) {
    for (const char* metric : {"tokens_per_second", "joules_per_token"}) {
      if (sweep.Has(metric)) s += AxisPlot(sweep, axis, metric);
    }
  }
  return s;
}

// ---- table and provenance -----------------------------------------------

std::string PointTable(const Sweep& sweep) {
  std::vector<std::string> keys = {"id"};
  keys.insert(keys.end(), sweep.axes().begin(), sweep.axes().end());
  keys.push_back("status");
  for (const std::string& m : TableMetrics()) {
    if (sweep.Has(m)) keys.push_back(m);
  }
  keys.push_back("error");
  std::vector<HtmlColumn> columns;
  for (const std::string& k : keys) {
    columns.push_back({k == "id"                       ? "point"
                       : k == "status" || k == "error" ? k
                                                       : ColumnWords(k),
                       k});
  }
  std::vector<std::vector<HtmlCell>> rows;
  for (size_t r = 0; r < sweep.rows(); ++r) {
    std::vector<HtmlCell> row;
    for (const std::string& k : keys) {
      const std::string text = sweep.Cell(r, k);
      double v = 0;
      const bool metric =
          std::find(TableMetrics().begin(), TableMetrics().end(), k) != TableMetrics().end();
      if (metric && ParseCsvNumber(text, v)) {
        row.push_back(NumberCell(SiText(v), v));
      } else if (ParseCsvNumber(text, v)) {
        row.push_back(NumberCell(text, v));
      } else {
        row.push_back({text, text, ""});
      }
    }
    rows.push_back(row);
  }
  return "<h2>Points</h2>\n<p class=\"note\">Click a column header to sort (again to reverse); "
         "a link ending in <code>#sort=COLUMN</code> or <code>#sort=-COLUMN</code> opens the "
         "table sorted.</p>\n" +
         HtmlTable("points", columns, rows, true);
}

std::string Provenance(const Sweep& sweep, const std::string& source) {
  auto distinct = [&](const std::string& column) {
    std::string out;
    std::set<std::string> seen;
    for (size_t r = 0; r < sweep.rows(); ++r) {
      const std::string v = sweep.Cell(r, column);
      if (seen.insert(v).second) out += (out.empty() ? "" : "; ") + v;
    }
    return out.empty() ? std::string("(not recorded)") : out;
  };
  std::vector<std::vector<HtmlCell>> rows = {
      {{"sweep CSV", "", ""}, {source, "", ""}},
      {{"sweep", "", ""}, {distinct("sweep"), "", ""}},
      {{"tritsim version of the points", "", ""}, {distinct("tritsim_version"), "", ""}},
      {{"workload", "", ""}, {distinct("workload"), "", ""}},
      {{"architecture file hash (FNV-1a 64)", "", ""}, {distinct("arch_file_hash"), "", ""}},
      {{"model file hash (FNV-1a 64)", "", ""}, {distinct("model_file_hash"), "", ""}}};
  return "<h2>Provenance</h2>\n" +
         HtmlTable("provenance", {{"", "what"}, {"", "value"}}, rows, false) +
         "<p class=\"note\">Each ok point's run JSON (column json_path) carries its full "
         "provenance and resolved configuration; <code>tritsim report POINT.json</code> draws "
         "its own page.</p>\n";
}

}  // namespace

bool IsSweepTable(const CsvTable& table) {
  return !table.header.empty() && table.header[0] == "id" &&
         std::find(table.header.begin(), table.header.end(), "status") != table.header.end();
}

std::string SweepReportPage(const CsvTable& table, const std::string& source) {
  const Sweep sweep(table);
  const std::string name = sweep.rows() > 0 && sweep.Has("sweep") ? sweep.Cell(0, "sweep") : source;
  const std::string title = "tritsim sweep: " + name;
  const size_t failed = sweep.rows() - sweep.ok().size();
  std::string body = "<h1>" + HtmlEscape(title) + "</h1>\n<p class=\"sub\">" + HtmlEscape(source) +
                     " &middot; page by tritsim " + BuildVersion() +
                     " &middot; model estimates for architecture exploration, not sign-off "
                     "numbers</p>\n";
  body += "<h2>Headline</h2>\n<div class=\"cards\">\n";
  body += HeadlineCard(
      "h-points", "points", std::to_string(sweep.rows()),
      std::to_string(sweep.ok().size()) + " ok, " + std::to_string(failed) + " failed");
  std::string axes;
  for (const std::string& a : sweep.axes())
    axes += (axes.empty() ? "" : ", ") + a + " (" + std::to_string(sweep.Values(a).size()) + ")";
  body += HeadlineCard("h-axes", "axes (values)", std::to_string(sweep.axes().size()), axes);
  struct Best {
    std::string metric;
    bool maximize;
    const char* si_unit;  // SiText's unit ("J" -> "797 µJ")
    const char* suffix;   // after the number ("12 k tokens/s")
  };
  for (const auto& [metric, maximize, si_unit, suffix] : std::vector<Best>{
           {"tokens_per_second", true, "", " tokens/s"}, {"joules_per_token", false, "J", ""}}) {
    size_t best = SIZE_MAX;
    for (size_t r : sweep.ok()) {
      const double v = sweep.Number(r, metric);
      if (!std::isfinite(v)) continue;
      if (best == SIZE_MAX ||
          (maximize ? v > sweep.Number(best, metric) : v < sweep.Number(best, metric)))
        best = r;
    }
    if (best == SIZE_MAX) continue;
    body += HeadlineCard("h-best-" + metric,
                         (maximize ? "highest " : "lowest ") +
                             ColumnWords(metric).substr(0, ColumnWords(metric).find(" (")),
                         SiText(sweep.Number(best, metric), si_unit) + suffix,
                         sweep.Cell(best, "id") + ": " + sweep.Settings(best));
  }
  body += "</div>\n";
  if (sweep.ok().empty()) {
    body += "<p class=\"note\">No point finished ok: no fronts or plots.</p>\n";
  } else {
    body += Fronts(sweep, source);
    body += AxisPlots(sweep);
  }
  body += PointTable(sweep);
  body += Provenance(sweep, source);
  return HtmlDocument(title, body);
}

}  // namespace tritsim
