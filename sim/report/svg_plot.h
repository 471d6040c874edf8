// A small SVG writer for the report page (report/report_page.h): x-y plots
// with linear or log axes, lines, markers and text, a legend beside the
// plot area (never over an axis label), and stacked horizontal bars.
//
// Output is plain SVG 1.1 text meant to sit inline in an HTML page: no
// scripts, no external references, no fonts beyond the page's. Numbers are
// written by libfmt with a fixed number of digits, so the same input gives
// the same bytes.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "report/svg_style.h"

namespace tritsim {

// Text made safe for HTML and SVG content and attribute values.
std::string HtmlEscape(const std::string& text);

// `v` with `digits` significant digits and an SI prefix when |v| >= 10^4 or
// |v| < 10^-2 ("6476", "8.192 T", "0.5", "12.5 m"); `unit` follows after a
// space when given ("3.6 W", "556.3 µJ"). Infinite or NaN: "-".
std::string SiText(double v, const char* unit = "", int digits = 4);

enum class AxisScale { kLinear, kLog };

struct PlotAxis {
  PlotAxis() = default;
  PlotAxis(std::string words, AxisScale s, double lo, double hi)
      : label(std::move(words)), scale(s), min(lo), max(hi) {}

  std::string label;  // in words with the unit, e.g. "throughput (tokens per second)"
  AxisScale scale = AxisScale::kLinear;
  double min = 0.0, max = 1.0;  // data range shown (log: both > 0)
  // Tick positions; empty: decades (log) or 1-2-5 steps (linear). With
  // `tick_labels` (same length) the ticks are labelled with those words
  // (categories, e.g. DRAM presets placed at 0, 1, 2 ...).
  std::vector<double> ticks;
  std::vector<std::string> tick_labels;
};

struct PlotPoint {
  double x = 0.0, y = 0.0;
};

enum class TextAnchor { kStart, kMiddle, kEnd };

class SvgPlot {
 public:
  // `id` must be unique within the page (it names the clip path).
  SvgPlot(std::string id, std::string title, PlotAxis x, PlotAxis y);

  // A polyline through `points` in data coordinates, clipped to the plot
  // area; `dash` is an SVG stroke-dasharray ("" for solid).
  void Line(const std::vector<PlotPoint>& points, const std::string& color, double width,
            const std::string& dash = "");
  // A marker at `at` with a hover tooltip (an SVG <title>).
  void Marker(PlotPoint at, MarkerShape shape, const std::string& color, const std::string& tooltip,
              bool hollow = false);
  // Text at `at` (data coordinates) shifted by (dx, dy) pixels.
  void Text(PlotPoint at, const std::string& text, const std::string& color, TextAnchor anchor,
            double dx = 0.0, double dy = 0.0);
  // Text along the straight segment from `a` to `b` (data coordinates),
  // rotated to its slope, at fraction `t` of the way (in pixels), a few
  // pixels above the line.
  void LineLabel(PlotPoint a, PlotPoint b, double t, const std::string& text,
                 const std::string& color);
  // A legend row: a marker (when `shape` is given), else a line sample.
  void LegendMarker(const std::string& text, const std::string& color, MarkerShape shape,
                    bool hollow = false);
  void LegendLine(const std::string& text, const std::string& color, const std::string& dash);
  void LegendNote(const std::string& text);  // a plain line of text in the legend column

  // Pixel position of a data coordinate; false when outside the plot area.
  bool Inside(PlotPoint p) const;

  // The complete <svg> element.
  std::string Render() const;

 private:
  double Px(double x) const;
  double Py(double y) const;
  std::string AxisTicks() const;

  std::string id_, title_;
  PlotAxis x_, y_;
  std::string clipped_;    // lines, inside the clip path
  std::string unclipped_;  // markers and text
  std::string legend_;
  int legend_rows_ = 0;
};

// One stacked horizontal bar per row, each segment a share of the row's
// total (the bar spans 100%), labelled with its percent when wide enough;
// the row label names the total. Categories keep their colour in every bar.
struct BarRow {
  std::string label;           // e.g. "prefill"
  std::string total_text;      // e.g. "2.47 M cycles"
  std::vector<double> values;  // one per category, >= 0
};
std::string StackedBars(const std::string& id, const std::string& title,
                        const std::vector<NamedColor>& categories, const std::vector<BarRow>& rows);

}  // namespace tritsim
