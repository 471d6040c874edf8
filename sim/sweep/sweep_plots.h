// SVG plots of sweep results, drawn by gnuplot (the `gnuplot` binary on
// PATH, headless svg terminal), the same way as the run plots
// (report/plots.h): for each plot NAME the directory gets NAME.dat (data,
// commented columns), NAME.gp (a readable script; `cd DIR && gnuplot
// NAME.gp` redraws NAME.svg) and NAME.svg, each written under a temporary
// name and renamed into place.
//
// Plots:
// Styles, axis words and scales come from report/plot_style.h.
//
// - front: every ok point as a dot in the plane of the first two
//   objectives, the Pareto front as a line through its points (sorted by
//   the first objective), each front point labelled with its plan index
//   and axis values ("p0007: 128 trees, batch 16"). With three objectives
//   the plane shows the first two and the front holds the points
//   non-dominated in all three.
// - METRIC-by-AXIS: METRIC against the values of one axis, one line per
//   combination of the other axes' values (at most kMaxSeries lines; more
//   combinations are drawn as points without lines), each in its own
//   colour, dash and marker. Axis values that are not all numbers are
//   placed in order of first appearance and labelled; powers of two get a
//   log-2 axis.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "sweep/pareto.h"
#include "sweep/sweep_csv.h"

namespace tritsim {

inline constexpr size_t kMaxSeries = 12;

// Writes front.{dat,gp,svg} into `dir` (created if missing). `selected`
// are the ok rows and their objective values, `front` indices into
// selected.rows. Throws tritsim::Error (kBadInput) "--plots DIR: ..." if
// the directory cannot be written or gnuplot fails.
void WriteFrontPlot(const std::string& dir, const CsvTable& table,
                    const std::vector<Objective>& objectives, const ObjectiveRows& selected,
                    const std::vector<size_t>& front);

// Writes METRIC-by-AXIS.{dat,gp,svg} into `dir` from the ok rows of `table`
// whose axis columns are `axis_keys`. Throws tritsim::Error (kUsage) for
// an unknown axis or metric column, (kBadInput) as WriteFrontPlot.
// Returns the plot's file stem.
std::string WriteAxisPlot(const std::string& dir, const CsvTable& table,
                          const std::vector<std::string>& axis_keys, const std::string& axis,
                          const std::string& metric, const std::string& csv_path);

// The axis columns of a sweep CSV: those between "id" and "status".
std::vector<std::string> AxisColumnsOf(const CsvTable& table);

}  // namespace tritsim
