// Plot styles and axis words. See plot_style.h.
#include "report/plot_style.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <map>
#include <set>
#include <sstream>

#include <fmt/core.h>

namespace tritsim {
namespace {

const char* const kGrey = "#8c8c8c";

// Distinguishable on white and for the common colour-vision deficiencies:
// the eight colours of Okabe and Ito (2008) without their yellow (too pale
// on white), then a brown and a violet.
const char* const kPalette[kPaletteSize] = {"#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00",
                                            "#56b4e9", "#000000", "#8c510a", "#7b3294", "#999933"};

// Filled shapes first, then open ones: circle, square, triangle up and
// down, diamond, pentagon.
const int kPointTypes[] = {7, 5, 9, 11, 13, 15, 6, 4, 8, 10, 12, 14};

const std::map<std::string, PlotStyle>& OpClassTable() {
  // Weight GEMMs filled, attention over the cache half-filled shapes of the
  // same hue family, elementwise vector ops open shapes.
  static const std::map<std::string, PlotStyle> kTable = {
      {"gemm attention", {"#0072b2", 7, 1}}, {"gemm ffn", {"#d55e00", 5, 1}},
      {"gemm head", {"#009e73", 9, 1}},      {"gemm embedding", {"#7b3294", 11, 1}},
      {"gemm", {"#000000", 13, 1}},          {"attn_scores", {"#56b4e9", 15, 1}},
      {"attn_values", {"#cc79a7", 13, 1}},   {"softmax", {"#e69f00", 9, 1}},
      {"embed", {"#7b3294", 4, 1}},          {"norm", {"#8c510a", 6, 1}},
      {"quantize", {"#999933", 8, 1}},       {"rope", {"#0072b2", 10, 1}},
      {"kv_append", {"#009e73", 12, 1}},     {"activation", {"#d55e00", 14, 1}},
      {"residual", {"#000000", 6, 1}},
  };
  return kTable;
}

PlotStyle Lookup(const std::map<std::string, PlotStyle>& table, const std::string& name) {
  const auto it = table.find(name);
  return it != table.end() ? it->second : PlotStyle{kGrey, 2, 1};
}

struct KnownAxis {
  const char* key;
  AxisWords words;
};

// Config keys, sweep metric columns (sweep/sweep_csv.h) and study figures
// (study/study_table.h). Times in ms and energies per token in mJ read
// better than their SI base units at the demo's sizes.
const KnownAxis kAxes[] = {
    // Architecture and model keys.
    {"arch.array.trees", {"adder trees", "", 1, "{} trees"}},
    {"arch.array.fan_in", {"adder-tree fan-in", "", 1, "fan-in {}"}},
    {"arch.array.kind", {"array kind", "", 1, "{} array"}},
    {"arch.clock.core_mhz", {"core clock", "MHz", 1, "{} MHz"}},
    {"arch.packing.format", {"trit packing", "", 1, "{} packing"}},
    {"arch.packing.decoder_bytes_per_cycle",
     {"trit decoder", "bytes/cycle", 1, "decoder {} B/cycle"}},
    {"arch.vector.lanes", {"vector lanes", "", 1, "{} lanes"}},
    {"arch.sram.capacity_kib", {"scratchpad", "KiB", 1, "{} KiB SRAM"}},
    {"arch.sram.banks", {"scratchpad banks", "", 1, "{} banks"}},
    {"arch.sram.ports", {"scratchpad ports per bank", "", 1, "{} ports"}},
    {"arch.dma.max_outstanding", {"DRAM requests in flight", "", 1, "{} in flight"}},
    {"arch.dram.preset", {"DRAM preset", "", 1, "{}"}},
    {"arch.dram.channels", {"DRAM channels", "", 1, "{} channels"}},
    {"model.layers", {"decoder layers", "", 1, "{} layers"}},
    {"model.precision.kv_bits", {"KV-cache bits", "", 1, "{}-bit KV"}},
    {"workload.batch", {"batch", "sequences", 1, "batch {}"}},
    {"workload.context", {"context", "tokens", 1, "context {}"}},
    {"workload.prefill", {"prompt", "tokens", 1, "prompt {}"}},
    {"workload.decode", {"decode", "tokens", 1, "decode {}"}},
    {"variant", {"variant", "", 1, "{}"}},
    // Run metrics.
    {"tokens_per_second", {"generated tokens/s (whole run)", "", 1, "{} tok/s"}},
    {"prefill_tokens_per_second", {"prefill tokens/s", "", 1, "{} prefill tok/s"}},
    {"decode_tokens_per_second", {"decode tokens/s", "", 1, "{} decode tok/s"}},
    {"time_to_first_token_seconds", {"time to first token", "ms", 1e3, "TTFT {} ms"}},
    {"time_per_output_token_seconds", {"time per output token", "ms", 1e3, "TPOT {} ms"}},
    {"joules_per_token", {"energy per token", "mJ", 1e3, "{} mJ/token"}},
    {"decode_joules_per_token", {"energy per decode token", "mJ", 1e3, "{} mJ/token"}},
    {"joules_per_decode_token", {"energy per decode token", "mJ", 1e3, "{} mJ/token"}},
    {"picojoules_per_op", {"energy per op", "pJ", 1, "{} pJ/op"}},
    {"area_mm2", {"area", "mm²", 1, "{} mm²"}},
    {"watts", {"average power", "W", 1, "{} W"}},
    {"cycles", {"core cycles", "", 1, "{} cycles"}},
    {"memory_bound_share", {"memory-bound share of layer cycles", "%", 100, "{}% memory-bound"}},
    {"dram_bandwidth_utilization", {"DRAM bandwidth used", "% of peak", 100, "{}% DRAM"}},
    {"busy_share", {"tree array busy", "% of cycles", 100, "{}% busy"}},
    {"dram_wait_share", {"waiting for DRAM", "% of cycles", 100, "{}% DRAM wait"}},
    {"sram_conflict_share", {"scratchpad conflicts", "% of cycles", 100, "{}% SRAM conflict"}},
    {"vector_wait_share", {"waiting for the vector unit", "% of cycles", 100, "{}% vector wait"}},
    {"idle_share", {"idle", "% of cycles", 100, "{}% idle"}},
    // Study figures.
    {"weight_bytes", {"weights", "GB", 1e-9, "{} GB weights"}},
    {"kv_bytes", {"KV cache", "GB", 1e-9, "{} GB KV"}},
    {"memory_bytes", {"weights + KV cache", "GB", 1e-9, "{} GB"}},
};

bool IsPowerOfTwo(double v) {
  if (!(v >= 1.0) || v != std::floor(v) || v > 1e15) return false;
  const auto n = static_cast<unsigned long long>(v);
  return (n & (n - 1)) == 0;
}

}  // namespace

std::string GnuplotStyle(const PlotStyle& style) {
  return fmt::format("linecolor rgb \"{}\" pointtype {} dashtype {}", style.colour,
                     style.point_type, style.dash_type);
}

std::string GnuplotLineStyle(const PlotStyle& style) {
  return fmt::format("linecolor rgb \"{}\" dashtype {}", style.colour, style.dash_type);
}

PlotStyle SeriesStyle(size_t i) {
  const size_t round = i / kPaletteSize;  // 0 for the first kPaletteSize series
  PlotStyle s;
  s.colour = kPalette[i % kPaletteSize];
  s.dash_type = int(round % kDashTypes) + 1;
  s.point_type = kPointTypes[(i % kPaletteSize + round) % std::size(kPointTypes)];
  return s;
}

PlotStyle OpClassStyle(const std::string& op_class) { return Lookup(OpClassTable(), op_class); }

PlotStyle StallCauseStyle(const std::string& cause) {
  static const std::map<std::string, PlotStyle> kTable = {{"busy", {"#009e73", 7, 1}},
                                                          {"dram_wait", {"#d55e00", 7, 1}},
                                                          {"sram_conflict", {"#7b3294", 7, 1}},
                                                          {"vector_wait", {"#e69f00", 7, 1}},
                                                          {"idle", {"#bdbdbd", 7, 1}}};
  return Lookup(kTable, cause);
}

PlotStyle EnergyComponentStyle(const std::string& component) {
  static const std::map<std::string, PlotStyle> kTable = {{"arithmetic", {"#009e73", 7, 1}},
                                                          {"sram", {"#7b3294", 7, 1}},
                                                          {"dram", {"#d55e00", 7, 1}},
                                                          {"decoder", {"#56b4e9", 7, 1}},
                                                          {"leakage", {"#8c8c8c", 7, 1}}};
  return Lookup(kTable, component);
}

PlotStyle CeilingStyle(const std::string& resource) {
  static const std::map<std::string, PlotStyle> kTable = {
      {"tree_array", {"#303030", 7, 1}},     {"vector_unit", {"#009e73", 7, 2}},
      {"dram_bandwidth", {"#0072b2", 7, 1}}, {"request_concurrency", {"#d55e00", 7, 3}},
      {"trit_decoder", {"#7b3294", 7, 4}},   {"sram_ports", {"#8c510a", 7, 5}}};
  return Lookup(kTable, resource);
}

AxisWords WordsFor(const std::string& key) {
  for (const KnownAxis& a : kAxes) {
    if (key == a.key) return a.words;
  }
  // The last part of an unknown key is its short name.
  const size_t dot = key.rfind('.');
  return AxisWords{key, "", 1.0, (dot == std::string::npos ? key : key.substr(dot + 1)) + " {}"};
}

std::string ValueWords(const std::string& key, const std::string& value) {
  std::string text = WordsFor(key).value_words;
  const size_t at = text.find("{}");
  return at == std::string::npos ? text + " " + value : text.replace(at, 2, value);
}

std::string AxisTitle(const AxisWords& axis) {
  return axis.unit.empty() ? axis.words : axis.words + " (" + axis.unit + ")";
}

std::string CauseWords(const std::string& name) {
  static const std::map<std::string, std::string> kWords = {
      {"busy", "busy"},
      {"dram_wait", "DRAM wait"},
      {"sram_conflict", "scratchpad conflict"},
      {"vector_wait", "vector-unit wait"},
      {"idle", "idle"},
      {"arithmetic", "arithmetic"},
      {"sram", "scratchpad"},
      {"dram", "DRAM"},
      {"decoder", "trit decoder"},
      {"leakage", "leakage"}};
  const auto it = kWords.find(name);
  return it != kWords.end() ? it->second : name;
}

AxisScale ScaleFor(const std::vector<double>& values) {
  if (values.empty()) return AxisScale::kLinear;
  const auto [lo, hi] = std::minmax_element(values.begin(), values.end());
  if (!(*lo > 0)) return AxisScale::kLinear;
  const bool powers = std::all_of(values.begin(), values.end(), IsPowerOfTwo);
  if (powers && *hi / *lo >= 4.0) return AxisScale::kLog2;
  return *hi / *lo >= 10.0 ? AxisScale::kLog10 : AxisScale::kLinear;
}

std::string GnuplotScale(const char* axis, AxisScale scale, const std::vector<double>& values) {
  switch (scale) {
    case AxisScale::kLinear:
      return "";
    case AxisScale::kLog10:
      return fmt::format("set logscale {} 10\n", axis);
    case AxisScale::kLog2: {
      constexpr size_t kMaxTics = 16;
      const std::set<double> distinct(values.begin(), values.end());
      std::string out = fmt::format("set logscale {} 2\n", axis);
      if (distinct.size() > kMaxTics) return out + fmt::format("set {}tics 2\n", axis);
      out += fmt::format("set {}tics (", axis);
      bool first = true;
      for (double v : distinct) {
        out += fmt::format("{}\"{}\" {}", first ? "" : ", ", PlotNumber(v), PlotNumber(v));
        first = false;
      }
      // A quarter step of margin either side keeps the end points off the border.
      const double lo = *distinct.begin(), hi = *distinct.rbegin();
      return out + fmt::format(")\nset {}range [{}:{}]\n", axis, PlotNumber(lo / 1.25),
                               PlotNumber(hi * 1.25));
    }
  }
  return "";
}

std::string GnuplotText(const std::string& text) {
  std::string out;
  for (char c : text) {
    const auto u = static_cast<unsigned char>(c);
    // Letters, digits, a few punctuation marks, and UTF-8 bytes (the
    // scripts set `encoding utf8`, so "mm²" stays itself).
    const bool safe = std::isalnum(u) || u >= 0x80 ||
                      std::string(" _.-/+():;,=%<>*'").find(c) != std::string::npos;
    out += safe ? c : '_';
  }
  return out;
}

std::string PlotNumber(double x) {
  if (!std::isfinite(x)) return "NaN";
  return fmt::format("{:.6g}", x);
}

std::string GnuplotHeader(const std::string& name, const std::string& what,
                          const std::string& writer, int width, int height) {
  std::ostringstream s;
  s << "# " << what << "\n"
    << "# Written by " << writer << "; reads " << name << ".dat from this directory.\n"
    << "# Restyle freely, then redraw with: gnuplot " << name << ".gp\n"
    << "# (gnuplot -e 'outfile=\"" << name << ".png\"' " << name << ".gp draws a PNG)\n"
    << "if (!exists(\"outfile\")) outfile = \"" << name << ".svg\"\n"
    << "set encoding utf8\n"
    << "if (strstrt(outfile, \".png\") > 0) {\n"
    << "  set terminal pngcairo size " << width << "," << height
    << " noenhanced font \"sans,10\" background \"white\"\n"
    << "} else {\n"
    << "  set terminal svg size " << width << "," << height
    << " noenhanced font \"sans,12\" background \"white\"\n"
    << "}\n"
    << "set output outfile\n"
    << "set termoption noenhanced  # labels such as attn_scores are literal text\n";
  return s.str();
}

}  // namespace tritsim
