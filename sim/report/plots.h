// SVG plots of one run, drawn by gnuplot (the `gnuplot` binary on PATH,
// headless svg terminal).
//
// For each plot NAME the directory gets NAME.dat (the data, commented
// columns), NAME.gp (a readable gnuplot script that reads NAME.dat from its
// own directory; `cd DIR && gnuplot NAME.gp` redraws NAME.svg after
// restyling) and NAME.svg. Every file is written under a temporary name and
// renamed into place, so a failed or interrupted run leaves no partial file.
//
// Plots:
// - roofline: log-log operational intensity (ops per DRAM byte) against
//   achieved ops/s, with the design's ceiling min(peak_ops_per_second,
//   dram_peak_bytes_per_second x intensity) (Williams, Waterman, Patterson,
//   CACM 2009) and one labelled point per op class (see OpClassLabel).
//   A class that moved no DRAM bytes, did no ops or took no cycles has no
//   finite point: its row is written with NaN coordinates and not drawn.
// - stalls: the tree array's cycles by cause (RunResult::stalls, the whole
//   run) as one stacked bar in percent, beside the cycles of each phase.
//   RunResult holds no per-phase stall split, so none is drawn.
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

// One point of the roofline: the ops of one class summed over the run.
struct OpClassPoint {
  std::string label;        // e.g. "gemm ffn", "attn_scores"
  uint64_t ops = 0;         // arithmetic ops, summed over the class's layers
  uint64_t dram_bytes = 0;  // DRAM bytes, summed
  uint64_t cycles = 0;      // core cycles, summed
};

// Short label of an op's class: GEMMs by weight tensor ("gemm attention",
// "gemm ffn", "gemm head", "gemm embedding", "gemm" without a tensor), all
// other ops by kind ("attn_scores", "softmax", "norm", ...).
std::string OpClassLabel(const TraceOp& op);

// The classes present in run.layers, in order of first appearance.
std::vector<OpClassPoint> GroupOpClasses(const RunResult& run);

}  // namespace tritsim
