// Sweep plots. See sweep_plots.h.
#include "sweep/sweep_plots.h"

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <sstream>

#include <fmt/core.h>

#include "common/error.h"
#include "report/gnuplot.h"
#include "report/plot_style.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr int kWidthPx = 1100;
constexpr int kFrontTableChars = 58;  // right margin of the front plot, characters
constexpr int kHeightPx = 600;

// Text safe in a file name: as in a gnuplot string, with / % < > * ' made '_'.
std::string FileNamePart(const std::string& text) {
  std::string out = GnuplotText(text);
  for (char& c : out) {
    if (std::string("/%<>*'").find(c) != std::string::npos) c = '_';
  }
  return out;
}

bool ParseFinite(const std::string& text, double& out) {
  if (text.empty()) return false;
  char* end = nullptr;
  out = std::strtod(text.c_str(), &end);
  return *end == '\0' && std::isfinite(out);
}

std::string Quote(const std::string& s) { return "\"" + GnuplotText(s) + "\""; }

Error PlotError(const std::string& dir, const std::string& what) {
  return Error(ExitCode::kBadInput, "--plots " + dir + ": " + what);
}

std::string ScriptHeader(const std::string& name, const std::string& what) {
  return GnuplotHeader(name, what, "tritsim sweep", kWidthPx, kHeightPx) + "set grid\n";
}

std::string ObjectiveLabel(const Objective& o) {
  return AxisTitle(WordsFor(o.column)) + (o.maximize ? ", higher is better" : ", lower is better");
}

// A point's short id: its plan index ("p0007" of "p0007-ca10f02a").
std::string ShortId(const std::string& id) { return id.substr(0, id.find('-')); }

// A point's axis values in words: "128 trees, 2048 KiB SRAM".
std::string AxisValuesInWords(const CsvTable& table, const std::vector<std::string>& row) {
  std::string words;
  const std::vector<std::string> axes = AxisColumnsOf(table);
  for (size_t k = 0; k < axes.size(); ++k) {
    if (!row[1 + k].empty()) words += (words.empty() ? "" : ", ") + ValueWords(axes[k], row[1 + k]);
  }
  return words;
}

constexpr size_t kMaxTableRows = 24;  // front points listed beside the plot

// The table of front points right of the plot, best first in the first
// objective: "p0018  256 trees, 2048 KiB SRAM: 7077, 0.831".
std::string FrontTable(const CsvTable& table, const std::vector<Objective>& objectives,
                       const ObjectiveRows& selected, const std::vector<size_t>& sorted) {
  const AxisWords wx = WordsFor(objectives[0].column), wy = WordsFor(objectives[1].column);
  std::ostringstream s;
  const auto line = [&s](size_t n, const std::string& text) {
    s << "set label " << n + 1 << " " << Quote(text) << " at graph 1.03, graph "
      << PlotNumber(1.0 - 0.042 * double(n)) << " left font \",9\"\n";
  };
  line(0, "Pareto front (" + AxisTitle(wx) + "; " + AxisTitle(wy) + "):");
  size_t n = 1;
  for (auto it = sorted.rbegin(); it != sorted.rend(); ++it, ++n) {
    if (n > kMaxTableRows) {
      line(n, "... " + std::to_string(sorted.size() - kMaxTableRows) + " more in the CSV");
      break;
    }
    const std::vector<std::string>& row = table.rows[selected.rows[*it]];
    line(n, ShortId(row[0]) + "  " + AxisValuesInWords(table, row) + ": " +
                fmt::format("{:.4g}; {:.4g}", selected.values[*it][0] * wx.scale,
                            selected.values[*it][1] * wy.scale));
  }
  return s.str();
}

// The values of one objective or metric on its display scale.
std::vector<double> Scaled(const std::vector<double>& values, double scale) {
  std::vector<double> out;
  for (double v : values) out.push_back(v * scale);
  return out;
}

}  // namespace

std::vector<std::string> AxisColumnsOf(const CsvTable& table) {
  std::vector<std::string> axes;
  for (size_t i = 1; i < table.header.size() && table.header[i] != "status"; ++i) {
    axes.push_back(table.header[i]);
  }
  return axes;
}

void WriteFrontPlot(const std::string& dir, const CsvTable& table,
                    const std::vector<Objective>& objectives, const ObjectiveRows& selected,
                    const std::vector<size_t>& front) {
  std::ostringstream data;
  data << "# tritsim sweep: ok points (block 0) and Pareto front (block 1)\n"
       << "# " << objectives[0].column << " " << objectives[1].column << " id label\n";
  std::vector<double> xs, ys;
  for (size_t i = 0; i < selected.rows.size(); ++i) {
    data << FormatExact(selected.values[i][0]) << ' ' << FormatExact(selected.values[i][1]) << ' '
         << Quote(table.rows[selected.rows[i]][0]) << ' '
         << Quote(ShortId(table.rows[selected.rows[i]][0])) << '\n';
    xs.push_back(selected.values[i][0]);
    ys.push_back(selected.values[i][1]);
  }
  std::vector<size_t> sorted = front;
  std::sort(sorted.begin(), sorted.end(),
            [&](size_t a, size_t b) { return selected.values[a][0] < selected.values[b][0]; });
  data << "\n\n";
  for (size_t i : sorted) {
    data << FormatExact(selected.values[i][0]) << ' ' << FormatExact(selected.values[i][1]) << ' '
         << Quote(table.rows[selected.rows[i]][0]) << ' '
         << Quote(ShortId(table.rows[selected.rows[i]][0])) << '\n';
  }
  const AxisWords wx = WordsFor(objectives[0].column), wy = WordsFor(objectives[1].column);
  const std::string using_xy =
      "using ($1*" + PlotNumber(wx.scale) + "):($2*" + PlotNumber(wy.scale) + ")";
  std::ostringstream gp;
  const std::vector<double> sx = Scaled(xs, wx.scale), sy = Scaled(ys, wy.scale);
  const PlotStyle front_style = SeriesStyle(1);
  gp << ScriptHeader("front", "Sweep points and their Pareto front")
     << GnuplotScale("x", ScaleFor(sx) == AxisScale::kLog2 ? AxisScale::kLog10 : ScaleFor(sx), sx)
     << GnuplotScale("y", ScaleFor(sy) == AxisScale::kLog2 ? AxisScale::kLog10 : ScaleFor(sy), sy)
     << "set xlabel " << Quote(ObjectiveLabel(objectives[0])) << "\n"
     << "set ylabel " << Quote(ObjectiveLabel(objectives[1])) << "\n"
     << "set title "
     << Quote("Pareto front: " + std::to_string(front.size()) + " of " +
              std::to_string(selected.rows.size()) + " points" +
              (objectives.size() > 2 ? " (non-dominated in all three objectives)" : ""))
     << "\n"
     << "set key inside left top box opaque\n"
     << "set offsets graph 0.02, graph 0.06, 0, 0  # end points off the border\n"
     << "set rmargin " << kFrontTableChars << "  # room for the table of front points\n"
     << FrontTable(table, objectives, selected, sorted) << "plot \"front.dat\" index 0 " << using_xy
     << " with points pointtype 7 pointsize 0.7 linecolor rgb \"#9a9a9a\" title \"design "
        "points\", \\\n"
     << "     \"front.dat\" index 1 " << using_xy << " with linespoints linewidth 2 pointsize 1.3 "
     << GnuplotStyle(front_style) << " title \"non-dominated (Pareto front)\", \\\n"
     << "     \"front.dat\" index 1 " << using_xy
     << ":4 with labels left offset 0.8,-0.6 font \",9\" textcolor rgb \"" << front_style.colour
     << "\" notitle\n";
  RenderGnuplot(dir, "front", data.str(), gp.str());
}

namespace {

// x positions of the axis values: the numbers, or 0, 1, 2 ... in order of
// first appearance when any value is not a number.
struct XPlacement {
  std::map<std::string, double> x_of;
  bool categorical = false;
  std::vector<std::string> order;
};

XPlacement PlaceAxisValues(const std::vector<std::string>& values) {
  XPlacement p;
  for (const std::string& v : values) {
    if (std::find(p.order.begin(), p.order.end(), v) == p.order.end()) p.order.push_back(v);
  }
  for (const std::string& v : p.order) {
    double x = 0;
    p.categorical = p.categorical || !ParseFinite(v, x);
    p.x_of[v] = x;
  }
  if (p.categorical) {
    for (size_t i = 0; i < p.order.size(); ++i) p.x_of[p.order[i]] = double(i);
  }
  return p;
}

// The key's title: the other axis in words when there is one, else "series".
std::string KeyTitle(const std::vector<std::string>& axis_keys, const std::string& axis) {
  std::vector<std::string> others;
  for (const std::string& k : axis_keys) {
    if (k != axis) others.push_back(k);
  }
  return others.size() == 1 ? AxisTitle(WordsFor(others[0])) : "series";
}

}  // namespace

std::string WriteAxisPlot(const std::string& dir, const CsvTable& table,
                          const std::vector<std::string>& axis_keys, const std::string& axis,
                          const std::string& metric, const std::string& csv_path) {
  const size_t axis_col = ColumnIndex(table.header, axis, csv_path, "--plot-axis");
  const size_t metric_col = ColumnIndex(table.header, metric, csv_path, "--metric");
  const size_t status_col = ColumnIndex(table.header, "status", csv_path, "--plots");
  // Series: one per combination of the other axes' values, in row order.
  std::vector<std::string> series_names;
  std::map<std::string, std::vector<std::pair<std::string, double>>> series;
  std::vector<std::string> axis_values;
  std::vector<double> ys;
  // Rows in point order (ids start with the zero-padded plan index), so
  // series and legend follow the sweep file, not completion order.
  std::vector<std::vector<std::string>> rows = table.rows;
  std::stable_sort(rows.begin(), rows.end(),
                   [](const auto& x, const auto& y) { return x[0] < y[0]; });
  for (const std::vector<std::string>& row : rows) {
    double y = 0;
    if (row[status_col] != kStatusOk || !ParseFinite(row[metric_col], y)) continue;
    std::string label;
    for (size_t k = 0; k < axis_keys.size(); ++k) {
      if (axis_keys[k] != axis)
        label += (label.empty() ? "" : ", ") + ValueWords(axis_keys[k], row[1 + k]);
    }
    if (label.empty()) label = AxisTitle(WordsFor(metric));
    if (!series.count(label)) series_names.push_back(label);
    series[label].push_back({row[axis_col], y});
    axis_values.push_back(row[axis_col]);
    ys.push_back(y);
  }
  const XPlacement place = PlaceAxisValues(axis_values);
  const std::string name = FileNamePart(metric) + "-by-" + FileNamePart(axis);
  const AxisWords wx = WordsFor(axis), wy = WordsFor(metric);
  std::ostringstream data, plot;
  data << "# tritsim sweep: " << metric << " against " << axis << ", one block per series\n"
       << "# x " << metric << " axis_value\n";
  std::vector<double> xs;
  const bool lines = series_names.size() <= kMaxSeries;
  for (size_t s = 0; s < series_names.size(); ++s) {
    std::vector<std::pair<std::string, double>> pts = series[series_names[s]];
    std::stable_sort(pts.begin(), pts.end(), [&](const auto& a, const auto& b) {
      return place.x_of.at(a.first) < place.x_of.at(b.first);
    });
    data << "# series " << s << ": " << GnuplotText(series_names[s]) << "\n";
    for (const auto& [value, y] : pts) {
      data << FormatExact(place.x_of.at(value)) << ' ' << FormatExact(y) << ' ' << Quote(value)
           << '\n';
      xs.push_back(place.x_of.at(value));
    }
    data << "\n\n";
    plot << (s ? ", \\\n     " : "plot ") << "\"" << name << ".dat\" index " << s << " using 1:($2*"
         << PlotNumber(wy.scale) << ")" << (place.categorical ? ":xticlabels(3)" : "")
         << (lines ? " with linespoints linewidth 1.5 pointsize 1.2 " : " with points ")
         << GnuplotStyle(SeriesStyle(s))
         << (lines ? " title " + Quote(series_names[s]) : std::string(" notitle"));
  }
  if (series_names.empty()) throw PlotError(dir, name + ": no ok rows with a value of " + metric);
  std::ostringstream gp;
  const std::vector<double> sy = Scaled(ys, wy.scale);
  const AxisScale y_scale = ScaleFor(sy) == AxisScale::kLog2 ? AxisScale::kLog10 : ScaleFor(sy);
  gp << ScriptHeader(name, metric + " against " + axis)
     << "set key outside right top vertical title " << Quote(lines ? KeyTitle(axis_keys, axis) : "")
     << "\n"
     << (place.categorical ? "" : GnuplotScale("x", ScaleFor(xs), xs))
     << GnuplotScale("y", y_scale, sy) << "set xlabel " << Quote(AxisTitle(wx)) << "\nset ylabel "
     << Quote(AxisTitle(wy)) << "\n"
     << "set title " << Quote(wy.words + " by " + wx.words) << "\n"
     << (place.categorical ? "set xrange [-0.5:" + std::to_string(place.order.size()) + "-0.5]\n"
                           : "")
     << plot.str() << "\n";
  RenderGnuplot(dir, name, data.str(), gp.str());
  return name;
}

}  // namespace tritsim
