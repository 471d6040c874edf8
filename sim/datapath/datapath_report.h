// The report of `tritsim datapath`: JSON text (keys in docs/datapath.md) and
// the console summary. Derives nothing beyond ratios and the width formulas.
#pragma once

#include <cstdint>
#include <ostream>
#include <string>

#include "config/arch_config.h"
#include "datapath/datapath_check.h"

namespace tritsim {

inline constexpr const char* kDatapathSchema = "tritsim.datapath/1";

struct DatapathReport {
  const ArchConfig& arch;
  const DatapathInputs& inputs;
  uint64_t seed;  // the --seed the inputs were drawn with
  const DatapathResult& result;
};

std::string DatapathJsonText(const DatapathReport& report);
void PrintDatapath(const DatapathReport& report, std::ostream& out);

}  // namespace tritsim
