// An independent checker of DRAM command logs (docs/dram-log.md), written
// from the JEDEC rules, not from the simulator's channel code: JESD79-4
// (DDR4), JESD209-5 (LPDDR5) and JESD235 (HBM2) state the same minimum
// delays under the same names, which the log header gives in nCK.
//
// Checked, per channel: command times on the clock grid and in time order;
// same bank tRCD, tRAS, tRP, tRC, tRTP and write recovery (PRE no earlier
// than WR + CWL + BL/2 + tWR); tRRD_S / tRRD_L and at most four ACTs in any
// tFAW; tCCD_S / tCCD_L; write-to-read tWTR_S / tWTR_L from the end of write
// data; column commands only to the open row; ACT only to a precharged
// bank; all banks precharged (tRP done) at REF; nothing before REF + tRFC;
// REFs at most 9 x tREFI apart and no more than 8 owed by the end of the log
// (JESD79-4 allows up to 8 postponed refreshes; the others alike).
#pragma once

#include <cstdint>
#include <string>
#include <vector>

namespace tritsim::test {

struct DramLogSummary {
  uint64_t commands = 0;
  uint64_t acts = 0, pres = 0, reads = 0, writes = 0, refreshes = 0;
  bool truncated = false;
  std::vector<std::string> violations;  // "line N: RULE: detail"; empty if clean
};

// Parses and checks a whole log. Malformed lines are violations too.
DramLogSummary CheckDramLog(const std::string& text);

}  // namespace tritsim::test
