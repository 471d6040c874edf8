// Options of one simulation run that are not part of the design point.
#pragma once

#include <string>

namespace tritsim {

struct SimOptions {
  // Treat every weight tensor as already resident in the scratchpad: no
  // weight DMA. For what-if studies and for checking the array's closed-form
  // cycle count. Default off.
  bool weights_resident = false;
  // Write unit activity as a VCD (IEEE 1364) file here; empty: none.
  std::string vcd_path;
};

}  // namespace tritsim
