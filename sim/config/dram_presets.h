// Built-in DRAM presets and the peak-bandwidth arithmetic shared by the
// loader, the memory system and the report layer.
//
// ApplyDramPreset (declared in config/config_loader.h) is defined beside the
// preset tables in dram_presets.cc. A preset fills the per-channel
// organisation (bus width, bank groups, banks, row size) and the JEDEC
// timing (after resetting those fields to the struct defaults, so the result
// does not depend on an earlier preset); it leaves channel count, queue
// depth, page policy and address map alone, because those are system
// choices, not properties of the device.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "config/arch_config.h"

namespace tritsim {

// One built-in DRAM preset: everything tritsim knows of a device standard,
// each value with its source and confidence (dram_presets.cc). The loader
// applies `apply`, the energy table takes the per-bit and refresh energy,
// and a test checks docs/config-reference.md against this table.
struct DramPreset {
  const char* name;               // e.g. "ddr4-3200"
  void (*apply)(DramConfig&);     // organisation and JEDEC timing of one channel
  double pj_per_bit;              // whole-access energy per bit moved
  const char* pj_per_bit_source;  // where pj_per_bit comes from, with confidence
  double refresh_amps;            // IDD5B - IDD3N of one device during a REF, A
  double vdd_volts;               // the supply that current is drawn from, V
  int devices_per_channel;        // devices one REF command reaches (0: no refresh)
  double capacity_gib;            // default capacity of one channel, GiB (2^30 bytes), > 0
  const char* capacity_source;    // where capacity_gib comes from, with confidence

  // Energy of one all-bank REF on one channel, pJ: devices x (IDD5B - IDD3N)
  // x VDD x tRFC (the preset's own tRFC).
  double RefreshPjPerChannel() const;
};

// The presets in the order the docs and error messages list them:
// ddr4-3200, lpddr5-6400, hbm2e, ideal.
const std::vector<DramPreset>& DramPresetTable();
const std::vector<std::string>& DramPresetNames();

// True if `name` is one of DramPresetNames().
bool IsDramPreset(const std::string& name);

// The row of `name`. Throws tritsim::Error (kBadInput) naming the allowed
// presets for an unknown name.
const DramPreset& DramPresetOrThrow(const std::string& name);

// Bytes one request (one burst) moves on one channel:
// bus_width_bits / 8 * burst_length.
int64_t DramBurstBytes(const DramConfig& dram);

// DRAM capacity of the design point, bytes: dram.capacity_gib (a total over
// all channels) when given, else the preset's per-channel capacity x channels.
double DramCapacityBytes(const DramConfig& dram);

// Peak data rate of all channels together, bytes/s, ignoring refresh and
// all other overheads. DDR-style: two transfers per tCK, so
// channels * (2 / tCK) * bus_width_bits / 8. For the ideal preset:
// ideal_bandwidth_gbps * 1e9.
double DramPeakBytesPerSecond(const DramConfig& dram);

// Shortest time from a read request to its last data, ns: a row hit, CL
// plus the burst (BL/2 tCK). Ideal memory: ideal_latency_ns.
double DramRowHitLatencyNs(const DramConfig& dram);
// Shortest time from any request to its last data, ns: a row-hit write,
// CWL plus the burst, when CWL < CL (it is on every JEDEC preset), else a
// row-hit read. Ideal memory: ideal_latency_ns.
double DramShortestLatencyNs(const DramConfig& dram);
// A read to a closed bank: tRCD + CL + BL/2 tCK. Ideal memory: ideal_latency_ns.
double DramRowMissLatencyNs(const DramConfig& dram);

}  // namespace tritsim
