// DRAM preset tables. Each value names its source and a confidence level,
// as in docs/references.md: H read in a standard or datasheet, M
// several secondary copies agree, L from memory only.
//
// Timing is in DRAM clock cycles of our convention: two data transfers per
// tCK. Values specified in ns are converted with ceil(ns / tCK), the usual
// rounding of a minimum delay up to whole clocks (common practice).
#include "config/dram_presets.h"

#include <algorithm>
#include <cmath>

#include "common/error.h"
#include "config/config_loader.h"

namespace tritsim {
namespace {

// Divides with a small tolerance so that e.g. 3900 ns at tCK 1/1.8 ns gives
// 7020 cycles, not 7021 from floating-point noise.
int64_t NsToCycles(double ns, double tck_ns) {
  constexpr double kRoundingSlack = 1e-9;
  return static_cast<int64_t>(std::ceil(ns / tck_ns - kRoundingSlack));
}

// DDR4-3200AA, 8 Gb x8 devices, 64-bit channel (JESD79-4 and device
// datasheets, via docs/references.md).
void ApplyDdr4_3200(DramConfig& d) {
  d.bus_width_bits = 64;  // one 64-bit channel (JESD79-4 DIMM; H)
  d.bank_groups = 4;      // 4 bank groups for x8 (JESD79-4; H)
  d.banks_per_group = 4;  // 4 banks per group (JESD79-4; H)
  d.row_bytes = 8192;     // 1 KB page per x8 device x 8 devices (JESD79-4; H)
  DramTiming& t = d.timing;
  t.tCK_ns = 0.625;    // 1600 MHz clock, 3200 MT/s (JESD79-4; H)
  t.CL = 22;           // 13.75 ns, speed bin 3200AA (JESD79-4; H)
  t.CWL = 16;          // CWL for 3200 without write preamble option (JESD79-4; M)
  t.tRCD = 22;         // 13.75 ns (JESD79-4; H)
  t.tRP = 22;          // 13.75 ns (JESD79-4; H)
  t.tRAS = 52;         // 32 ns (JESD79-4; H)
  t.tRC = 74;          // 45.75 ns = tRAS + tRP (JESD79-4; H)
  t.tCCD_S = 4;        // (JESD79-4; H)
  t.tCCD_L = 8;        // 5 ns at 3200 (JESD79-4; H)
  t.tRRD_S = 4;        // 1 KB page (JESD79-4; L, docs/references.md)
  t.tRRD_L = 8;        // 1 KB page (JESD79-4; M)
  t.tFAW = 34;         // 21 ns, 1 KB page (JESD79-4; M)
  t.tWR = 24;          // 15 ns (JESD79-4; H)
  t.tWTR_S = 4;        // 2.5 ns (JESD79-4; M)
  t.tWTR_L = 12;       // 7.5 ns (JESD79-4; M)
  t.tRTP = 12;         // 7.5 ns (JESD79-4; M)
  t.tRFC = 560;        // tRFC1 350 ns, 8 Gb device (JESD79-4; H)
  t.tREFI = 12480;     // 7.8 us, normal temperature (JESD79-4; H)
  t.burst_length = 8;  // BL8 (JESD79-4; H)
}

// LPDDR5-6400, one x16 channel (JESD209-5, via docs/references.md). tCK here is
// our two-transfers-per-tCK unit, 1 / 3200 MHz = 0.3125 ns (a quarter of the
// 800 MHz command clock period), so ns values convert at 0.3125 ns/cycle.
void ApplyLpddr5_6400(DramConfig& d) {
  constexpr double kTck = 0.3125;  // 6400 MT/s / 2 (JESD209-5 data rate; H)
  d.bus_width_bits = 16;           // x16 channel (JESD209-5; H)
  d.bank_groups = 4;               // BG mode above 3200 Mbps (JESD209-5; M)
  d.banks_per_group = 4;           // 16 banks (JESD209-5; M)
  d.row_bytes = 2048;              // 2 KB page per x16 channel (JESD209-5; L)
  DramTiming& t = d.timing;
  t.tCK_ns = kTck;
  t.CL = NsToCycles(21.25, kTck);      // RL 17 nCK of 800 MHz CK (JESD209-5; L)
  t.CWL = NsToCycles(11.25, kTck);     // WL 9 nCK of 800 MHz CK (JESD209-5; L)
  t.tRCD = NsToCycles(18.0, kTck);     // 18 ns (JESD209-5; L)
  t.tRP = NsToCycles(18.0, kTck);      // tRPpb 18 ns (JESD209-5; L)
  t.tRAS = NsToCycles(42.0, kTck);     // 42 ns (JESD209-5; L)
  t.tRC = t.tRAS + t.tRP;              // tRC = tRAS + tRPpb (JESD209-5; L)
  t.tCCD_S = 8;                        // BL16 / 2 (JESD209-5; M)
  t.tCCD_L = 16;                       // same bank group, BG mode (JESD209-5; L)
  t.tRRD_S = NsToCycles(5.0, kTck);    // 5 ns (JESD209-5; L)
  t.tRRD_L = NsToCycles(5.0, kTck);    // 5 ns (JESD209-5; L)
  t.tFAW = NsToCycles(20.0, kTck);     // 20 ns (JESD209-5; L)
  t.tWR = NsToCycles(34.0, kTck);      // 34 ns (JESD209-5; L)
  t.tWTR_S = NsToCycles(6.25, kTck);   // 6.25 ns (JESD209-5; L)
  t.tWTR_L = NsToCycles(12.0, kTck);   // 12 ns (JESD209-5; L)
  t.tRTP = NsToCycles(7.5, kTck);      // 7.5 ns (JESD209-5; L)
  t.tRFC = NsToCycles(280.0, kTck);    // tRFCab 280 ns, 8 Gb die (JESD209-5; L)
  t.tREFI = NsToCycles(3900.0, kTck);  // 3.9 us (JESD209-5; L)
  t.burst_length = 16;                 // BL16 (JESD209-5; H)
}

// HBM2E at 3.6 Gb/s per pin, one 64-bit pseudo-channel (JESD235 family, via
// docs/references.md). tCK = 1 / 1.8 GHz = 0.5556 ns.
void ApplyHbm2e(DramConfig& d) {
  constexpr double kTck = 1000.0 / 1800.0;  // 3.6 Gb/s / 2 (JESD235; H)
  d.bus_width_bits = 64;  // pseudo-channel mode, 16 x 64 bits per stack (JESD235A; H)
  d.bank_groups = 4;      // (JESD235A; M)
  d.banks_per_group = 4;  // 16 banks per pseudo-channel (JESD235A; M)
  d.row_bytes = 1024;     // 1 KB page per pseudo-channel (JESD235A; M)
  DramTiming& t = d.timing;
  t.tCK_ns = kTck;
  t.CL = NsToCycles(14.0, kTck);       // about 14 ns (JESD235; L)
  t.CWL = NsToCycles(4.0, kTck);       // a few nCK (JESD235; L)
  t.tRCD = NsToCycles(14.0, kTck);     // about 14 ns (JESD235; L)
  t.tRP = NsToCycles(14.0, kTck);      // about 14 ns (JESD235; L)
  t.tRAS = NsToCycles(33.0, kTck);     // 33 ns (JESD235; L)
  t.tRC = t.tRAS + t.tRP;              // tRC = tRAS + tRP (common practice)
  t.tCCD_S = 2;                        // BL4 / 2 (JESD235A; M)
  t.tCCD_L = 4;                        // same bank group (JESD235A; M)
  t.tRRD_S = 4;                        // (JESD235; L)
  t.tRRD_L = 6;                        // (JESD235; L)
  t.tFAW = NsToCycles(16.0, kTck);     // 16 ns (JESD235; L)
  t.tWR = NsToCycles(16.0, kTck);      // 16 ns (JESD235; L)
  t.tWTR_S = NsToCycles(2.5, kTck);    // 2.5 ns (JESD235; L)
  t.tWTR_L = NsToCycles(7.5, kTck);    // 7.5 ns (JESD235; L)
  t.tRTP = NsToCycles(7.5, kTck);      // 7.5 ns (JESD235; L)
  t.tRFC = NsToCycles(350.0, kTck);    // 350 ns, 8 Gb channel (JESD235; L)
  t.tREFI = NsToCycles(3900.0, kTck);  // 3.9 us (JESD235; L)
  t.burst_length = 4;                  // BL4 (JESD235A; H)
}

// Fixed-latency, fixed-bandwidth memory for sanity runs; the timing fields
// keep their DDR4-3200 defaults and are not used.
void ApplyIdeal(DramConfig& d) {
  d.ideal_latency_ns = 50.0;      // a typical DRAM load-to-use latency (common practice)
  d.ideal_bandwidth_gbps = 25.6;  // one DDR4-3200 channel (JESD79-4; H)
}

// Resets the fields a preset owns, so that the result does not depend on
// what `dram` held before (e.g. switching an LPDDR5 config to ideal).
void ResetPresetFields(DramConfig& dram) {
  const DramConfig fresh;
  dram.bus_width_bits = fresh.bus_width_bits;
  dram.bank_groups = fresh.bank_groups;
  dram.banks_per_group = fresh.banks_per_group;
  dram.row_bytes = fresh.row_bytes;
  dram.timing = fresh.timing;
  dram.ideal_latency_ns = fresh.ideal_latency_ns;
  dram.ideal_bandwidth_gbps = fresh.ideal_bandwidth_gbps;
}

// Refresh energy inputs: one all-bank REF draws (IDD5B - IDD3N) at VDD for
// tRFC in each device (the usual datasheet power calculation, common
// practice; docs/references.md). Devices per channel: a DDR4 64-bit channel
// is a rank of eight x8 devices; an LPDDR5 x16 channel and an HBM2E
// pseudo-channel are one device's channel each.
//
// DDR4 8 Gb x8: about 0.2 A above standby at 1.2 V (L, from memory).
constexpr double kDdr4RefreshAmps = 0.2;
constexpr double kDdr4Vdd = 1.2;  // (JESD79-4; H)
constexpr int kDdr4DevicesPerChannel = 8;
// LPDDR5 x16 channel of one die: about 0.1 A above standby at VDD2H 1.05 V (L).
constexpr double kLpddr5RefreshAmps = 0.1;
constexpr double kLpddr5Vdd = 1.05;  // VDD2H (JESD209-5; M)
// HBM2E pseudo-channel: about 0.05 A above standby, half a channel's (L), at 1.2 V.
constexpr double kHbm2eRefreshAmps = 0.05;
constexpr double kHbm2eVdd = 1.2;  // (JESD235; M)

// Capacity per channel, from common device densities (docs/references.md,
// "Capacities": common practice, L): a DDR4 64-bit channel commonly holds
// 8 - 32 GiB (one DIMM); a phone carries 8 - 16 GB of LPDDR5 over four x16
// channels; an HBM2E stack of eight 16 Gb dies holds 16 GiB over 16
// pseudo-channels (JESD235 allows 4/8/12-Hi stacks; M).
constexpr double kDdr4ChannelGib = 16.0;   // one 16 GiB DIMM (common practice, L)
constexpr double kLpddr5ChannelGib = 3.0;  // 4 channels = a 12 GiB phone (common practice, L)
constexpr double kHbm2eChannelGib = 1.0;   // 16 GiB stack / 16 pseudo-channels (JESD235; M)
constexpr double kIdealChannelGib = 16.0;  // as the DDR4 channel it stands in for
constexpr const char* kCapacitySource = "docs/references.md, Capacities (common practice; L)";

// The preset table: one row per preset, everything tritsim knows of it.
const std::vector<DramPreset>& Table() {
  static const std::vector<DramPreset> kTable = {
      {"ddr4-3200", ApplyDdr4_3200, 17.5,
       "midpoint of 15 - 20 pJ/bit for DDR4 (docs/references.md; L)", kDdr4RefreshAmps, kDdr4Vdd,
       kDdr4DevicesPerChannel, kDdr4ChannelGib, kCapacitySource},
      {"lpddr5-6400", ApplyLpddr5_6400, 6.0,
       "midpoint of 4 - 8 pJ/bit for LPDDR4/5 (docs/references.md; L)", kLpddr5RefreshAmps,
       kLpddr5Vdd, 1, kLpddr5ChannelGib, kCapacitySource},
      {"hbm2e", ApplyHbm2e, 3.97, "HBM2, O'Connor et al., MICRO 2017 (M; assumed equal for HBM2E)",
       kHbm2eRefreshAmps, kHbm2eVdd, 1, kHbm2eChannelGib,
       "16 GiB HBM2E stack of eight 16 Gb dies, 16 pseudo-channels (JESD235; M)"},
      // Ideal memory: the DDR4 per-bit value, so sanity runs cost like the
      // default channel; no refresh.
      {"ideal", ApplyIdeal, 17.5, "the ddr4-3200 value (sanity runs)", 0.0, 0.0, 0,
       kIdealChannelGib, "the ddr4-3200 value (sanity runs)"},
  };
  return kTable;
}

}  // namespace

double DramPreset::RefreshPjPerChannel() const {
  if (devices_per_channel == 0) return 0.0;
  DramConfig dram;
  apply(dram);
  constexpr double kPjPerAmpVoltNs = 1e3;  // A x V x ns = nJ = 1e3 pJ
  const double trfc_ns = double(dram.timing.tRFC) * dram.timing.tCK_ns;
  return double(devices_per_channel) * refresh_amps * vdd_volts * trfc_ns * kPjPerAmpVoltNs;
}

const std::vector<DramPreset>& DramPresetTable() { return Table(); }

const std::vector<std::string>& DramPresetNames() {
  static const std::vector<std::string> kNames = [] {
    std::vector<std::string> names;
    for (const DramPreset& p : Table()) names.push_back(p.name);
    return names;
  }();
  return kNames;
}

const DramPreset* FindDramPreset(const std::string& name) {
  for (const DramPreset& p : Table()) {
    if (p.name == name) return &p;
  }
  return nullptr;
}

bool IsDramPreset(const std::string& name) { return FindDramPreset(name) != nullptr; }

const DramPreset& DramPresetOrThrow(const std::string& name) {
  const DramPreset* preset = FindDramPreset(name);
  if (preset) return *preset;
  std::string allowed;
  for (const std::string& n : DramPresetNames()) allowed += (allowed.empty() ? "" : " | ") + n;
  throw Error(ExitCode::kBadInput,
              "dram.preset: unknown preset '" + name + "'; allowed: " + allowed);
}

void ApplyDramPreset(const std::string& preset, DramConfig& dram) {
  const DramPreset& row = DramPresetOrThrow(preset);
  ResetPresetFields(dram);
  row.apply(dram);
  dram.preset = preset;
}

int64_t DramBurstBytes(const DramConfig& dram) {
  return dram.bus_width_bits / 8 * dram.timing.burst_length;
}

double DramCapacityBytes(const DramConfig& dram) {
  constexpr double kBytesPerGib = 1024.0 * 1024.0 * 1024.0;
  if (dram.capacity_gib > 0) return dram.capacity_gib * kBytesPerGib;
  const double per_channel = DramPresetOrThrow(dram.preset).capacity_gib;
  return per_channel * static_cast<double>(dram.channels) * kBytesPerGib;
}

double DramPeakBytesPerSecond(const DramConfig& dram) {
  constexpr double kBytesPerGb = 1e9;
  if (dram.is_ideal()) return dram.ideal_bandwidth_gbps * kBytesPerGb;
  constexpr double kTransfersPerTck = 2.0;  // double data rate
  constexpr double kNsPerSecond = 1e9;
  const double transfers_per_second = kTransfersPerTck / dram.timing.tCK_ns * kNsPerSecond;
  return static_cast<double>(dram.channels) * transfers_per_second *
         static_cast<double>(dram.bus_width_bits / 8);
}

double DramRowHitLatencyNs(const DramConfig& dram) {
  if (dram.is_ideal()) return dram.ideal_latency_ns;
  const DramTiming& t = dram.timing;
  return (double(t.CL) + double(t.burst_length) / 2.0) * t.tCK_ns;
}

double DramShortestLatencyNs(const DramConfig& dram) {
  if (dram.is_ideal()) return dram.ideal_latency_ns;
  const DramTiming& t = dram.timing;
  return (double(std::min(t.CL, t.CWL)) + double(t.burst_length) / 2.0) * t.tCK_ns;
}

double DramRowMissLatencyNs(const DramConfig& dram) {
  if (dram.is_ideal()) return dram.ideal_latency_ns;
  return DramRowHitLatencyNs(dram) + double(dram.timing.tRCD) * dram.timing.tCK_ns;
}

}  // namespace tritsim
