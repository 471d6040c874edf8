#include "energy/energy_model.h"

#include <algorithm>
#include <string>

#include "common/error.h"
#include "energy/area_model.h"

namespace tritsim {
namespace {

constexpr double kJoulesPerPj = 1e-12;
constexpr double kSecondsPerPs = 1e-12;
constexpr double kWattsPerMw = 1e-3;
constexpr double kBitsPerByte = 8.0;
constexpr double kBytesPerKib = 1024.0;
constexpr int kMinAccumulatorBits = 8;
constexpr int kMaxAccumulatorBits = 64;

double U(uint64_t count) { return static_cast<double>(count); }

// Array arithmetic except the accumulator, pJ.
double ArrayProductsPj(const TreeArrayConfig& array, const EnergyTable& t, const EventCounts& ev) {
  switch (array.kind) {
    case ArrayKind::kTernary: {
      const uint64_t paid = array.zero_gating
                                ? ev.weight_uses - std::min(ev.weight_uses_zero, ev.weight_uses)
                                : ev.weight_uses;
      return U(paid) * t.pj("int8_add");
    }
    case ArrayKind::kInt8Mac:
      return U(ev.weight_uses) * (t.pj("int8_mult") + t.pj("int8_add"));
    case ArrayKind::kFp16Mac:
      return U(ev.weight_uses) * (t.pj("fp16_mult") + t.pj("fp16_add"));
  }
  throw Error(ExitCode::kInternal, "ArrayProductsPj: unknown array kind");
}

double ArrayPj(const TreeArrayConfig& array, const EnergyTable& t, const EventCounts& ev) {
  const double acc_pj = array.kind == ArrayKind::kFp16Mac
                            ? t.pj("fp16_add")
                            : AccumulatorAddPj(t, array.accumulator_bits);
  return ArrayProductsPj(array, t, ev) + U(ev.accumulator_adds) * acc_pj;
}

double VectorPj(const EnergyTable& t, const EventCounts& ev) {
  return U(ev.vector_macs) * (t.pj("int8_mult") + t.pj("int32_add")) +
         U(ev.vector_special) * t.pj("special_function") +
         U(ev.vector_elementwise) * t.pj("int16_add");
}

double SramPj(const ScratchpadConfig& sram, const EnergyTable& t, const EventCounts& ev) {
  if (sram.capacity_kib <= 0 || sram.banks <= 0 || sram.bank_width_bytes <= 0) {
    throw Error(ExitCode::kBadInput,
                "sram: capacity_kib, banks and bank_width_bytes must be > 0 for the energy model");
  }
  const double bank_bytes = double(sram.capacity_kib) * kBytesPerKib / double(sram.banks);
  const double access_pj = SramAccessPj(t, bank_bytes, double(sram.bank_width_bytes));
  return U(ev.sram_reads + ev.sram_writes) * access_pj;
}

double DramTransferPj(const EnergyTable& t, const EventCounts& ev) {
  return U(ev.dram_bytes_read + ev.dram_bytes_written) * kBitsPerByte * t.pj(kDramPjPerBitEntry);
}

double DramCommandPj(const EnergyTable& t, const EventCounts& ev) {
  return U(ev.dram_activates) * t.pj("dram_activate_pj") +
         U(ev.dram_refreshes) * t.pj("dram_refresh_pj");
}

double DecoderPj(const PackingConfig& packing, const EnergyTable& t, const EventCounts& ev) {
  if (packing.format != TritPacking::kBase3) return 0.0;
  return U(ev.decoder_bytes) * t.pj("trit_decoder_byte");
}

double LeakageJoules(const ArchConfig& arch, const EnergyTable& t, const RunResult& run) {
  const double watts = t.pj(kLeakageEntry) * kWattsPerMw * EstimateArea(arch).total_mm2();
  return watts * U(run.sim_ps) * kSecondsPerPs;
}

}  // namespace

double AccumulatorAddPj(const EnergyTable& table, int accumulator_bits) {
  if (accumulator_bits < kMinAccumulatorBits || accumulator_bits > kMaxAccumulatorBits) {
    throw Error(ExitCode::kBadInput, "array.accumulator_bits: " + std::to_string(accumulator_bits) +
                                         " not allowed; must be in [8, 64]");
  }
  if (accumulator_bits <= 8) return table.pj("int8_add");
  if (accumulator_bits <= 16) return table.pj("int16_add");
  if (accumulator_bits <= 32) return table.pj("int32_add");
  return 2.0 * table.pj("int32_add");  // 33..64 bits: two chained 32-bit adds
}

EnergyBreakdown ComputeEnergyWithTable(const ArchConfig& arch, const EnergyTable& table,
                                       const RunResult& run) {
  const EventCounts& ev = run.events;
  EnergyBreakdown e;
  e.array_joules = ArrayPj(arch.array, table, ev) * kJoulesPerPj;
  e.vector_joules = VectorPj(table, ev) * kJoulesPerPj;
  e.arithmetic_joules = e.array_joules + e.vector_joules;
  e.sram_joules = SramPj(arch.sram, table, ev) * kJoulesPerPj;
  e.dram_transfer_joules = DramTransferPj(table, ev) * kJoulesPerPj;
  e.dram_joules = e.dram_transfer_joules + DramCommandPj(table, ev) * kJoulesPerPj;
  e.decoder_joules = DecoderPj(arch.packing, table, ev) * kJoulesPerPj;
  e.leakage_joules = LeakageJoules(arch, table, run);
  return e;
}

EnergyBreakdown ComputeEnergy(const ArchConfig& arch, const RunResult& run) {
  return ComputeEnergyWithTable(arch, ResolveEnergyTable(arch.energy, arch.dram.preset), run);
}

}  // namespace tritsim
