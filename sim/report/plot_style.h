// The one place that says how tritsim's gnuplot plots look, used by the run
// plots (report/plots.h), the sweep plots (sweep/sweep_plots.h) and the
// study plots (study/study_plots.h):
// - the script header (terminal, output file, encoding);
// - a series palette that does not repeat within a plot;
// - a fixed marker (shape and colour) per op class, per stall cause, per
//   energy component and per ceiling, the same in every run;
// - axis labels in words with units for config keys, sweep columns and
//   study figures, and the scale (linear, log base 2, log base 10) an axis
//   gets from its values.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

namespace tritsim {

// How one series, marker or line is drawn.
struct PlotStyle {
  std::string colour;  // "#rrggbb"
  int point_type = 7;  // gnuplot point type (7 filled circle, 5 filled square, ...)
  int dash_type = 1;   // gnuplot dash type (1 solid)
};

// gnuplot clauses for `style`: "linecolor rgb "#..." pointtype N dashtype D",
// and for a plot with lines only (no pointtype, which gnuplot refuses there).
std::string GnuplotStyle(const PlotStyle& style);
std::string GnuplotLineStyle(const PlotStyle& style);

// The style of the i-th series of a plot (from 0). Colours come from a
// palette of distinguishable colours; series beyond it change dash type and
// marker, so no two series of one plot (up to kPaletteSize x kDashTypes)
// look the same.
PlotStyle SeriesStyle(size_t i);
inline constexpr size_t kPaletteSize = 10;
inline constexpr size_t kDashTypes = 5;

// The fixed marker of an op class (OpClassLabel: "gemm ffn", "softmax",
// ...): keyed by the class, never by order of appearance, so a class looks
// the same in every run and phase. An unknown label gets a grey cross.
PlotStyle OpClassStyle(const std::string& op_class);

// Fixed colours of the stall causes ("busy", "dram_wait", "sram_conflict",
// "vector_wait", "idle"), energy components ("arithmetic", "sram", "dram",
// "decoder", "leakage") and ceilings (ResourceName: "tree_array",
// "vector_unit", "dram_bandwidth", "request_concurrency", "trit_decoder",
// "sram_ports"). Unknown names: grey.
PlotStyle StallCauseStyle(const std::string& cause);
PlotStyle EnergyComponentStyle(const std::string& component);
PlotStyle CeilingStyle(const std::string& resource);

// An axis in words: "energy per token" in "mJ", the column's value times
// `scale` (joules x 1e3). `value_words` says one value briefly, for point
// labels and series names, "{}" standing for the value ("{} trees",
// "batch {}", "{} KiB SRAM").
struct AxisWords {
  std::string words;
  std::string unit;  // empty: a count without unit
  double scale = 1.0;
  std::string value_words;
};

// The words of a config key (arch.array.trees, workload.batch), a sweep
// metric column (decode_tokens_per_second) or a study figure (weight_bytes).
// An unknown key is its own label, unscaled.
AxisWords WordsFor(const std::string& key);

// One value of `key` in words: "256 trees", "batch 16", "hbm2e" (the value
// as written, unscaled).
std::string ValueWords(const std::string& key, const std::string& value);

// "words (unit)", or "words" without a unit.
std::string AxisTitle(const AxisWords& axis);

// Names of the stall causes and energy components in words ("DRAM wait").
std::string CauseWords(const std::string& name);

enum class AxisScale { kLinear, kLog2, kLog10 };

// The scale for an axis holding `values`: log base 2 when all are positive
// whole powers of two spanning a factor of 4 or more (trees, SRAM, channels,
// batch); log base 10 when all are positive and span a factor of 10 or
// more; linear otherwise.
AxisScale ScaleFor(const std::vector<double>& values);

// gnuplot lines that set `axis` ("x" or "y") to `scale`; a log-2 axis gets
// one tic at each distinct value (at most 16, else every power of two).
std::string GnuplotScale(const char* axis, AxisScale scale, const std::vector<double>& values);

// Text safe inside a gnuplot double-quoted string and SVG text.
std::string GnuplotText(const std::string& text);

// A number for a .dat file or script: %.6g, "NaN" when not finite.
std::string PlotNumber(double x);

// The first lines of every script: what it draws, who wrote it, the output
// file (`gnuplot -e 'outfile="x.png"' NAME.gp` draws a PNG instead of the
// SVG) and the terminal, `width` x `height` pixels.
std::string GnuplotHeader(const std::string& name, const std::string& what,
                          const std::string& writer, int width, int height);

}  // namespace tritsim
