// The look of the report page's SVG plots (report/svg_plot.h): a categorical palette whose
// colours do not repeat within a plot, marker shapes, and one fixed colour
// and shape per op class, per binding resource, per stall cause and per
// energy component, so the same thing looks the same in every run's plots.
//
// Plain data, no drawing: the report page's SVG writer (report/svg_plot.h)
// uses it, and so can any other plot writer.
#pragma once

#include <array>
#include <cstddef>
#include <string>

namespace tritsim {

// Sixteen distinguishable colours: Paul Tol's "bright" (7) and "muted" (9)
// qualitative schemes, greys dropped and the two near-duplicate blues of
// the pair kept apart (P. Tol, "Colour Schemes", SRON technical note
// SRON/EPS/TN/09-002, 2021; hex values from memory). Chosen for contrast on
// white and for readers with common colour-vision deficiencies.
inline constexpr std::array<const char*, 16> kPalette = {
    "#4477aa", "#ee6677", "#228833", "#ccbb44", "#66ccee", "#aa3377", "#332288", "#117733",
    "#999933", "#882255", "#44aa99", "#cc6677", "#ddcc77", "#aa4499", "#88ccee", "#555555"};

enum class MarkerShape { kCircle, kSquare, kTriangle, kDiamond, kTriangleDown };
inline constexpr size_t kMarkerShapeCount = 5;

// Series `i` of a plot: colour i mod 16, shape i / 16, so no two series of
// a plot share both colour and shape (up to 80 series) and the first 16
// differ in colour.
struct SeriesStyle {
  const char* color;
  MarkerShape shape;
};
inline SeriesStyle SeriesStyleOf(size_t i) {
  return {kPalette[i % kPalette.size()], MarkerShape((i / kPalette.size()) % kMarkerShapeCount)};
}

// One op class of the roofline: "gemm <tensor>" for GEMMs reading a weight
// tensor, else the op kind (the trace spellings of docs/trace-format.md).
struct OpClassStyle {
  const char* label;
  const char* color;
  MarkerShape shape;
};

// Every op class a run can have, in a fixed order: a class keeps its colour
// and shape in every run, whichever classes the run has.
inline constexpr std::array<OpClassStyle, 15> kOpClassStyles = {{
    {"gemm attention", "#4477aa", MarkerShape::kCircle},
    {"gemm ffn", "#ee6677", MarkerShape::kSquare},
    {"gemm head", "#228833", MarkerShape::kTriangle},
    {"gemm embedding", "#ccbb44", MarkerShape::kDiamond},
    {"gemm", "#66ccee", MarkerShape::kTriangleDown},
    {"embed", "#aa3377", MarkerShape::kCircle},
    {"attn_scores", "#332288", MarkerShape::kSquare},
    {"attn_values", "#117733", MarkerShape::kTriangle},
    {"softmax", "#999933", MarkerShape::kDiamond},
    {"norm", "#882255", MarkerShape::kTriangleDown},
    {"quantize", "#44aa99", MarkerShape::kCircle},
    {"rope", "#cc6677", MarkerShape::kSquare},
    {"kv_append", "#ddcc77", MarkerShape::kTriangle},
    {"activation", "#aa4499", MarkerShape::kDiamond},
    {"residual", "#88ccee", MarkerShape::kTriangleDown},
}};

// The style of op class `label`; an unknown label (a newer trace) gets the
// last palette colour, a cross-free circle.
inline OpClassStyle OpClassStyleOf(const std::string& label) {
  for (const OpClassStyle& s : kOpClassStyles) {
    if (label == s.label) return s;
  }
  return {"other", kPalette.back(), MarkerShape::kCircle};
}

// A named colour for each member of a fixed set (stall causes, energy
// components, binding resources), in report order.
struct NamedColor {
  const char* key;    // the JSON key
  const char* words;  // how plots label it
  const char* color;
};

inline constexpr std::array<NamedColor, 5> kStallColors = {{
    {"busy", "busy (computing)", "#228833"},
    {"dram_wait", "waiting for DRAM", "#4477aa"},
    {"sram_conflict", "scratchpad bank conflict", "#ccbb44"},
    {"vector_wait", "waiting for the vector unit", "#ee6677"},
    {"idle", "idle", "#bbbbbb"},
}};

inline constexpr std::array<NamedColor, 5> kEnergyColors = {{
    {"arithmetic", "arithmetic", "#ee6677"},
    {"sram", "scratchpad (SRAM)", "#ccbb44"},
    {"dram", "DRAM", "#4477aa"},
    {"decoder", "trit decoder", "#aa3377"},
    {"leakage", "leakage", "#bbbbbb"},
}};

// The six resources of docs/engine.md ("Every resource is a ceiling").
inline constexpr std::array<NamedColor, 6> kResourceColors = {{
    {"dram_bandwidth", "DRAM bandwidth", "#4477aa"},
    {"request_concurrency", "request concurrency (Little's law)", "#aa3377"},
    {"trit_decoder", "trit decoder", "#997700"},
    {"tree_array", "tree array peak", "#222222"},
    {"vector_unit", "vector unit peak", "#228833"},
    {"sram_ports", "scratchpad ports", "#ee6677"},
}};

}  // namespace tritsim
