// Options of one simulation run that are not part of the design point.
#pragma once

#include <cstdint>
#include <string>

namespace tritsim {

class DramCommandLog;

struct SimOptions {
  // Treat every weight tensor as already resident in the scratchpad: no
  // weight DMA. For what-if studies and for checking the array's closed-form
  // cycle count. Default off.
  bool weights_resident = false;
  // Write unit activity as a VCD (IEEE 1364) file here; empty: none.
  std::string vcd_path;
  // Write the DRAM command log (docs/dram-log.md) here; empty: none. At most
  // dram_log_limit commands (>= 1), then a truncation line.
  std::string dram_log_path;
  int64_t dram_log_limit = 1000000;
  // Set by RunSimulation while it writes dram_log_path; callers leave it null.
  DramCommandLog* dram_log = nullptr;
};

}  // namespace tritsim
