// Plots of a study table (gnuplot SVG, report/gnuplot.h):
//   DIR/ratios.svg  clustered bars: each figure's ratio to the reference,
//                   one bar per variant (1 = the reference)
//   DIR/memory.svg  stacked bars: weight and KV-cache bytes per variant
// Each comes with its .dat and .gp, so `cd DIR && gnuplot NAME.gp` redraws.
#pragma once

#include <string>

#include "study/study_table.h"

namespace tritsim {

// Throws tritsim::Error (kBadInput) as RenderGnuplot does.
void WriteStudyPlots(const std::string& dir, const StudyTable& table);

}  // namespace tritsim
