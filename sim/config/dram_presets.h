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

// Preset names in the order the docs and error messages list them:
// ddr4-3200, lpddr5-6400, hbm2e, ideal.
const std::vector<std::string>& DramPresetNames();

// True if `name` is one of DramPresetNames().
bool IsDramPreset(const std::string& name);

// Bytes one request (one burst) moves on one channel:
// bus_width_bits / 8 * burst_length.
int64_t DramBurstBytes(const DramConfig& dram);

// Peak data rate of all channels together, bytes/s, ignoring refresh and
// all other overheads. DDR-style: two transfers per tCK, so
// channels * (2 / tCK) * bus_width_bits / 8. For the ideal preset:
// ideal_bandwidth_gbps * 1e9.
double DramPeakBytesPerSecond(const DramConfig& dram);

}  // namespace tritsim
