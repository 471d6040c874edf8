// Study plots. See study_plots.h.
#include "study/study_plots.h"

#include <fmt/core.h>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <vector>

#include "report/gnuplot.h"
#include "report/plot_style.h"

namespace tritsim {
namespace {

constexpr int kWidthPx = 960;
constexpr int kHeightPx = 540;
constexpr double kBytesPerGb = 1e9;

std::string Header(const std::string& name, const std::string& title) {
  std::ostringstream s;
  s << GnuplotHeader(name, title, "tritsim compare", kWidthPx, kHeightPx) << "set title \""
    << GnuplotText(title) << "\"\n"
    << "set datafile missing \"?\"\n"
    << "set style data histograms\n"
    << "set style fill solid 0.8 border -1\n"
    << "set grid ytics\n"
    << "set key outside right top\n"
    << "set yrange [0:*]\n";
  return s.str();
}

std::string Number(double v) {
  if (std::isnan(v)) return "?";
  return fmt::format("{:.6g}", v);
}

// The first `n` series colours, space-separated, for gnuplot's word().
std::string Colours(size_t n) {
  std::string out;
  for (size_t i = 0; i < n; ++i) out += (i ? " " : "") + SeriesStyle(i).colour;
  return out;
}

// Ratios spanning a factor of 10 or more (8.8x faster, 0.12x the memory)
// read better on a log axis, where 2x and 0.5x lie equally far from 1.
std::string LogScaleForRatios(const StudyTable& t) {
  std::vector<double> ratios;
  for (const StudyRow& r : t.rows) {
    for (double v : r.ratios) {
      if (std::isfinite(v) && v > 0) ratios.push_back(v);
    }
  }
  if (ScaleFor(ratios) == AxisScale::kLinear) return "";
  return "set logscale y 10\nset yrange [*:*]\nset format y \"%gx\"\n";
}

// Rows: figures; columns: variants' ratios.
void RatioPlot(const std::string& dir, const StudyTable& t) {
  std::ostringstream data;
  data << "figure";
  for (const StudyRow& r : t.rows) data << " " << r.variant;
  data << "\n";
  for (size_t f = 0; f < StudyFigures().size(); ++f) {
    data << "\"" << GnuplotText(WordsFor(StudyFigures()[f].key).words) << "\"";
    for (const StudyRow& r : t.rows) data << " " << Number(r.ratios[f]);
    data << "\n";
  }
  std::ostringstream gp;
  gp << Header("ratios", "study " + t.study + ": ratio to " + t.reference) << LogScaleForRatios(t)
     << "set style histogram clustered gap 1\n"
     << "set ylabel \"ratio to " << t.reference << "\"\n"
     << "set xtics rotate by -30\n"
     << "set arrow from graph 0, first 1 to graph 1, first 1 nohead dashtype 2\n"
     << "colours = \"" << Colours(t.rows.size()) << "\"\n"
     << "plot for [i=2:" << t.rows.size() + 1
     << "] \"ratios.dat\" using i:xtic(1) title columnheader(i) linecolor rgb word(colours, "
        "i-1)\n";
  RenderGnuplot(dir, "ratios", data.str(), gp.str());
}

// Rows: variants; columns: weight GB, KV GB.
void MemoryPlot(const std::string& dir, const StudyTable& t) {
  size_t weights = 0, kv = 0;
  for (size_t f = 0; f < StudyFigures().size(); ++f) {
    if (std::string(StudyFigures()[f].key) == "weight_bytes") weights = f;
    if (std::string(StudyFigures()[f].key) == "kv_bytes") kv = f;
  }
  std::ostringstream data;
  data << "variant weights_GB kv_cache_GB\n";
  for (const StudyRow& r : t.rows) {
    data << r.variant << " " << Number(r.figures[weights] / kBytesPerGb) << " "
         << Number(r.figures[kv] / kBytesPerGb) << "\n";
  }
  std::ostringstream gp;
  gp << Header("memory", "study " + t.study + ": memory footprint at the workload")
     << "set style histogram rowstacked\n"
     << "set ylabel \"memory (GB, 1e9 bytes)\"\n"
     << "set boxwidth 0.6\n"
     << "colours = \"" << Colours(2) << "\"\n"
     << "plot \"memory.dat\" using 2:xtic(1) title \"weights\" linecolor rgb word(colours, 1), "
        "\"\" using 3 title \"KV cache\" linecolor rgb word(colours, 2)\n";
  RenderGnuplot(dir, "memory", data.str(), gp.str());
}

}  // namespace

void WriteStudyPlots(const std::string& dir, const StudyTable& table) {
  RatioPlot(dir, table);
  MemoryPlot(dir, table);
}

}  // namespace tritsim
