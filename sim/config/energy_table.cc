#include "config/energy_table.h"

#include <algorithm>
#include <cmath>
#include <iterator>

#include "common/error.h"

namespace tritsim {
namespace {

// ---------------------------------------------------------------------------
// 45 nm, 0.9 V: Horowitz, "Computing's energy problem", ISSCC 2014 (M).
constexpr double k45Int8AddPj = 0.03;    // Horowitz 2014 (M)
constexpr double k45Int16AddPj = 0.05;   // Horowitz 2014 (M)
constexpr double k45Int32AddPj = 0.1;    // Horowitz 2014 (M)
constexpr double k45Int8MultPj = 0.2;    // Horowitz 2014 (M)
constexpr double k45Int32MultPj = 3.1;   // Horowitz 2014 (M)
constexpr double k45Fp16AddPj = 0.4;     // Horowitz 2014 (M)
constexpr double k45Fp16MultPj = 1.1;    // Horowitz 2014 (M)
constexpr double k45Fp32AddPj = 0.9;     // Horowitz 2014 (M)
constexpr double k45Fp32MultPj = 3.7;    // Horowitz 2014 (M)
constexpr double k45Sram8KibPj = 10.0;   // 64-bit access, 8 KB array, Horowitz 2014 (M)
constexpr double k45Sram32KibPj = 20.0;  // 64-bit access, 32 KB array, Horowitz 2014 (M)
constexpr double k45Sram1MibPj = 100.0;  // 64-bit access, 1 MB array, Horowitz 2014 (M)

// ---------------------------------------------------------------------------
// 7 nm: Wang et al. 2023, arXiv:2310.11453, Table 2 (reused by Ma et al. 2024).
constexpr double k7Int8AddPj = 0.007;  // Wang et al. 2023 Table 2 (M)
constexpr double k7Int8MultPj = 0.07;  // Wang et al. 2023 Table 2 (M)
constexpr double k7Fp16AddPj = 0.16;   // Wang et al. 2023 Table 2 (L; the 71.4x ratio confirms it)
constexpr double k7Fp16MultPj = 0.34;  // Wang et al. 2023 Table 2 (L; the 71.4x ratio confirms it)
constexpr double k7Fp32AddPj = 0.38;   // Wang et al. 2023 Table 2 (M)
constexpr double k7Fp32MultPj = 1.31;  // Wang et al. 2023 Table 2 (M)

// Entries the 7 nm table lacks, scaled from 45 nm (estimates, L):
// - wider integer adders: by the int8 add ratio of the two tables,
//   0.007 / 0.03 = 0.233, since adders of the same design scale alike;
constexpr double k7AdderScale = k7Int8AddPj / k45Int8AddPj;
// - the int32 multiplier: by the int8 multiply ratio, 0.07 / 0.2 = 0.35;
constexpr double k7MultScale = k7Int8MultPj / k45Int8MultPj;
// - SRAM: by 0.4, the slow end of the table's logic ratios (FP16 add
//   0.16/0.4 = 0.40, FP32 add 0.38/0.9 = 0.42). SRAM access energy is mostly
//   bitline and wire charging, which shrinks more slowly than logic, so we
//   take the least favourable logic ratio rather than the int8 add's 0.233.
constexpr double k7SramScale = 0.4;

// ---------------------------------------------------------------------------
// Shared by both tables. DRAM is its own die and process: its energy does
// not follow the logic node.
// DDR4-3200: 17.5 pJ/bit, the midpoint of the 15 - 20 pJ/bit range (L).
constexpr double kDdr4PjPerBit = 17.5;
// LPDDR5-6400: 6 pJ/bit, the midpoint of the 4 - 8 pJ/bit LPDDR4/5 range (L).
constexpr double kLpddr5PjPerBit = 6.0;
// HBM2E: 3.97 pJ/bit, HBM2 in O'Connor et al., MICRO 2017 (M; applied to
// HBM2E on the assumption that the faster interface costs the same per bit).
constexpr double kHbm2ePjPerBit = 3.97;
// Ideal memory: the DDR4 value, so sanity runs cost like the default channel.
constexpr double kIdealPjPerBit = kDdr4PjPerBit;
// The per-bit figures are whole-access figures from the literature, which
// already hold row activation at typical locality. The activate and refresh
// entries below charge activations and refreshes explicitly on top: with an
// open 8 KiB row streamed whole that adds 1000 pJ / 65536 bit = 0.015 pJ/bit
// (< 0.1% of DDR4), while a random 64-bit access pays 1 nJ + 64 * 17.5 pJ =
// 2.1 nJ, inside the 1.3 - 2.6 nJ per 64-bit DRAM access of Horowitz 2014.
// One ACT(+PRE) across a channel-wide DDR4 row (8 KiB over eight x8 devices):
// about 1 nJ (from memory, L; chosen to agree with the Horowitz range above).
constexpr double kDramActivatePj = 1000.0;
// One all-bank REF of a DDR4 8 Gb x8 rank: about 0.5 uJ (from memory, L:
// (IDD5B - IDD3N) ~ 0.2 A x VDD 1.2 V x tRFC 350 ns ~ 80 nJ per device, times
// eight devices, rounded down) -- about 64 mW per rank at tREFI = 7.8 us.
constexpr double kDramRefreshPj = 500000.0;

// Trit decoder, pJ per packed base-3 byte expanded into 5 trits: a 243-entry
// x 10-bit lookup (8-bit decode plus a mux tree per output bit), estimated as
// the switched capacitance of about four 8-bit adders (L).
constexpr double kDecoderByteInInt8Adds = 4.0;
// Special function (exp, rsqrt, activation): about ten FP16 multiplies (a
// range reduction, a short polynomial or table plus interpolation) (L).
constexpr double kSpecialInFp16Mults = 10.0;
// Static power density, mW per mm^2 of the estimated die area: order of
// magnitude from memory (L); it depends strongly on threshold-voltage mix
// and temperature, so treat it as a knob.
constexpr double k7LeakageMwPerMm2 = 5.0;
constexpr double k45LeakageMwPerMm2 = 2.0;

const char* const kSram8KibEntry = "sram_64bit_8kib";
const char* const kSram32KibEntry = "sram_64bit_32kib";
const char* const kSram1MibEntry = "sram_64bit_1mib";
constexpr double kSram8KibBytes = 8.0 * 1024.0;
constexpr double kSram32KibBytes = 32.0 * 1024.0;
constexpr double kSram1MibBytes = 1024.0 * 1024.0;
constexpr double kSramPointAccessBytes = 8.0;  // the published points are 64-bit accesses

// The DRAM and leakage entries shared by both tables.
void AddCommonEntries(std::map<std::string, double>& e, double leakage_mw_per_mm2) {
  e[DramPresetEntryName("ddr4-3200")] = kDdr4PjPerBit;
  e[DramPresetEntryName("lpddr5-6400")] = kLpddr5PjPerBit;
  e[DramPresetEntryName("hbm2e")] = kHbm2ePjPerBit;
  e[DramPresetEntryName("ideal")] = kIdealPjPerBit;
  e["dram_activate_pj"] = kDramActivatePj;
  e["dram_refresh_pj"] = kDramRefreshPj;
  e[kLeakageEntry] = leakage_mw_per_mm2;
}

// Decoder and special-function entries, derived from the node's own ops.
void AddDerivedEntries(std::map<std::string, double>& e) {
  e["trit_decoder_byte"] = kDecoderByteInInt8Adds * e.at("int8_add");
  e["special_function"] = kSpecialInFp16Mults * e.at("fp16_mult");
}

EnergyTable Table45nm() {
  EnergyTable t;
  t.node = "45nm";
  auto& e = t.entries;
  e["int8_add"] = k45Int8AddPj;
  e["int16_add"] = k45Int16AddPj;
  e["int32_add"] = k45Int32AddPj;
  e["int8_mult"] = k45Int8MultPj;
  e["int32_mult"] = k45Int32MultPj;
  e["fp16_add"] = k45Fp16AddPj;
  e["fp16_mult"] = k45Fp16MultPj;
  e["fp32_add"] = k45Fp32AddPj;
  e["fp32_mult"] = k45Fp32MultPj;
  e[kSram8KibEntry] = k45Sram8KibPj;
  e[kSram32KibEntry] = k45Sram32KibPj;
  e[kSram1MibEntry] = k45Sram1MibPj;
  AddCommonEntries(e, k45LeakageMwPerMm2);
  AddDerivedEntries(e);
  return t;
}

EnergyTable Table7nm() {
  EnergyTable t;
  t.node = "7nm";
  auto& e = t.entries;
  e["int8_add"] = k7Int8AddPj;
  e["int16_add"] = k45Int16AddPj * k7AdderScale;  // scaled, L
  e["int32_add"] = k45Int32AddPj * k7AdderScale;  // scaled, L
  e["int8_mult"] = k7Int8MultPj;
  e["int32_mult"] = k45Int32MultPj * k7MultScale;  // scaled, L
  e["fp16_add"] = k7Fp16AddPj;
  e["fp16_mult"] = k7Fp16MultPj;
  e["fp32_add"] = k7Fp32AddPj;
  e["fp32_mult"] = k7Fp32MultPj;
  e[kSram8KibEntry] = k45Sram8KibPj * k7SramScale;    // scaled, L
  e[kSram32KibEntry] = k45Sram32KibPj * k7SramScale;  // scaled, L
  e[kSram1MibEntry] = k45Sram1MibPj * k7SramScale;    // scaled, L
  AddCommonEntries(e, k7LeakageMwPerMm2);
  AddDerivedEntries(e);
  return t;
}

std::string JoinNames(const std::vector<std::string>& names, const char* sep) {
  std::string out;
  for (const auto& n : names) {
    if (!out.empty()) out += sep;
    out += n;
  }
  return out;
}

// Levenshtein distance, for "did you mean" suggestions.
size_t EditDistance(const std::string& a, const std::string& b) {
  std::vector<size_t> row(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t diagonal = row[0];
    row[0] = i;
    for (size_t j = 1; j <= b.size(); ++j) {
      size_t above = row[j];
      size_t substitute = diagonal + (a[i - 1] == b[j - 1] ? 0 : 1);
      row[j] = std::min({above + 1, row[j - 1] + 1, substitute});
      diagonal = above;
    }
  }
  return row[b.size()];
}

std::string Nearest(const std::string& name, const std::vector<std::string>& known) {
  std::string best;
  size_t best_distance = ~size_t{0};
  for (const auto& k : known) {
    size_t d = EditDistance(name, k);
    if (d < best_distance) {
      best_distance = d;
      best = k;
    }
  }
  return best;
}

// Names an override may use: every built-in entry plus "dram_pj_per_bit".
std::vector<std::string> OverridableNames(const EnergyTable& table) {
  std::vector<std::string> names;
  for (const auto& entry : table.entries) names.push_back(entry.first);
  names.push_back(kDramPjPerBitEntry);
  std::sort(names.begin(), names.end());
  return names;
}

void CheckOverrideValue(const std::string& key, double value) {
  if (!std::isfinite(value) || value < 0.0) {
    throw Error(ExitCode::kBadInput,
                key + ": value " + std::to_string(value) + " not allowed; must be finite and >= 0");
  }
}

void ApplyOverrides(const EnergyConfig& energy, EnergyTable& table) {
  const std::vector<std::string> known = OverridableNames(table);
  for (const auto& [name, value] : energy.overrides_pj) {
    const std::string key = "energy.overrides." + name;
    if (!std::binary_search(known.begin(), known.end(), name)) {
      throw Error(ExitCode::kBadInput, key + ": unknown entry; did you mean '" +
                                           Nearest(name, known) +
                                           "'? known: " + JoinNames(known, ", "));
    }
    CheckOverrideValue(key, value);
    if (name.rfind("sram_", 0) == 0 && value <= 0.0) {
      throw Error(ExitCode::kBadInput, key + ": value must be > 0 (log-log interpolation)");
    }
    table.entries[name] = value;
  }
}

const std::vector<std::string>& KnownDramPresets() {
  static const std::vector<std::string> names = {"ddr4-3200", "lpddr5-6400", "hbm2e", "ideal"};
  return names;
}

double ResolvedDramPjPerBit(const EnergyConfig& energy, const std::string& dram_preset,
                            const EnergyTable& table) {
  if (energy.dram_pj_per_bit >= 0.0) {
    CheckOverrideValue("energy.dram_pj_per_bit", energy.dram_pj_per_bit);
    return energy.dram_pj_per_bit;
  }
  auto direct = energy.overrides_pj.find(kDramPjPerBitEntry);
  if (direct != energy.overrides_pj.end()) return direct->second;
  const auto& presets = KnownDramPresets();
  if (std::find(presets.begin(), presets.end(), dram_preset) == presets.end()) {
    throw Error(ExitCode::kBadInput, "dram.preset: unknown preset '" + dram_preset +
                                         "'; allowed: " + JoinNames(presets, " | "));
  }
  return table.pj(DramPresetEntryName(dram_preset));
}

// Log-log interpolation of y(x) on the segment (x0, y0) - (x1, y1), also
// used beyond its ends.
double LogLogInterpolate(double x, double x0, double y0, double x1, double y1) {
  double slope = std::log(y1 / y0) / std::log(x1 / x0);
  return y0 * std::exp(slope * std::log(x / x0));
}

}  // namespace

double EnergyTable::pj(const std::string& name) const {
  auto it = entries.find(name);
  if (it == entries.end()) {
    throw Error(ExitCode::kInternal, "energy table " + node + ": no entry '" + name + "'");
  }
  return it->second;
}

const std::vector<std::string>& EnergyNodeNames() {
  static const std::vector<std::string> names = {"7nm", "45nm"};
  return names;
}

EnergyTable BuiltinEnergyTable(const std::string& node) {
  if (node == "7nm") return Table7nm();
  if (node == "45nm") return Table45nm();
  throw Error(ExitCode::kBadInput, "energy.node: unknown node '" + node +
                                       "'; allowed: " + JoinNames(EnergyNodeNames(), " | "));
}

std::string DramPresetEntryName(const std::string& dram_preset) {
  std::string name = dram_preset;
  std::replace(name.begin(), name.end(), '-', '_');
  return name + "_pj_per_bit";
}

EnergyTable ResolveEnergyTable(const EnergyConfig& energy, const std::string& dram_preset) {
  EnergyTable table = BuiltinEnergyTable(energy.node);
  ApplyOverrides(energy, table);
  table.entries[kDramPjPerBitEntry] = ResolvedDramPjPerBit(energy, dram_preset, table);
  return table;
}

double SramAccessPj(const EnergyTable& table, double array_bytes, double access_bytes) {
  if (!(array_bytes > 0.0) || !(access_bytes > 0.0)) {
    throw Error(ExitCode::kInternal, "SramAccessPj: array_bytes and access_bytes must be > 0");
  }
  const double e8k = table.pj(kSram8KibEntry);
  const double e32k = table.pj(kSram32KibEntry);
  const double e1m = table.pj(kSram1MibEntry);
  const double per_64bit =
      array_bytes <= kSram32KibBytes
          ? LogLogInterpolate(array_bytes, kSram8KibBytes, e8k, kSram32KibBytes, e32k)
          : LogLogInterpolate(array_bytes, kSram32KibBytes, e32k, kSram1MibBytes, e1m);
  return per_64bit * (access_bytes / kSramPointAccessBytes);
}

}  // namespace tritsim
