// Silicon area of a design point, estimated from unit counts and published
// per-unit areas (sources and confidence in area_model.cc).
//
// Every number here is an estimate for comparing design points against each
// other, not a floorplan: logic areas are 45 nm figures scaled by classic
// (7/45)^2 scaling for 7 nm, wiring and control are covered by one flat
// factor. The technology node is arch.energy.node (7nm | 45nm).
//
// Rules:
// - SRAM: capacity bits * bitcell area * kSramArrayOverhead (1.6: decoders,
//   sense amplifiers, redundancy; common practice, L).
// - Tree array (ternary): trees * [(fan_in - 1) 16-bit adders (the tree's
//   adders grow from 9 to ~8 + log2(fan_in) bits; approximated as 16-bit) +
//   one accumulator (adder of the accumulator width + that many flip-flops)].
// - int8 MAC baseline: the same tree plus fan_in int8 multipliers per tree.
// - FP16 MAC baseline: trees * [fan_in FP16 multipliers + (fan_in - 1) FP16
//   adders + an FP16 accumulator (FP16 adder + 16 flip-flops)].
// - Vector unit: lanes * (int8 multiplier + 32-bit adder) + special_per_cycle
//   * (FP16 multiplier + FP16 adder).
// - Trit decoder (base-3 only): decoder_bytes_per_cycle * one 243-entry LUT,
//   estimated as four 8-bit adders.
// - Other (DMA, control, interconnect): kOtherFraction (10%, L) of the sum
//   of the above. DRAM PHYs and pads are not included.
#pragma once

#include <string>

#include "config/arch_config.h"

namespace tritsim {

struct AreaBreakdown {
  double array_mm2 = 0.0;    // tree array or MAC baseline, mm^2
  double vector_mm2 = 0.0;   // vector unit lanes and special-function units, mm^2
  double sram_mm2 = 0.0;     // scratchpad, mm^2
  double decoder_mm2 = 0.0;  // trit decoders, mm^2 (0 for 2-bit packing)
  double other_mm2 = 0.0;    // DMA, control, interconnect, mm^2
  double total_mm2() const { return array_mm2 + vector_mm2 + sram_mm2 + decoder_mm2 + other_mm2; }
};

// Fraction of the unit areas added as "other".
inline constexpr double kOtherFraction = 0.10;
// SRAM macro area over raw bitcell area (common practice, L).
inline constexpr double kSramArrayOverhead = 1.6;

// Throws tritsim::Error (kBadInput) for an unknown node or accumulator
// width outside [8, 64].
AreaBreakdown EstimateArea(const ArchConfig& arch);

// Area of one SRAM bitcell at `node`, um^2 (7nm: 0.027, Wu et al. IEDM 2016).
double SramBitcellUm2(const std::string& node);

}  // namespace tritsim
