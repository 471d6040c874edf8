// Energy per event for one technology node: the built-in tables and the
// resolution of a design point's overrides.
//
// A table maps entry names (e.g. "int8_add", "sram_64bit_32kib") to pJ per
// event; "leakage_mw_per_mm2" is in mW per mm^2 and the "*_pj_per_bit"
// entries are pJ per bit moved. Every built-in value names its published
// source and confidence (H/M/L as in docs/references.md) in energy_table.cc.
#pragma once

#include <map>
#include <string>
#include <vector>

#include "config/arch_config.h"

namespace tritsim {

// Entry names that every table holds, besides the per-preset DRAM entries.
inline constexpr const char* kDramPjPerBitEntry = "dram_pj_per_bit";
inline constexpr const char* kLeakageEntry = "leakage_mw_per_mm2";

struct EnergyTable {
  std::string node;                       // "7nm" or "45nm"
  std::map<std::string, double> entries;  // name -> pJ per event (see above)

  // The entry `name`. Throws tritsim::Error (kInternal) for a name the table
  // lacks: callers inside tritsim only ask for names they put there.
  double pj(const std::string& name) const;
};

// Node names in the order messages list them: 7nm, 45nm.
const std::vector<std::string>& EnergyNodeNames();

// The built-in table of `node`, without a resolved "dram_pj_per_bit" entry
// (that depends on the DRAM preset; see ResolveEnergyTable). Holds the
// per-preset entries "ddr4_3200_pj_per_bit", "lpddr5_6400_pj_per_bit",
// "hbm2e_pj_per_bit", "ideal_pj_per_bit". Throws tritsim::Error (kBadInput)
// for an unknown node: "energy.node: unknown node 'x'; allowed: 7nm | 45nm".
EnergyTable BuiltinEnergyTable(const std::string& node);

// Name of the per-preset DRAM entry, e.g. "ddr4-3200" -> "ddr4_3200_pj_per_bit".
std::string DramPresetEntryName(const std::string& dram_preset);

// The table a design point runs with: the node's built-in table, then each
// of `energy.overrides_pj` (value must be finite and >= 0), then the entry
// "dram_pj_per_bit" set to, in order of precedence: energy.dram_pj_per_bit
// when >= 0; an override named "dram_pj_per_bit"; the (possibly overridden)
// entry of `dram_preset`. Throws tritsim::Error (kBadInput) for an unknown
// node, an unknown preset, an unknown override name
// ("energy.overrides.NAME: unknown entry; did you mean 'X'? known: ...") or
// a negative value.
EnergyTable ResolveEnergyTable(const EnergyConfig& energy, const std::string& dram_preset);

// Energy of one SRAM access, pJ: log-log interpolation in array size between
// the table's 64-bit access points at 8 KiB, 32 KiB and 1 MiB
// (sram_64bit_8kib, sram_64bit_32kib, sram_64bit_1mib), extrapolated beyond
// them with the slope of the end segment, then scaled linearly by
// access_bytes / 8. REQUIRES: array_bytes > 0, access_bytes > 0 (else
// tritsim::Error kInternal).
double SramAccessPj(const EnergyTable& table, double array_bytes, double access_bytes);

}  // namespace tritsim
