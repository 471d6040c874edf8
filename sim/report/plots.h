// SVG plots of one run, drawn by gnuplot (the `gnuplot` binary on PATH,
// headless svg terminal), styled from report/plot_style.h.
//
// For each plot NAME the directory gets NAME.dat (the data, commented
// columns), NAME.gp (a readable gnuplot script that reads NAME.dat from its
// own directory; `cd DIR && gnuplot NAME.gp` redraws NAME.svg after
// restyling, `gnuplot -e 'outfile="NAME.png"' NAME.gp` draws a PNG) and
// NAME.svg. Every file is written under a temporary name and renamed into
// place, so a failed or interrupted run leaves no partial file.
//
// Plots:
// - roofline: one panel per phase (prefill, decode), log-log operational
//   intensity (ops per DRAM byte) against achieved ops/s (Williams,
//   Waterman, Patterson, CACM 2009). Every ceiling that applies is its own
//   labelled line: the tree array's and the vector unit's peak ops/s, DRAM
//   bandwidth, request concurrency (Little's law) when below it, and the
//   trit decoder (counting every DRAM byte as a packed weight). One point
//   per op class of the phase, with the class's fixed marker
//   (OpClassStyle); a dotted line rises from it to its own roof, the bound
//   of its binding resource (any of the six, SRAM ports included), and its
//   key entry names that resource and the share of the roof reached.
//   A class that moved no DRAM bytes, did no ops or took no cycles has no
//   finite point: its row is written with NaN coordinates and not drawn.
// - stalls: the tree array's cycles by cause per phase, side by side:
//   stacked bars in percent of the phase's cycles, and in cycles.
// - energy: one bar per component of the EnergyBreakdown, in joules.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "energy/energy_model.h"
#include "results/run_result.h"

namespace tritsim {

// Writes roofline, stalls and energy (.dat, .gp, .svg) into `dir`, creating
// it if missing. Throws tritsim::Error (kBadInput) "--plots DIR: ..." if the
// directory cannot be made or written, or gnuplot is missing or fails; then
// no NAME.svg of the failing plot is left behind (earlier plots stay).
void WriteRunPlots(const std::string& dir, const RunResult& run, const EnergyBreakdown& energy);

// One point of the roofline: the ops of one class in one phase.
struct OpClassPoint {
  std::string label;  // e.g. "gemm ffn", "attn_scores"
  Phase phase = Phase::kDecode;
  uint64_t ops = 0;                              // arithmetic ops, summed over the class's layers
  uint64_t dram_bytes = 0;                       // DRAM bytes, summed
  uint64_t cycles = 0;                           // core cycles, summed
  uint64_t bound_cycles = 0;                     // OpResult::bound_cycles, summed
  Resource bound_by = Resource::kDramBandwidth;  // of the layer with the most bound cycles
  uint64_t most_bound_cycles = 0;                // that layer's bound cycles
};

// Short label of an op's class: GEMMs by weight tensor ("gemm attention",
// "gemm ffn", "gemm head", "gemm embedding", "gemm" without a tensor), all
// other ops by kind ("attn_scores", "softmax", "norm", ...).
std::string OpClassLabel(const TraceOp& op);

// The (phase, class) pairs present in run.layers, in order of first
// appearance.
std::vector<OpClassPoint> GroupOpClasses(const RunResult& run);

}  // namespace tritsim
