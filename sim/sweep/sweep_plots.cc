// Sweep plots. See sweep_plots.h.
#include "sweep/sweep_plots.h"

#include <fcntl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <sstream>

#include "common/error.h"
#include "report/gnuplot.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr double kLogAxisSpan = 10.0;  // an axis spanning this factor or more is drawn log-scale
constexpr int kWidthPx = 800;
constexpr int kHeightPx = 560;

// Text safe inside a gnuplot double-quoted string, in SVG text and file names.
std::string Sanitize(const std::string& text) {
  std::string out;
  for (char c : text) {
    const bool safe = std::isalnum(static_cast<unsigned char>(c)) ||
                      std::string(" _.-+():,=").find(c) != std::string::npos;
    out += safe ? c : '_';
  }
  return out;
}

bool ParseFinite(const std::string& text, double& out) {
  if (text.empty()) return false;
  char* end = nullptr;
  out = std::strtod(text.c_str(), &end);
  return *end == '\0' && std::isfinite(out);
}

std::string Quote(const std::string& s) { return "\"" + Sanitize(s) + "\""; }

Error PlotError(const std::string& dir, const std::string& what) {
  return Error(ExitCode::kBadInput, "--plots " + dir + ": " + what);
}

std::string ScriptHeader(const std::string& name, const std::string& what) {
  std::ostringstream s;
  s << "# " << what << "\n"
    << "# Written by tritsim sweep; reads " << name << ".dat from this directory.\n"
    << "# Restyle freely, then redraw with: gnuplot " << name << ".gp\n"
    << "if (!exists(\"outfile\")) outfile = \"" << name << ".svg\"\n"
    << "set terminal svg size " << kWidthPx << "," << kHeightPx
    << " noenhanced font \"sans,12\" background \"white\"\n"
    << "set output outfile\n"
    << "set termoption noenhanced  # column names such as tokens_per_second are literal\n"
    << "set grid\n"
    << "set key outside right top\n";
  return s.str();
}

std::string AxisLabel(const Objective& o) {
  return Sanitize(o.column) + (o.maximize ? " (higher is better)" : " (lower is better)");
}

// "set logscale" when all values are positive and span kLogAxisSpan or more.
std::string MaybeLog(const char* axis, const std::vector<double>& values) {
  if (values.empty()) return "";
  const auto [lo, hi] = std::minmax_element(values.begin(), values.end());
  return *lo > 0 && *hi / *lo >= kLogAxisSpan ? std::string("set logscale ") + axis + "\n" : "";
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
       << "# " << objectives[0].column << " " << objectives[1].column << " id\n";
  std::vector<double> xs, ys;
  for (size_t i = 0; i < selected.rows.size(); ++i) {
    data << FormatExact(selected.values[i][0]) << ' ' << FormatExact(selected.values[i][1]) << ' '
         << Quote(table.rows[selected.rows[i]][0]) << '\n';
    xs.push_back(selected.values[i][0]);
    ys.push_back(selected.values[i][1]);
  }
  std::vector<size_t> sorted = front;
  std::sort(sorted.begin(), sorted.end(),
            [&](size_t a, size_t b) { return selected.values[a][0] < selected.values[b][0]; });
  data << "\n\n";
  for (size_t i : sorted) {
    data << FormatExact(selected.values[i][0]) << ' ' << FormatExact(selected.values[i][1]) << ' '
         << Quote(table.rows[selected.rows[i]][0]) << '\n';
  }
  std::ostringstream gp;
  gp << ScriptHeader("front", "Sweep points and their Pareto front") << MaybeLog("x", xs)
     << MaybeLog("y", ys) << "set xlabel " << Quote(AxisLabel(objectives[0])) << "\n"
     << "set ylabel " << Quote(AxisLabel(objectives[1])) << "\n"
     << "set title "
     << Quote("Pareto front: " + std::to_string(front.size()) + " of " +
              std::to_string(selected.rows.size()) + " points")
     << "\n"
     << "plot \"front.dat\" index 0 using 1:2 with points pointtype 7 pointsize 0.6 "
        "linecolor rgb \"#9a9a9a\" title \"design points\", \\\n"
     << "     \"front.dat\" index 1 using 1:2 with linespoints pointtype 5 linewidth 2 "
        "linecolor rgb \"#b03a2e\" title \"non-dominated\"\n";
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
        label += (label.empty() ? "" : " ") + axis_keys[k] + "=" + row[1 + k];
    }
    if (label.empty()) label = metric;
    if (!series.count(label)) series_names.push_back(label);
    series[label].push_back({row[axis_col], y});
    axis_values.push_back(row[axis_col]);
    ys.push_back(y);
  }
  const XPlacement place = PlaceAxisValues(axis_values);
  const std::string name = Sanitize(metric) + "-by-" + Sanitize(axis);
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
    data << "# series " << s << ": " << Sanitize(series_names[s]) << "\n";
    for (const auto& [value, y] : pts) {
      data << FormatExact(place.x_of.at(value)) << ' ' << FormatExact(y) << ' ' << Quote(value)
           << '\n';
      xs.push_back(place.x_of.at(value));
    }
    data << "\n\n";
    plot << (s ? ", \\\n     " : "plot ") << "\"" << name << ".dat\" index " << s << " using 1:2"
         << (place.categorical ? ":xticlabels(3)" : "")
         << (lines ? " with linespoints pointtype 7 title " + Quote(series_names[s])
                   : " with points pointtype 7 notitle");
  }
  if (series_names.empty()) throw PlotError(dir, name + ": no ok rows with a value of " + metric);
  std::ostringstream gp;
  gp << ScriptHeader(name, metric + " against " + axis) << "set key below\n"
     << (place.categorical ? "" : MaybeLog("x", xs)) << MaybeLog("y", ys) << "set xlabel "
     << Quote(axis) << "\nset ylabel " << Quote(metric) << "\n"
     << "set title " << Quote(metric + " by " + axis) << "\n"
     << (place.categorical ? "set xrange [-0.5:" + std::to_string(place.order.size()) + "-0.5]\n"
                           : "")
     << plot.str() << "\n";
  RenderGnuplot(dir, name, data.str(), gp.str());
  return name;
}

}  // namespace tritsim
