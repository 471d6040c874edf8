// The report page's SVG writer. See svg_plot.h.
#include "report/svg_plot.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

namespace tritsim {
namespace {

// Layout, in pixels: the plot area, then a legend column on its right.
constexpr double kWidth = 900;
constexpr double kMinHeight = 430;
constexpr double kLeft = 86, kTop = 38, kRight = 540, kBottom = 364;
constexpr double kLegendX = 560, kLegendY = 46, kLegendRow = 17;
constexpr double kMarkerRadius = 5;
constexpr int kLinearTickTarget = 5;  // about this many linear ticks
constexpr double kRelativeSlack = 1e-9;

std::string Coord(double v) { return fmt::format("{:.1f}", v); }

const char* AnchorName(TextAnchor a) {
  switch (a) {
    case TextAnchor::kStart:
      return "start";
    case TextAnchor::kMiddle:
      return "middle";
    case TextAnchor::kEnd:
      return "end";
  }
  return "start";
}

double ToAxis(const PlotAxis& a, double v) {
  return a.scale == AxisScale::kLog ? std::log10(v) : v;
}

std::vector<double> AutoTicks(const PlotAxis& a) {
  std::vector<double> ticks;
  if (a.scale == AxisScale::kLog) {
    const int lo = int(std::floor(std::log10(a.min))), hi = int(std::ceil(std::log10(a.max)));
    for (int k = lo; k <= hi; ++k) {
      const double v = std::pow(10.0, k);
      if (v >= a.min * (1 - kRelativeSlack) && v <= a.max * (1 + kRelativeSlack))
        ticks.push_back(v);
    }
    if (ticks.size() < 2) {  // less than a decade shown: 1-2-5 within it
      ticks.clear();
      for (int k = lo; k <= hi; ++k) {
        for (double m : {1.0, 2.0, 5.0}) {
          const double v = m * std::pow(10.0, k);
          if (v >= a.min * (1 - kRelativeSlack) && v <= a.max * (1 + kRelativeSlack))
            ticks.push_back(v);
        }
      }
    }
    return ticks;
  }
  const double span = a.max - a.min;
  if (!(span > 0)) return {a.min};
  const double raw = span / kLinearTickTarget;
  const double decade = std::pow(10.0, std::floor(std::log10(raw)));
  double step = decade;
  for (double m : {1.0, 2.0, 5.0, 10.0}) {
    if (m * decade >= raw) {
      step = m * decade;
      break;
    }
  }
  for (double v = std::ceil(a.min / step - kRelativeSlack) * step; v <= a.max + step * 1e-6;
       v += step) {
    ticks.push_back(std::abs(v) < step * 1e-9 ? 0.0 : v);
  }
  return ticks;
}

std::string MarkerShapeSvg(double x, double y, MarkerShape shape, double r) {
  auto poly = [](std::initializer_list<std::pair<double, double>> pts) {
    std::string s = "<polygon points=\"";
    bool first = true;
    for (const auto& [px, py] : pts) {
      s += (first ? "" : " ") + Coord(px) + "," + Coord(py);
      first = false;
    }
    return s + "\"";
  };
  switch (shape) {
    case MarkerShape::kCircle:
      return "<circle cx=\"" + Coord(x) + "\" cy=\"" + Coord(y) + "\" r=\"" + Coord(r) + "\"";
    case MarkerShape::kSquare:
      return "<rect x=\"" + Coord(x - r * 0.9) + "\" y=\"" + Coord(y - r * 0.9) + "\" width=\"" +
             Coord(r * 1.8) + "\" height=\"" + Coord(r * 1.8) + "\"";
    case MarkerShape::kTriangle:
      return poly({{x, y - r * 1.2}, {x - r * 1.1, y + r * 0.8}, {x + r * 1.1, y + r * 0.8}});
    case MarkerShape::kDiamond:
      return poly({{x, y - r * 1.3}, {x + r * 1.1, y}, {x, y + r * 1.3}, {x - r * 1.1, y}});
    case MarkerShape::kTriangleDown:
      return poly({{x, y + r * 1.2}, {x - r * 1.1, y - r * 0.8}, {x + r * 1.1, y - r * 0.8}});
  }
  return "";
}

std::string MarkerSvg(double x, double y, MarkerShape shape, const std::string& color, bool hollow,
                      const std::string& tooltip) {
  std::string s = MarkerShapeSvg(x, y, shape, kMarkerRadius) + " fill=\"" +
                  (hollow ? std::string("#ffffff") : color) + "\" stroke=\"" +
                  (hollow ? color : std::string("#222222")) + "\" stroke-width=\"" +
                  (hollow ? "1.6" : "0.7") + "\"";
  if (tooltip.empty()) return s + "/>\n";
  return s + "><title>" + HtmlEscape(tooltip) + "</title>" +
         (shape == MarkerShape::kCircle   ? "</circle>\n"
          : shape == MarkerShape::kSquare ? "</rect>\n"
                                          : "</polygon>\n");
}

std::string TextSvg(double x, double y, const std::string& text, const std::string& color,
                    TextAnchor anchor, const std::string& extra = "") {
  return "<text x=\"" + Coord(x) + "\" y=\"" + Coord(y) + "\" fill=\"" + color +
         "\" text-anchor=\"" + AnchorName(anchor) + "\"" + extra + ">" + HtmlEscape(text) +
         "</text>\n";
}

// Black or white, whichever reads better on `hex` ("#rrggbb"): relative
// luminance by the sRGB weights of ITU-R BT.709 (0.2126, 0.7152, 0.0722),
// without gamma (common practice for a text-colour choice).
const char* TextColorOn(const std::string& hex) {
  if (hex.size() != 7) return "#111111";
  const double r = std::stoi(hex.substr(1, 2), nullptr, 16),
               g = std::stoi(hex.substr(3, 2), nullptr, 16),
               b = std::stoi(hex.substr(5, 2), nullptr, 16);
  return (0.2126 * r + 0.7152 * g + 0.0722 * b) / 255.0 < 0.45 ? "#ffffff" : "#111111";
}

}  // namespace

std::string HtmlEscape(const std::string& text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

std::string SiText(double v, const char* unit, int digits) {
  if (!std::isfinite(v)) return "-";
  static const char* const kUp[] = {"", "k", "M", "G", "T", "P", "E"};
  static const char* const kDown[] = {"", "m", "\u00b5", "n", "p", "f"};
  const std::string space = unit[0] ? " " : "";
  const double mag = std::abs(v);
  if (mag == 0 || (mag >= 1e-2 && mag < 1e4)) {
    return fmt::format("{:.{}g}", v, digits) + space + unit;
  }
  int k = int(std::floor(std::log10(mag) / 3));
  k = std::clamp(k, -5, 6);
  double scaled = v / std::pow(1000.0, k);
  // Rounding can carry to 1000 (999.96 k at 4 digits): move up a prefix.
  if (std::abs(std::stod(fmt::format("{:.{}g}", scaled, digits))) >= 1000 && k < 6) {
    ++k;
    scaled = v / std::pow(1000.0, k);
  }
  const char* prefix = k >= 0 ? kUp[k] : kDown[-k];
  return fmt::format("{:.{}g}", scaled, digits) + " " + prefix + unit;
}

SvgPlot::SvgPlot(std::string id, std::string title, PlotAxis x, PlotAxis y)
    : id_(std::move(id)), title_(std::move(title)), x_(std::move(x)), y_(std::move(y)) {
  for (PlotAxis* a : {&x_, &y_}) {
    if (a->scale == AxisScale::kLog) {
      a->min = a->min > 0 ? a->min : 1e-9;
      a->max = a->max > a->min ? a->max : a->min * 10;
    } else if (!(a->max > a->min)) {
      a->min -= 0.5;
      a->max += 0.5;
    }
  }
}

double SvgPlot::Px(double x) const {
  const double t = (ToAxis(x_, x) - ToAxis(x_, x_.min)) / (ToAxis(x_, x_.max) - ToAxis(x_, x_.min));
  return kLeft + t * (kRight - kLeft);
}

double SvgPlot::Py(double y) const {
  const double t = (ToAxis(y_, y) - ToAxis(y_, y_.min)) / (ToAxis(y_, y_.max) - ToAxis(y_, y_.min));
  return kBottom - t * (kBottom - kTop);
}

bool SvgPlot::Inside(PlotPoint p) const {
  const double slack = 1e-9;
  auto within = [slack](const PlotAxis& a, double v) {
    if (!std::isfinite(v) || (a.scale == AxisScale::kLog && v <= 0)) return false;
    return v >= a.min * (1 - slack) - slack && v <= a.max * (1 + slack) + slack;
  };
  return within(x_, p.x) && within(y_, p.y);
}

void SvgPlot::Line(const std::vector<PlotPoint>& points, const std::string& color, double width,
                   const std::string& dash) {
  std::string pts;
  for (const PlotPoint& p : points) {
    if (!std::isfinite(p.x) || !std::isfinite(p.y)) continue;
    if ((x_.scale == AxisScale::kLog && p.x <= 0) || (y_.scale == AxisScale::kLog && p.y <= 0))
      continue;
    pts += (pts.empty() ? "" : " ") + Coord(Px(p.x)) + "," + Coord(Py(p.y));
  }
  if (pts.empty()) return;
  clipped_ += "<polyline points=\"" + pts + "\" fill=\"none\" stroke=\"" + color +
              "\" stroke-width=\"" + fmt::format("{:.1f}", width) + "\"" +
              (dash.empty() ? "" : " stroke-dasharray=\"" + dash + "\"") + "/>\n";
}

void SvgPlot::Marker(PlotPoint at, MarkerShape shape, const std::string& color,
                     const std::string& tooltip, bool hollow) {
  if (!Inside(at)) return;
  unclipped_ += MarkerSvg(Px(at.x), Py(at.y), shape, color, hollow, tooltip);
}

void SvgPlot::Text(PlotPoint at, const std::string& text, const std::string& color,
                   TextAnchor anchor, double dx, double dy) {
  if (!Inside(at)) return;
  unclipped_ += TextSvg(Px(at.x) + dx, Py(at.y) + dy, text, color, anchor, " class=\"pl\"");
}

void SvgPlot::LineLabel(PlotPoint a, PlotPoint b, double t, const std::string& text,
                        const std::string& color) {
  if (!Inside(a) || !Inside(b)) return;
  const double ax = Px(a.x), ay = Py(a.y), bx = Px(b.x), by = Py(b.y);
  const double x = ax + t * (bx - ax), y = ay + t * (by - ay);
  const double degrees = std::atan2(by - ay, bx - ax) * 180.0 / M_PI;
  unclipped_ += "<text transform=\"translate(" + Coord(x) + " " + Coord(y) + ") rotate(" +
                Coord(degrees) + ")\" y=\"-4\" fill=\"" + color +
                "\" text-anchor=\"middle\" class=\"pl\">" + HtmlEscape(text) + "</text>\n";
}

void SvgPlot::LegendMarker(const std::string& text, const std::string& color, MarkerShape shape,
                           bool hollow) {
  const double y = kLegendY + kLegendRow * legend_rows_++;
  legend_ += MarkerSvg(kLegendX + 8, y - 4, shape, color, hollow, "");
  legend_ += TextSvg(kLegendX + 22, y, text, "#222222", TextAnchor::kStart);
}

void SvgPlot::LegendLine(const std::string& text, const std::string& color,
                         const std::string& dash) {
  const double y = kLegendY + kLegendRow * legend_rows_++;
  legend_ += "<line x1=\"" + Coord(kLegendX) + "\" y1=\"" + Coord(y - 4) + "\" x2=\"" +
             Coord(kLegendX + 16) + "\" y2=\"" + Coord(y - 4) + "\" stroke=\"" + color +
             "\" stroke-width=\"2\"" + (dash.empty() ? "" : " stroke-dasharray=\"" + dash + "\"") +
             "/>\n";
  legend_ += TextSvg(kLegendX + 22, y, text, "#222222", TextAnchor::kStart);
}

void SvgPlot::LegendNote(const std::string& text) {
  const double y = kLegendY + kLegendRow * legend_rows_++;
  legend_ += TextSvg(kLegendX, y, text, "#555555", TextAnchor::kStart, " font-style=\"italic\"");
}

std::string SvgPlot::AxisTicks() const {
  std::string s;
  const std::vector<double> xt = x_.ticks.empty() ? AutoTicks(x_) : x_.ticks;
  for (size_t i = 0; i < xt.size(); ++i) {
    if (!Inside({xt[i], y_.min})) continue;
    const double px = Px(xt[i]);
    const std::string text = i < x_.tick_labels.size() ? x_.tick_labels[i] : SiText(xt[i]);
    s += "<line x1=\"" + Coord(px) + "\" y1=\"" + Coord(kTop) + "\" x2=\"" + Coord(px) +
         "\" y2=\"" + Coord(kBottom) + "\" class=\"grid\"/>\n";
    s += TextSvg(px, kBottom + 16, text, "#333333", TextAnchor::kMiddle);
  }
  const std::vector<double> yt = y_.ticks.empty() ? AutoTicks(y_) : y_.ticks;
  for (size_t i = 0; i < yt.size(); ++i) {
    if (!Inside({x_.min, yt[i]})) continue;
    const double py = Py(yt[i]);
    const std::string text = i < y_.tick_labels.size() ? y_.tick_labels[i] : SiText(yt[i]);
    s += "<line x1=\"" + Coord(kLeft) + "\" y1=\"" + Coord(py) + "\" x2=\"" + Coord(kRight) +
         "\" y2=\"" + Coord(py) + "\" class=\"grid\"/>\n";
    s += TextSvg(kLeft - 6, py + 4, text, "#333333", TextAnchor::kEnd);
  }
  return s;
}

std::string SvgPlot::Render() const {
  const double height = std::max(kMinHeight, kLegendY + kLegendRow * legend_rows_ + 8);
  const std::string clip = id_ + "-clip";
  std::string s = "<svg id=\"" + HtmlEscape(id_) +
                  "\" class=\"plot\" xmlns=\"http://www.w3.org/2000/svg\" width=\"" +
                  Coord(kWidth) + "\" height=\"" + Coord(height) + "\" viewBox=\"0 0 " +
                  Coord(kWidth) + " " + Coord(height) + "\" role=\"img\" aria-label=\"" +
                  HtmlEscape(title_) + "\">\n";
  s += "<defs><clipPath id=\"" + HtmlEscape(clip) + "\"><rect x=\"" + Coord(kLeft) + "\" y=\"" +
       Coord(kTop) + "\" width=\"" + Coord(kRight - kLeft) + "\" height=\"" +
       Coord(kBottom - kTop) + "\"/></clipPath></defs>\n";
  s += TextSvg(kLeft, 22, title_, "#111111", TextAnchor::kStart, " class=\"pt\"");
  s += AxisTicks();
  s += "<rect x=\"" + Coord(kLeft) + "\" y=\"" + Coord(kTop) + "\" width=\"" +
       Coord(kRight - kLeft) + "\" height=\"" + Coord(kBottom - kTop) +
       "\" fill=\"none\" stroke=\"#444444\"/>\n";
  s += TextSvg((kLeft + kRight) / 2, kBottom + 40, x_.label, "#111111", TextAnchor::kMiddle);
  const double ymid = (kTop + kBottom) / 2;
  s += TextSvg(18, ymid, y_.label, "#111111", TextAnchor::kMiddle,
               " transform=\"rotate(-90 18 " + Coord(ymid) + ")\"");
  s += "<g clip-path=\"url(#" + HtmlEscape(clip) + ")\">\n" + clipped_ + "</g>\n";
  s += unclipped_;
  s += legend_;
  return s + "</svg>\n";
}

std::string StackedBars(const std::string& id, const std::string& title,
                        const std::vector<NamedColor>& categories,
                        const std::vector<BarRow>& rows) {
  constexpr double kBarLeft = 110, kBarWidth = 520, kRowHeight = 34, kBarHeight = 22;
  constexpr double kFirstRow = 38, kMinLabelShare = 0.07;  // label a segment from 7% up
  const double legend_top = kFirstRow + kRowHeight * double(rows.size()) + 10;
  const double height = legend_top + 18 * std::ceil(double(categories.size()) / 3.0) + 6;
  std::string s = "<svg id=\"" + HtmlEscape(id) +
                  "\" class=\"plot bars\" xmlns=\"http://www.w3.org/2000/svg\" width=\"" +
                  Coord(kWidth) + "\" height=\"" + Coord(height) + "\" viewBox=\"0 0 " +
                  Coord(kWidth) + " " + Coord(height) + "\" role=\"img\" aria-label=\"" +
                  HtmlEscape(title) + "\">\n";
  s += TextSvg(kBarLeft, 22, title, "#111111", TextAnchor::kStart, " class=\"pt\"");
  for (size_t r = 0; r < rows.size(); ++r) {
    const BarRow& row = rows[r];
    const double y = kFirstRow + kRowHeight * double(r);
    double total = 0;
    for (double v : row.values) total += std::max(0.0, v);
    s += TextSvg(kBarLeft - 8, y + kBarHeight * 0.7, row.label, "#111111", TextAnchor::kEnd);
    s += TextSvg(kBarLeft + kBarWidth + 8, y + kBarHeight * 0.7, row.total_text, "#333333",
                 TextAnchor::kStart);
    double x = kBarLeft;
    for (size_t c = 0; c < categories.size() && c < row.values.size(); ++c) {
      const double share = total > 0 ? std::max(0.0, row.values[c]) / total : 0.0;
      if (share <= 0) continue;
      const double w = share * kBarWidth;
      const std::string pct = fmt::format("{:.1f}%", share * 100);
      s += "<rect x=\"" + Coord(x) + "\" y=\"" + Coord(y) + "\" width=\"" + Coord(w) +
           "\" height=\"" + Coord(kBarHeight) + "\" fill=\"" + categories[c].color + "\"><title>" +
           HtmlEscape(row.label + ", " + categories[c].words + ": " + pct) + "</title></rect>\n";
      if (share >= kMinLabelShare) {
        s += TextSvg(x + w / 2, y + kBarHeight * 0.7, pct, TextColorOn(categories[c].color),
                     TextAnchor::kMiddle, " class=\"bl\"");
      }
      x += w;
    }
  }
  for (size_t c = 0; c < categories.size(); ++c) {
    const double x = kBarLeft + double(c % 3) * 190;
    const double y = legend_top + 18 * double(c / 3);
    s += "<rect x=\"" + Coord(x) + "\" y=\"" + Coord(y) + "\" width=\"12\" height=\"12\" fill=\"" +
         categories[c].color + "\"/>\n";
    s += TextSvg(x + 17, y + 10, categories[c].words, "#222222", TextAnchor::kStart);
  }
  return s + "</svg>\n";
}

}  // namespace tritsim
