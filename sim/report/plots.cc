#include "report/plots.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <limits>
#include <map>
#include <sstream>
#include <system_error>

#include <fmt/core.h>

#include "common/error.h"
#include "report/gnuplot.h"
#include "report/plot_style.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr double kHzPerMhz = 1e6;
constexpr double kRangeDecade = 10.0;  // roofline x margin beyond the points, factor
constexpr double kRangeMarginY = 3.0;  // roofline y margin, factor
constexpr double kBarHeadroom = 1.15;  // bar charts: top of the y range over the tallest bar
constexpr int kPanelWidthPx = 720;     // one roofline panel
constexpr int kRooflineHeightPx = 720;
constexpr double kPercent = 100.0;

const double kNaN = std::numeric_limits<double>::quiet_NaN();
const Phase kPhases[] = {Phase::kPrefill, Phase::kDecode};
const char* const kCauses[] = {"busy", "dram_wait", "sram_conflict", "vector_wait", "idle"};

std::string PlotError(const std::string& dir, const std::string& what) {
  return "--plots " + dir + ": " + what;
}

std::string Quoted(const std::string& text) { return "\"" + GnuplotText(text) + "\""; }

std::string RunTitle(const RunResult& run) {
  return GnuplotText(run.arch_name) + " / " + GnuplotText(run.model_name);
}

// A value with an SI prefix and unit, e.g. "8.19 Tops/s", "10.4 mJ".
std::string Si(double value, const char* unit) {
  static const std::pair<double, const char*> kPrefixes[] = {
      {1e15, "P"}, {1e12, "T"}, {1e9, "G"},  {1e6, "M"},  {1e3, "k"},
      {1.0, ""},   {1e-3, "m"}, {1e-6, "u"}, {1e-9, "n"}, {1e-12, "p"}};
  for (const auto& [scale, prefix] : kPrefixes) {
    if (std::fabs(value) >= scale) return fmt::format("{:.3g} {}{}", value / scale, prefix, unit);
  }
  return PlotNumber(value) + " " + unit;
}

const PhaseResult* FindPhase(const RunResult& run, Phase phase) {
  for (const PhaseResult& p : run.phases) {
    if (p.phase == phase) return &p;
  }
  return nullptr;
}

// ---------------------------------------------------------------------------
// Roofline.

// Achieved ops/s of a class; NaN when it has no finite log-scale point.
double AchievedOpsPerSecond(const OpClassPoint& c, double core_mhz) {
  if (c.ops == 0 || c.cycles == 0 || c.dram_bytes == 0 || !(core_mhz > 0.0)) return kNaN;
  return double(c.ops) * core_mhz * kHzPerMhz / double(c.cycles);
}

// The ops/s the class's binding resource allows: its own roof.
double RoofOpsPerSecond(const OpClassPoint& c, double core_mhz) {
  if (c.bound_cycles == 0 || !std::isfinite(AchievedOpsPerSecond(c, core_mhz))) return kNaN;
  return double(c.ops) * core_mhz * kHzPerMhz / double(c.bound_cycles);
}

double Intensity(const OpClassPoint& c) {
  if (c.ops == 0 || c.cycles == 0 || c.dram_bytes == 0) return kNaN;
  return double(c.ops) / double(c.dram_bytes);
}

bool Drawable(const OpClassPoint& c, double core_mhz) {
  return std::isfinite(Intensity(c)) && std::isfinite(AchievedOpsPerSecond(c, core_mhz));
}

// One ceiling: a flat roof in ops/s, or a slope in bytes/s (ops/s =
// bytes/s x intensity).
struct Ceiling {
  Resource resource;
  std::string words;
  bool flat = true;
  double value = 0;
};

// Every ceiling of the run that can be drawn on these axes (docs/engine.md,
// "Every resource is a ceiling"). The SRAM ports' roof depends on each op's
// accesses per op, so it appears only as the own roof of the ops it binds.
std::vector<Ceiling> Ceilings(const RunResult& run) {
  std::vector<Ceiling> c = {
      {Resource::kTreeArray, "tree array", true, run.peak_ops_per_second},
      {Resource::kDramBandwidth, "DRAM bandwidth", false, run.dram_peak_bytes_per_second}};
  if (run.vector_peak_ops_per_second > 0) {
    c.push_back({Resource::kVectorUnit, "vector unit", true, run.vector_peak_ops_per_second});
  }
  if (run.concurrency_bytes_per_second > 0 &&
      run.concurrency_bytes_per_second < run.dram_peak_bytes_per_second) {
    c.push_back({Resource::kRequestConcurrency, "request concurrency (Little's law)", false,
                 run.concurrency_bytes_per_second});
  }
  if (run.decoder_bytes_per_second > 0) {
    c.push_back({Resource::kTritDecoder, "trit decoder (if every byte is a weight)", false,
                 run.decoder_bytes_per_second});
  }
  return c;
}

std::string RooflineData(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  std::ostringstream s;
  s << "# tritsim roofline of " << RunTitle(run) << ": one row per op class and phase\n"
    << "# NaN: no DRAM bytes, ops or cycles (no point on log axes)\n"
    << "# roof: ops/s the class's binding resource (bound_by) allows\n"
    << "# label phase intensity_ops_per_byte achieved_ops_per_second ops dram_bytes cycles "
       "roof_ops_per_second bound_by\n";
  for (const auto& c : classes) {
    s << Quoted(c.label) << ' ' << PhaseName(c.phase) << ' ' << PlotNumber(Intensity(c)) << ' '
      << PlotNumber(AchievedOpsPerSecond(c, run.core_mhz)) << ' ' << c.ops << ' ' << c.dram_bytes
      << ' ' << c.cycles << ' ' << PlotNumber(RoofOpsPerSecond(c, run.core_mhz)) << ' '
      << ResourceName(c.bound_by) << '\n';
  }
  return s.str();
}

struct AxisRanges {
  double x_min, x_max, y_min, y_max;
};

// x spans the points and the ridge points a decade either side; y spans the
// lowest point up to above the highest roof. The same for every panel.
AxisRanges RooflineRanges(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  const double top = run.peak_ops_per_second;
  double x_lo = top / run.dram_peak_bytes_per_second, x_hi = x_lo, y_lo = top;
  for (const Ceiling& c : Ceilings(run)) {
    if (c.flat) {
      y_lo = std::min(y_lo, c.value);
    } else {
      x_lo = std::min(x_lo, top / c.value);
      x_hi = std::max(x_hi, top / c.value);
    }
  }
  for (const auto& c : classes) {
    const double x = Intensity(c), y = AchievedOpsPerSecond(c, run.core_mhz);
    if (!std::isfinite(x) || !std::isfinite(y)) continue;
    x_lo = std::min(x_lo, x);
    x_hi = std::max(x_hi, x);
    y_lo = std::min(y_lo, y);
  }
  AxisRanges r{x_lo / kRangeDecade, x_hi * kRangeDecade, 0.0, top * kRangeMarginY};
  r.y_min = std::min(y_lo, run.dram_peak_bytes_per_second * r.x_min) / kRangeMarginY;
  return r;
}

// The angle on screen of a line of slope 1 in log-log data space, for a
// panel whose plotting area is about kPlotAreaWidthPx x kPlotAreaHeightPx.
double SlopeDegrees(const AxisRanges& r) {
  constexpr double kPlotAreaWidthPx = 620, kPlotAreaHeightPx = 440;
  constexpr double kDegreesPerRadian = 57.29577951308232;
  const double px_per_decade_x = kPlotAreaWidthPx / std::log10(r.x_max / r.x_min);
  const double px_per_decade_y = kPlotAreaHeightPx / std::log10(r.y_max / r.y_min);
  return std::atan2(px_per_decade_y, px_per_decade_x) * kDegreesPerRadian;
}

// The ceiling lines (no key entry) and a label on each: flat roofs at the
// right end, slopes where they enter the plot from the left or bottom. A
// slope stops at the tree array's roof, above which no op can go.
std::string CeilingLines(const RunResult& run, const AxisRanges& r, int first_label) {
  std::ostringstream labels, lines;
  int label = first_label;
  bool left_flat = false;
  for (const Ceiling& c : Ceilings(run)) {
    const PlotStyle st = CeilingStyle(ResourceName(c.resource));
    const std::string text = c.words + ": " + Si(c.value, c.flat ? "ops/s" : "B/s");
    if (c.flat) {
      // The tree array's label at the right end, any lower flat roof's at the left.
      const bool right = !left_flat && c.resource == Resource::kTreeArray;
      left_flat = left_flat || !right;
      labels << "set label " << label++ << " " << Quoted(text) << " at "
             << PlotNumber(right ? r.x_max / 1.15 : r.x_min * 1.15) << ", " << PlotNumber(c.value)
             << (right ? " right" : " left") << " offset 0,0.7 textcolor rgb \"" << st.colour
             << "\" front\n";
      lines << ", \\\n     " << PlotNumber(c.value) << " notitle with lines lw 2 "
            << GnuplotLineStyle(st);
    } else {
      // Written along the line, just above it, from where it enters the plot.
      const double x_enter = std::max(r.x_min * 1.3, r.y_min * 2.0 / c.value);
      labels << "set label " << label++ << " " << Quoted(text) << " at " << PlotNumber(x_enter)
             << ", " << PlotNumber(c.value * x_enter) << " left rotate by "
             << fmt::format("{:.0f}", SlopeDegrees(r)) << " offset -0.6,0.9 textcolor rgb \""
             << st.colour << "\" front\n";
      lines << ", \\\n     (" << PlotNumber(c.value)
            << " * x <= " << PlotNumber(run.peak_ops_per_second) << " ? " << PlotNumber(c.value)
            << " * x : 1/0) notitle with lines lw 2 " << GnuplotLineStyle(st);
    }
  }
  return labels.str() + "#LINES#" + lines.str();
}

// One panel: the phase's classes as points, each with a dotted line up to
// its own roof. Rows are selected from roofline.dat by number.
std::string RooflinePanel(const RunResult& run, const std::vector<OpClassPoint>& classes,
                          Phase phase, const AxisRanges& r) {
  std::ostringstream points, undrawn;
  int drawn = 0;
  for (size_t i = 0; i < classes.size(); ++i) {
    const OpClassPoint& c = classes[i];
    if (c.phase != phase) continue;
    if (!Drawable(c, run.core_mhz)) {
      undrawn << (undrawn.tellp() > 0 ? ", " : "") << GnuplotText(c.label);
      continue;
    }
    ++drawn;
    const PlotStyle st = OpClassStyle(c.label);
    const double share = AchievedOpsPerSecond(c, run.core_mhz) / RoofOpsPerSecond(c, run.core_mhz);
    const std::string key =
        c.label + ": " + ResourceName(c.bound_by) +
        (std::isfinite(share) ? fmt::format(", {:.0f}% of roof", share * kPercent) : std::string());
    points << ", \\\n     \"roofline.dat\" every ::" << i << "::" << i
           << " using 3:4:(0):($8-$4) notitle with vectors nohead dt 3 lw 1.5 linecolor rgb \""
           << st.colour << "\"";
    points << ", \\\n     \"roofline.dat\" every ::" << i << "::" << i << " using 3:4 title "
           << Quoted(key) << " with points ps 1.8 lw 2 " << GnuplotStyle(st);
  }
  const PhaseResult* p = FindPhase(run, phase);
  std::ostringstream s;
  std::string title = std::string(PhaseName(phase));
  if (p) {
    const double seconds = run.core_mhz > 0 ? double(p->cycles) / (run.core_mhz * kHzPerMhz) : 0;
    title += fmt::format(": {} tokens in {}, bound by {}", p->tokens, Si(seconds, "s"),
                         ResourceName(p->bound_by));
  }
  s << "set title " << Quoted(title) << "\n"
    << "unset label\n";
  const std::string ceilings = CeilingLines(run, r, 1);
  const size_t cut = ceilings.find("#LINES#");
  s << ceilings.substr(0, cut);
  if (undrawn.tellp() > 0) {
    s << "set label 99 " << Quoted("not drawn (no DRAM bytes, ops or cycles): " + undrawn.str())
      << " at graph 0.02, graph 0.03 left front font \",9\"\n";
  }
  // gnuplot needs one plot clause before the first ", ": an invisible point.
  s << "plot 1/0 notitle" << ceilings.substr(cut + 7);
  if (drawn == 0) s << ", \\\n     1/0 title \"no op of this phase has a point\"";
  s << points.str() << "\n";
  return s.str();
}

std::string RooflineScript(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  const AxisRanges r = RooflineRanges(run, classes);
  std::vector<Phase> phases;
  for (Phase ph : kPhases) {
    if (FindPhase(run, ph) || std::any_of(classes.begin(), classes.end(),
                                          [&](const OpClassPoint& c) { return c.phase == ph; })) {
      phases.push_back(ph);
    }
  }
  if (phases.empty()) phases.push_back(Phase::kDecode);
  std::ostringstream s;
  s << GnuplotHeader("roofline",
                     "Roofline (Williams, Waterman, Patterson, CACM 2009) of one run, per phase",
                     "tritsim", kPanelWidthPx * int(phases.size()), kRooflineHeightPx)
    << "set multiplot layout 1," << phases.size() << " title "
    << Quoted("Roofline: " + RunTitle(run)) << "\n"
    << "set logscale xy 10\n"
    << "set xrange [" << PlotNumber(r.x_min) << ":" << PlotNumber(r.x_max) << "]\n"
    << "set yrange [" << PlotNumber(r.y_min) << ":" << PlotNumber(r.y_max) << "]\n"
    << "set format y \"%.0s%c\"\n"
    << "set xlabel \"operational intensity (ops per DRAM byte)\"\n"
    << "set ylabel \"achieved ops per second\"\n"
    << "set grid\n"
    << "set bmargin 14  # room for the key below the x label\n"
    << "set samples 400\n";
  for (size_t i = 0; i < phases.size(); ++i) {
    s << "\n# Panel " << i + 1 << ": " << PhaseName(phases[i]) << "\n"
      << "panel = " << i + 1 << "\n"
      << "set key at screen 0.02 + 0.98 * (panel - 1) / " << phases.size()
      << ", screen 0.01 left bottom vertical maxrows 8 Left reverse samplen 1.5\n"
      << RooflinePanel(run, classes, phases[i], r);
  }
  s << "unset multiplot\n";
  return s.str();
}

// ---------------------------------------------------------------------------
// Stalls.

uint64_t CauseCycles(const StallBreakdown& st, const std::string& cause) {
  if (cause == "busy") return st.busy;
  if (cause == "dram_wait") return st.dram_wait;
  if (cause == "sram_conflict") return st.sram_conflict;
  if (cause == "vector_wait") return st.vector_wait;
  return st.idle;
}

// Phases with their stalls: the run's phases, or the whole run when it
// names none.
std::vector<std::pair<std::string, StallBreakdown>> StallColumns(const RunResult& run) {
  std::vector<std::pair<std::string, StallBreakdown>> out;
  for (Phase ph : kPhases) {
    if (const PhaseResult* p = FindPhase(run, ph)) out.push_back({PhaseName(ph), p->stalls});
  }
  if (out.empty()) out.push_back({"whole run", run.stalls});
  return out;
}

std::string StallsData(const RunResult& run) {
  const auto columns = StallColumns(run);
  std::ostringstream s;
  s << "# tritsim tree-array cycles by cause, per phase, of " << RunTitle(run) << "\n";
  for (int index = 0; index < 2; ++index) {
    s << (index ? "\n\n# index 1: cycles\n" : "# index 0: percent of the phase's cycles\n")
      << "# phase";
    for (const char* cause : kCauses) s << ' ' << cause;
    s << '\n';
    for (const auto& [name, st] : columns) {
      s << Quoted(name);
      const double total = double(st.total());
      for (const char* cause : kCauses) {
        const double cycles = double(CauseCycles(st, cause));
        s << ' '
          << (index ? std::to_string(CauseCycles(st, cause))
                    : PlotNumber(total > 0 ? kPercent * cycles / total : 0.0));
      }
      s << '\n';
    }
  }
  return s.str();
}

std::string StallsScript(const RunResult& run) {
  uint64_t most = 1;
  for (const auto& column : StallColumns(run)) most = std::max(most, column.second.total());
  std::string causes, colours;
  for (const char* cause : kCauses) {
    causes += std::string(causes.empty() ? "" : ", ") + "\"" + CauseWords(cause) + "\"";
    colours += std::string(colours.empty() ? "" : " ") + StallCauseStyle(cause).colour;
  }
  std::ostringstream s;
  s << GnuplotHeader("stalls", "Tree-array cycles by cause, per phase", "tritsim", 1000, 520)
    << "array cause[5] = [" << causes << "]\n"
    << "colours = \"" << colours << "\"\n"
    << "set multiplot layout 1,2 title "
    << Quoted("Tree-array cycles by cause, per phase: " + RunTitle(run)) << "\n"
    << "set style data histograms\n"
    << "set style histogram rowstacked\n"
    << "set style fill solid 0.9 border -1\n"
    << "set boxwidth 0.6\n"
    << "set grid ytics\n"
    << "set bmargin 6  # room for the key below\n"
    << "set key at screen 0.5, screen 0.02 center bottom horizontal maxcols 5 title \"cause\"\n"
    << "# left: share of each phase's cycles\n"
    << "set title \"share of each phase's cycles\"\n"
    << "set yrange [0:100]\n"
    << "set ylabel \"share of the phase's cycles (%)\"\n"
    << "plot for [i=2:6] \"stalls.dat\" index 0 using i:xtic(1) linecolor rgb word(colours, i-1) "
       "title cause[i-1]\n"
    << "# right: cycles, so the phases' sizes compare\n"
    << "set title \"cycles of each phase\"\n"
    << "unset key\n"
    << "set yrange [0:" << PlotNumber(double(most) * kBarHeadroom) << "]\n"
    << "set format y \"%.0s%c\"\n"
    << "set ylabel \"core cycles\"\n"
    << "plot for [i=2:6] \"stalls.dat\" index 1 using i:xtic(1) linecolor rgb word(colours, i-1) "
       "title cause[i-1]\n"
    << "unset multiplot\n";
  return s.str();
}

// ---------------------------------------------------------------------------
// Energy.

std::vector<std::pair<const char*, double>> EnergyParts(const EnergyBreakdown& e) {
  return {{"arithmetic", e.arithmetic_joules},
          {"sram", e.sram_joules},
          {"dram", e.dram_joules},
          {"decoder", e.decoder_joules},
          {"leakage", e.leakage_joules}};
}

std::string EnergyData(const RunResult& run, const EnergyBreakdown& e) {
  const double total = e.total_joules();
  std::ostringstream s;
  s << "# tritsim energy of " << RunTitle(run) << " by component\n"
    << "# component joules share_percent colour_as_rgb_integer\n";
  for (const auto& [name, joules] : EnergyParts(e)) {
    s << Quoted(CauseWords(name)) << ' ' << PlotNumber(joules) << ' '
      << PlotNumber(total > 0 ? kPercent * joules / total : 0.0) << ' '
      << std::stol(EnergyComponentStyle(name).colour.substr(1), nullptr, 16) << '\n';
  }
  return s.str();
}

std::string EnergyTitle(const RunResult& run, const EnergyBreakdown& e) {
  std::string title = "Energy: " + RunTitle(run) + ", total " + Si(e.total_joules(), "J");
  if (run.tokens > 0) title += ", " + Si(e.total_joules() / double(run.tokens), "J") + " per token";
  return title;
}

std::string EnergyScript(const RunResult& run, const EnergyBreakdown& e) {
  double tallest = 0;
  for (const auto& part : EnergyParts(e)) tallest = std::max(tallest, part.second);
  const double top = tallest > 0 ? tallest * kBarHeadroom : 1.0;
  std::ostringstream s;
  s << GnuplotHeader("energy", "Energy of one run by component", "tritsim", 760, 520)
    << "set title " << Quoted(EnergyTitle(run, e)) << "\n"
    << "set style fill solid 0.9 border -1\n"
    << "set boxwidth 0.6\n"
    << "set yrange [0:" << PlotNumber(top) << "]\n"
    << "set format y \"%.1s %cJ\"\n"
    << "set ylabel \"energy\"\n"
    << "set grid ytics\n"
    << "unset key\n"
    << "plot \"energy.dat\" using 0:2:4:xtic(1) with boxes linecolor rgb variable, \\\n"
    << "     \"energy.dat\" using 0:2:(sprintf(\"%.1f%%\", $3)) with labels offset char 0,0.8 "
       "notitle\n";
  return s.str();
}

void MakeDirectory(const std::string& dir) {
  std::error_code ec;
  fs::create_directories(dir, ec);
  if (ec || !fs::is_directory(dir)) {
    throw Error(ExitCode::kBadInput, PlotError(dir, "cannot create directory: " +
                                                        (ec ? ec.message() : "not a directory")));
  }
}

void CheckRoofs(const std::string& dir, const RunResult& run) {
  if (!(run.peak_ops_per_second > 0.0) || !(run.dram_peak_bytes_per_second > 0.0)) {
    throw Error(
        ExitCode::kInternal,
        PlotError(dir, "run result lacks peak_ops_per_second or dram_peak_bytes_per_second"));
  }
}

}  // namespace

std::string OpClassLabel(const TraceOp& op) {
  if (op.kind != OpKind::kGemm || op.tensor == TensorClass::kNone) return OpKindName(op.kind);
  return std::string("gemm ") + TensorClassName(op.tensor);
}

std::vector<OpClassPoint> GroupOpClasses(const RunResult& run) {
  std::vector<OpClassPoint> classes;
  std::map<std::pair<Phase, std::string>, size_t> index;
  for (const auto& layer : run.layers) {
    const std::string label = OpClassLabel(layer.op);
    auto [it, inserted] = index.emplace(std::make_pair(layer.op.phase, label), classes.size());
    if (inserted) {
      OpClassPoint fresh;
      fresh.label = label;
      fresh.phase = layer.op.phase;
      classes.push_back(fresh);
    }
    OpClassPoint& c = classes[it->second];
    c.ops += layer.ops;
    c.dram_bytes += layer.dram_bytes;
    c.cycles += layer.cycles;
    c.bound_cycles += layer.bound_cycles;
    if (layer.bound_cycles > c.most_bound_cycles) {
      c.most_bound_cycles = layer.bound_cycles;
      c.bound_by = layer.bound_by;
    }
  }
  return classes;
}

void WriteRunPlots(const std::string& dir, const RunResult& run, const EnergyBreakdown& energy) {
  CheckRoofs(dir, run);
  MakeDirectory(dir);
  const std::vector<OpClassPoint> classes = GroupOpClasses(run);
  RenderGnuplot(dir, "roofline", RooflineData(run, classes), RooflineScript(run, classes));
  RenderGnuplot(dir, "stalls", StallsData(run), StallsScript(run));
  RenderGnuplot(dir, "energy", EnergyData(run, energy), EnergyScript(run, energy));
}

}  // namespace tritsim
