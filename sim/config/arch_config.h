// The hardware template of one design point, as plain structs.
//
// Filled by config_loader from an architecture YAML file (or the embedded
// default). Each unit's module takes its own struct by const&. Field
// comments give meaning, unit, default and valid range; the field table
// (config_fields.cc) holds each key's range, which the loader enforces and a
// test checks against docs/config-reference.md.
#pragma once

#include <cstdint>
#include <map>
#include <string>
#include <vector>

namespace tritsim {

// What the compute array multiplies with. kTernary: adder trees (the design
// under study). kInt8 / kFp16: a multiplier array of the same shape, used as
// a baseline on the same workload and memory system.
enum class ArrayKind { kTernary, kInt8Mac, kFp16Mac };

// How ternary weights are stored in DRAM and SRAM.
enum class TritPacking {
  kTwoBit,  // 2 bits per trit, no decoder (79.2% of log2(3) density)
  kBase3    // 5 trits per byte (3^5 = 243 <= 256), 1.6 bits per trit, needs a decoder
};

struct ClockConfig {
  double core_mhz = 1000.0;  // core clock of array, vector unit, SRAM, DMA; [1, 10000]
};

struct TreeArrayConfig {
  ArrayKind kind = ArrayKind::kTernary;
  int64_t trees = 64;         // T: adder trees working in parallel, [1, 65536]
  int64_t fan_in = 64;        // F: inputs summed per tree per cycle, power of two in [2, 4096]
  int accumulator_bits = 32;  // A: accumulator width, [8, 64]
  int register_cut = 1;       // extra pipeline registers beyond log2(F) adder levels, [0, 16]
  bool zero_gating = true;    // zero trits gate their adder inputs (energy only)
};

struct PackingConfig {
  TritPacking format = TritPacking::kBase3;
  // Bytes per core cycle the trit decoder can expand (base-3 only), [1, 65536].
  int64_t decoder_bytes_per_cycle = 64;
};

struct VectorUnitConfig {
  int64_t lanes = 128;  // L: int8 multiply-accumulate lanes, [1, 65536]
  // Special-function results per cycle (exp, rsqrt, activation functions), [1, 65536].
  int64_t special_per_cycle = 16;
  int pipeline_cycles = 4;  // latency of one vector instruction, [0, 1024]
};

struct ScratchpadConfig {
  int64_t capacity_kib = 2048;    // total on-chip SRAM, KiB, [16, 1048576]
  int64_t banks = 16;             // independent banks, power of two in [1, 1024]
  int64_t bank_width_bytes = 64;  // bytes one bank delivers per access, power of two in [4, 1024]
  int ports = 1;  // access ports per bank (1: a DMA write and an array read conflict), [1, 4]
};

struct DmaConfig {
  int64_t max_outstanding = 32;  // DRAM requests in flight, [1, 4096]
  int setup_cycles = 16;         // core cycles to start a tile transfer, [0, 100000]
};

enum class PagePolicy { kOpen, kClosed };

// Address fields of a DRAM request, from most to least significant.
enum class AddressField { kRow, kBank, kBankGroup, kColumn, kChannel };

// JEDEC timing parameters, in DRAM clock cycles (nCK) unless noted.
struct DramTiming {
  double tCK_ns = 0.625;     // DRAM clock period, ns (DDR: two transfers per tCK)
  int64_t CL = 22;           // read latency, CAS to first data
  int64_t CWL = 16;          // write latency
  int64_t tRCD = 22;         // ACT to CAS
  int64_t tRP = 22;          // PRE to ACT
  int64_t tRAS = 52;         // ACT to PRE
  int64_t tRC = 74;          // ACT to ACT, same bank
  int64_t tCCD_S = 4;        // CAS to CAS, different bank group
  int64_t tCCD_L = 8;        // CAS to CAS, same bank group
  int64_t tRRD_S = 4;        // ACT to ACT, different bank group
  int64_t tRRD_L = 8;        // ACT to ACT, same bank group
  int64_t tFAW = 34;         // window holding at most four ACTs
  int64_t tWR = 24;          // write recovery, end of write data to PRE
  int64_t tWTR_S = 4;        // end of write data to read, different bank group
  int64_t tWTR_L = 12;       // end of write data to read, same bank group
  int64_t tRTP = 12;         // read to PRE
  int64_t tRFC = 560;        // refresh cycle time (all banks)
  int64_t tREFI = 12480;     // average refresh interval
  int64_t burst_length = 8;  // BL: transfers per burst (burst takes BL/2 tCK)
};

struct DramConfig {
  std::string preset = "ddr4-3200";  // ddr4-3200 | lpddr5-6400 | hbm2e | ideal
  int64_t channels = 1;              // independent channels, interleaved, [1, 64]
  int64_t bus_width_bits = 64;       // data bits per channel, one of 16, 32, 64, 128
  int64_t bank_groups = 4;           // [1, 16]
  int64_t banks_per_group = 4;       // [1, 64]
  int64_t row_bytes = 8192;          // bytes in one row across the channel, power of two
  int64_t queue_depth = 32;          // scheduler queue entries, [1, 1024]
  PagePolicy page_policy = PagePolicy::kOpen;
  // Most significant field first. Must list each field exactly once.
  std::vector<AddressField> address_map = {AddressField::kRow, AddressField::kBank,
                                           AddressField::kColumn, AddressField::kBankGroup,
                                           AddressField::kChannel};
  DramTiming timing;
  // Total capacity over all channels, GiB (2^30 bytes), (0, 1048576]; < 0
  // (the default): the preset's capacity per channel x channels.
  double capacity_gib = -1.0;
  // Ideal memory only: fixed latency and bandwidth, no banks, no refresh.
  double ideal_latency_ns = 50.0;      // (0, 1e6]
  double ideal_bandwidth_gbps = 25.6;  // GB/s (1e9 bytes/s), (0, 1e6]
  bool is_ideal() const { return preset == "ideal"; }
};

// Energy and area technology. `node` selects a built-in table; any entry can
// be overridden by name (pJ per event, or mW for leakage). Names are listed
// in docs/config-reference.md.
struct EnergyConfig {
  std::string node = "7nm";                    // 7nm | 45nm
  std::map<std::string, double> overrides_pj;  // entry name -> value
  double dram_pj_per_bit = -1.0;               // < 0: the preset's value
};

struct ArchConfig {
  std::string name = "unnamed";
  ClockConfig clock;
  TreeArrayConfig array;
  PackingConfig packing;
  VectorUnitConfig vector;
  ScratchpadConfig sram;
  DmaConfig dma;
  DramConfig dram;
  EnergyConfig energy;
};

}  // namespace tritsim
