// Drawing one plot with gnuplot (the Debian `gnuplot` binary on PATH,
// headless svg terminal), shared by the run plots and the sweep plots.
#pragma once

#include <string>

namespace tritsim {

// Writes DIR/NAME.dat and DIR/NAME.gp atomically (creating DIR if missing),
// runs `gnuplot -e 'outfile="NAME.svg.tmp"' NAME.gp` with DIR as working
// directory, and renames the result to DIR/NAME.svg. The script must write
// to `outfile` (so a user can redraw with `cd DIR && gnuplot NAME.gp`).
// Throws tritsim::Error (kBadInput) "--plots DIR: ..." when a file cannot be
// written or gnuplot is missing or fails; then no NAME.svg or temporary is
// left behind.
void RenderGnuplot(const std::string& dir, const std::string& name, const std::string& data,
                   const std::string& script);

}  // namespace tritsim
