// Energy of one run: the event counts of a RunResult priced with the design
// point's energy table (energy/energy_table.h) and its estimated area
// (energy/area_model.h, for leakage).
//
// Pricing rules (all documented here, all in pJ from the resolved table):
// - Ternary tree array: one int8 add per weight use (the tree input that
//   adds +x, -x or 0). With array.zero_gating the uses of zero trits are
//   gated and cost nothing: (weight_uses - weight_uses_zero) * int8_add;
//   without it weight_uses * int8_add. Zero gating applies to the ternary
//   array only.
// - int8 MAC baseline: weight_uses * (int8_mult + int8_add).
// - FP16 MAC baseline: weight_uses * (fp16_mult + fp16_add).
// - Accumulator: accumulator_adds * one add of the accumulator width, the
//   narrowest table adder that holds array.accumulator_bits (8, 16 or 32;
//   33..64 bits cost two int32 adds). The FP16 baseline accumulates in FP16
//   (fp16_add).
// - Vector unit: vector_macs * (int8_mult + int32_add) + vector_special *
//   special_function + vector_elementwise * int16_add.
// - SRAM: (sram_reads + sram_writes) * SramAccessPj(one bank's array =
//   capacity / banks, access = bank_width_bytes).
// - DRAM: (dram_bytes_read + dram_bytes_written) * 8 * dram_pj_per_bit +
//   dram_activates * dram_activate_pj + dram_refreshes * dram_refresh_pj.
// - Decoder: decoder_bytes * trit_decoder_byte (base-3 packing only; zero
//   for 2-bit packing whatever the count says).
// - Leakage: leakage_mw_per_mm2 * EstimateArea(arch).total_mm2() * sim_ps * 1e-12 s.
#pragma once

#include "config/arch_config.h"
#include "config/energy_table.h"
#include "results/run_result.h"

namespace tritsim {

struct EnergyBreakdown {
  // The five components; total_joules() is their sum.
  double arithmetic_joules = 0.0;  // tree (or MAC) array + vector unit arithmetic, J
  double sram_joules = 0.0;        // scratchpad bank accesses, J
  double dram_joules = 0.0;        // DRAM transfers, activates and refreshes, J
  double decoder_joules = 0.0;     // trit decoder (base-3 packing), J
  double leakage_joules = 0.0;     // static power over the simulated time, J

  // Detail, not added again into the total.
  double array_joules = 0.0;          // part of arithmetic_joules spent in the array, J
  double vector_joules = 0.0;         // part of arithmetic_joules spent in the vector unit, J
  double dram_transfer_joules = 0.0;  // part of dram_joules for the bits moved, J

  double total_joules() const {
    return arithmetic_joules + sram_joules + dram_joules + decoder_joules + leakage_joules;
  }
};

// Prices `run` with ResolveEnergyTable(arch.energy, arch.dram.preset).
// Throws tritsim::Error (kBadInput) for a bad energy config (see
// ResolveEnergyTable) or an accumulator width outside [8, 64].
EnergyBreakdown ComputeEnergy(const ArchConfig& arch, const RunResult& run);

// Same with an already resolved table (no lookup of arch.energy).
EnergyBreakdown ComputeEnergyWithTable(const ArchConfig& arch, const EnergyTable& table,
                                       const RunResult& run);

// pJ of one accumulator update of `accumulator_bits` for the integer arrays
// (rule above). Throws tritsim::Error (kBadInput) outside [8, 64].
double AccumulatorAddPj(const EnergyTable& table, int accumulator_bits);

}  // namespace tritsim
