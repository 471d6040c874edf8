#include "report/plots.h"

#include <fcntl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <iterator>
#include <limits>
#include <map>
#include <sstream>
#include <system_error>

#include "common/error.h"
#include "report/gnuplot.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr double kHzPerMhz = 1e6;
constexpr double kRangeDecade = 10.0;  // roofline x margin beyond the points, factor
constexpr double kRangeMarginY = 3.0;  // roofline y margin, factor
constexpr double kBarHeadroom = 1.15;  // bar charts: top of the y range over the tallest bar

const double kNaN = std::numeric_limits<double>::quiet_NaN();

// Text safe inside a gnuplot double-quoted string and in SVG text.
std::string Sanitize(const std::string& text) {
  std::string out;
  for (char c : text) {
    bool safe = std::isalnum(static_cast<unsigned char>(c)) ||
                std::string(" _.-/+():,=").find(c) != std::string::npos;
    out += safe ? c : '_';
  }
  return out;
}

std::string Num(double x) {
  if (!std::isfinite(x)) return "NaN";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", x);
  return buf;
}

std::string PlotError(const std::string& dir, const std::string& what) {
  return "--plots " + dir + ": " + what;
}

// The first lines of every script: the output file (overridable with
// `gnuplot -e 'outfile="x.svg"'`) and the terminal.
std::string ScriptHeader(const std::string& name, const std::string& what, int width, int height) {
  std::ostringstream s;
  s << "# " << what << "\n"
    << "# Written by tritsim; reads " << name << ".dat from this directory.\n"
    << "# Restyle freely, then redraw with: gnuplot " << name << ".gp\n"
    << "if (!exists(\"outfile\")) outfile = \"" << name << ".svg\"\n"
    << "set terminal svg size " << width << "," << height
    << " noenhanced font \"sans,12\" background \"white\"\n"
    << "set output outfile\n"
    << "set termoption noenhanced  # labels such as attn_scores are literal text\n";
  return s.str();
}

std::string RunTitle(const RunResult& run) {
  return Sanitize(run.arch_name) + " / " + Sanitize(run.model_name);
}

// ---------------------------------------------------------------------------
// Roofline.

// Achieved ops/s of a class; NaN when it has no finite log-scale point.
double AchievedOpsPerSecond(const OpClassPoint& c, double core_mhz) {
  if (c.ops == 0 || c.cycles == 0 || c.dram_bytes == 0 || !(core_mhz > 0.0)) return kNaN;
  return double(c.ops) * core_mhz * kHzPerMhz / double(c.cycles);
}

double Intensity(const OpClassPoint& c) {
  if (c.ops == 0 || c.cycles == 0 || c.dram_bytes == 0) return kNaN;
  return double(c.ops) / double(c.dram_bytes);
}

std::string RooflineData(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  std::ostringstream s;
  s << "# tritsim roofline of " << RunTitle(run) << ": one row per op class\n"
    << "# NaN: no DRAM bytes, ops or cycles (no point on log axes)\n"
    << "# label intensity_ops_per_byte achieved_ops_per_second ops dram_bytes cycles\n";
  for (const auto& c : classes) {
    s << '"' << Sanitize(c.label) << "\" " << Num(Intensity(c)) << ' '
      << Num(AchievedOpsPerSecond(c, run.core_mhz)) << ' ' << c.ops << ' ' << c.dram_bytes << ' '
      << c.cycles << '\n';
  }
  return s.str();
}

struct AxisRanges {
  double x_min, x_max, y_min, y_max;
};

// x spans the points and the ridge point a decade either side; y spans the
// lowest point (or the ceiling at x_min) up to above the peak.
AxisRanges RooflineRanges(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  const double peak = run.peak_ops_per_second;
  const double bw = run.dram_peak_bytes_per_second;
  const double ridge = peak / bw;
  double x_lo = ridge, x_hi = ridge, y_lo = peak;
  for (const auto& c : classes) {
    double x = Intensity(c), y = AchievedOpsPerSecond(c, run.core_mhz);
    if (!std::isfinite(x) || !std::isfinite(y)) continue;
    x_lo = std::min(x_lo, x);
    x_hi = std::max(x_hi, x);
    y_lo = std::min(y_lo, y);
  }
  AxisRanges r{x_lo / kRangeDecade, x_hi * kRangeDecade, 0.0, peak * kRangeMarginY};
  r.y_min = std::min(y_lo, bw * r.x_min) / kRangeMarginY;
  return r;
}

bool Drawable(const OpClassPoint& c, double core_mhz) {
  return std::isfinite(Intensity(c)) && std::isfinite(AchievedOpsPerSecond(c, core_mhz));
}

// Point types cycled through by the classes, filled shapes first.
constexpr int kPointTypes[] = {7, 5, 9, 11, 13, 15, 4, 6, 8, 10, 12, 14, 1, 2, 3};

std::string GnuplotArray(const std::string& name, const std::vector<std::string>& items) {
  std::string out = "array " + name + "[" + std::to_string(items.size()) + "] = [";
  for (size_t i = 0; i < items.size(); ++i) out += (i ? ", " : "") + items[i];
  return out + "]\n";
}

// The ceilings besides the tree array's and DRAM bandwidth's, each a line
// with its name (docs/engine.md, "Every resource is a ceiling"): the vector
// unit's peak, Little's law on the DMA window, and the trit decoder, whose
// roof assumes every DRAM byte is a packed weight (true of decode GEMMs).
std::string OtherCeilings(const RunResult& run) {
  std::ostringstream s;
  s << ", \\\n     " << Num(run.vector_peak_ops_per_second)
    << " title \"vector unit peak\" with lines lw 1.5 dt 2 lc rgb \"#1b7837\"";
  if (run.concurrency_bytes_per_second > 0 &&
      run.concurrency_bytes_per_second < run.dram_peak_bytes_per_second) {
    s << ", \\\n     " << Num(run.concurrency_bytes_per_second)
      << " * x title \"request concurrency (Little's law)\" with lines lw 1.5 dt 3 "
         "lc rgb \"#b2182b\"";
  }
  if (run.decoder_bytes_per_second > 0) {
    s << ", \\\n     " << Num(run.decoder_bytes_per_second)
      << " * x title \"trit decoder (weight bytes)\" with lines lw 1.5 dt 4 "
         "lc rgb \"#762a83\"";
  }
  return s.str();
}

// The points: one plot clause per drawable class (own key entry and point
// type), selected from roofline.dat by row number; the rest are listed in a
// note under the key.
std::string RooflinePoints(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  std::vector<std::string> rows, labels, types, undrawn;
  for (size_t i = 0; i < classes.size(); ++i) {
    const std::string label = "\"" + Sanitize(classes[i].label) + "\"";
    if (!Drawable(classes[i], run.core_mhz)) {
      undrawn.push_back(Sanitize(classes[i].label));
      continue;
    }
    rows.push_back(std::to_string(i));
    labels.push_back(label);
    types.push_back(std::to_string(kPointTypes[(labels.size() - 1) % std::size(kPointTypes)]));
  }
  std::ostringstream s;
  if (!undrawn.empty()) {
    std::string note = "not drawn (no DRAM\\nbytes, ops or cycles):";
    for (size_t i = 0; i < undrawn.size(); ++i) note += (i % 2 ? ", " : "\\n") + undrawn[i];
    s << "set label 1 \"" << note << "\" at graph 1.04, graph 0.38 left front\n";
  }
  s << "plot ceiling(x) title \"ceiling (tree array, DRAM bandwidth)\" "
       "with lines lw 2 lc rgb \"#303030\""
    << OtherCeilings(run);
  if (!rows.empty()) {
    s << ", \\\n     for [i=1:" << rows.size() << "] \"roofline.dat\" "
      << "every ::point_row[i]::point_row[i] using 2:3 with points pt point_type[i] ps 1.5 lw 2 "
         "title point_label[i]";
  }
  s << "\n";
  std::string arrays;
  if (!rows.empty()) {
    arrays = "# rows of roofline.dat drawn, from 0 (comment lines do not count)\n" +
             GnuplotArray("point_row", rows) + GnuplotArray("point_label", labels) +
             GnuplotArray("point_type", types);
  }
  return arrays + s.str();
}

std::string RooflineScript(const RunResult& run, const std::vector<OpClassPoint>& classes) {
  const AxisRanges r = RooflineRanges(run, classes);
  std::ostringstream s;
  s << ScriptHeader("roofline", "Roofline (Williams, Waterman, Patterson, CACM 2009) of one run",
                    960, 600)
    << "peak_ops_per_second = " << Num(run.peak_ops_per_second) << "\n"
    << "dram_bytes_per_second = " << Num(run.dram_peak_bytes_per_second) << "\n"
    << "ceiling(x) = (dram_bytes_per_second * x < peak_ops_per_second) ? "
       "dram_bytes_per_second * x : peak_ops_per_second\n"
    << "set title \"Roofline: " << RunTitle(run) << "\\nceiling = min(peak "
    << Num(run.peak_ops_per_second) << " ops/s, DRAM " << Num(run.dram_peak_bytes_per_second)
    << " B/s x intensity)\"\n"
    << "set logscale xy\n"
    << "set xrange [" << Num(r.x_min) << ":" << Num(r.x_max) << "]\n"
    << "set yrange [" << Num(r.y_min) << ":" << Num(r.y_max) << "]\n"
    << "set format y \"%.0s%c\"\n"
    << "set xlabel \"operational intensity (ops per DRAM byte)\"\n"
    << "set ylabel \"achieved ops per second\"\n"
    << "set grid\n"
    << "set key outside right top\n"
    << "set samples 1000\n"
    << RooflinePoints(run, classes);
  return s.str();
}

// ---------------------------------------------------------------------------
// Stalls.

std::string StallsData(const RunResult& run) {
  const StallBreakdown& st = run.stalls;
  const std::pair<const char*, uint64_t> causes[] = {{"busy", st.busy},
                                                     {"dram_wait", st.dram_wait},
                                                     {"sram_conflict", st.sram_conflict},
                                                     {"vector_wait", st.vector_wait},
                                                     {"idle", st.idle}};
  const double total = double(st.total());
  std::ostringstream s;
  s << "# tritsim tree-array cycles of " << RunTitle(run) << "\n"
    << "# index 0: cycles by cause over the whole run\n"
    << "# cause cycles share_percent\n";
  for (const auto& [cause, cycles] : causes) {
    s << cause << ' ' << cycles << ' ' << Num(total > 0 ? 100.0 * double(cycles) / total : 0.0)
      << '\n';
  }
  s << "\n\n# index 1: core cycles per phase\n# phase cycles tokens\n";
  std::map<Phase, std::pair<uint64_t, uint64_t>> per_phase;
  for (const auto& p : run.phases) {
    per_phase[p.phase].first += p.cycles;
    per_phase[p.phase].second += p.tokens;
  }
  if (per_phase.empty()) s << "none 0 0\n";
  for (const auto& [phase, sums] : per_phase) {
    s << PhaseName(phase) << ' ' << sums.first << ' ' << sums.second << '\n';
  }
  return s.str();
}

uint64_t MaxPhaseCycles(const RunResult& run) {
  std::map<Phase, uint64_t> per_phase;
  uint64_t most = 0;
  for (const auto& p : run.phases) most = std::max(most, per_phase[p.phase] += p.cycles);
  return most;
}

std::string StallsScript(const RunResult& run) {
  const double phase_top = std::max(1.0, double(MaxPhaseCycles(run)) * kBarHeadroom);
  std::ostringstream s;
  s << ScriptHeader("stalls", "Tree-array cycles by cause, and cycles per phase", 960, 520)
    << "set multiplot layout 1,2 title \"Tree-array cycles: " << RunTitle(run) << "\"\n"
    << "set style fill solid 0.85 border -1\n"
    << "set boxwidth 0.5\n"
    << "# left: cycles by cause over the whole run, stacked, percent\n"
    << "set style data histograms\n"
    << "set style histogram columnstacked\n"
    << "set xtics (\"whole run\" 0)\n"
    << "set yrange [0:100]\n"
    << "set ylabel \"share of run cycles (%)\"\n"
    << "set key outside right title \"cause\"\n"
    << "plot \"stalls.dat\" index 0 using 3:key(1) notitle\n"
    << "# right: core cycles per phase\n"
    << "set style histogram clustered\n"
    << "set xtics autofreq\n"
    << "set yrange [0:" << Num(phase_top) << "]\n"
    << "set format y \"%.1s%c\"\n"
    << "set ylabel \"core cycles\"\n"
    << "unset key\n"
    << "plot \"stalls.dat\" index 1 using 2:xtic(1) lc rgb \"#1f6fb4\" notitle\n"
    << "unset multiplot\n";
  return s.str();
}

// ---------------------------------------------------------------------------
// Energy.

std::string EnergyData(const RunResult& run, const EnergyBreakdown& e) {
  const std::pair<const char*, double> parts[] = {{"arithmetic", e.arithmetic_joules},
                                                  {"sram", e.sram_joules},
                                                  {"dram", e.dram_joules},
                                                  {"decoder", e.decoder_joules},
                                                  {"leakage", e.leakage_joules}};
  const double total = e.total_joules();
  std::ostringstream s;
  s << "# tritsim energy of " << RunTitle(run) << " by component\n"
    << "# component joules share_percent\n";
  for (const auto& [name, joules] : parts) {
    s << name << ' ' << Num(joules) << ' ' << Num(total > 0 ? 100.0 * joules / total : 0.0) << '\n';
  }
  return s.str();
}

// Joules with an SI prefix, e.g. "10.4 mJ".
std::string Joules(double joules) {
  static const std::pair<double, const char*> kPrefixes[] = {
      {1.0, ""}, {1e-3, "m"}, {1e-6, "u"}, {1e-9, "n"}, {1e-12, "p"}};
  for (const auto& [scale, prefix] : kPrefixes) {
    if (std::fabs(joules) >= scale) {
      char buf[48];
      std::snprintf(buf, sizeof buf, "%.3g %sJ", joules / scale, prefix);
      return buf;
    }
  }
  return Num(joules) + " J";
}

std::string EnergyTitle(const RunResult& run, const EnergyBreakdown& e) {
  std::string title = "Energy: " + RunTitle(run) + ", total " + Joules(e.total_joules());
  if (run.tokens > 0) title += ", " + Joules(e.total_joules() / double(run.tokens)) + " per token";
  return title;
}

std::string EnergyScript(const RunResult& run, const EnergyBreakdown& e) {
  const double tallest = std::max(
      {e.arithmetic_joules, e.sram_joules, e.dram_joules, e.decoder_joules, e.leakage_joules});
  const double top = tallest > 0 ? tallest * kBarHeadroom : 1.0;
  std::ostringstream s;
  s << ScriptHeader("energy", "Energy of one run by component", 760, 520) << "set title \""
    << EnergyTitle(run, e) << "\"\n"
    << "set style fill solid 0.85 border -1\n"
    << "set boxwidth 0.6\n"
    << "set yrange [0:" << Num(top) << "]\n"
    << "set format y \"%.1s %cJ\"\n"
    << "set ylabel \"energy\"\n"
    << "set grid ytics\n"
    << "unset key\n"
    << "plot \"energy.dat\" using 0:2:xtic(1) with boxes lc rgb \"#d9822b\", \\\n"
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
  std::map<std::string, size_t> index;
  for (const auto& layer : run.layers) {
    const std::string label = OpClassLabel(layer.op);
    auto [it, inserted] = index.emplace(label, classes.size());
    if (inserted) classes.push_back(OpClassPoint{label, 0, 0, 0});
    OpClassPoint& c = classes[it->second];
    c.ops += layer.ops;
    c.dram_bytes += layer.dram_bytes;
    c.cycles += layer.cycles;
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
