#include "energy/area_model.h"

#include <string>

#include "common/error.h"

namespace tritsim {
namespace {

// All values are estimates (see area_model.h).
// 45 nm logic, Dally, NIPS 2015 tutorial (L/M):
constexpr double k45Add8Um2 = 36.0;
constexpr double k45Add16Um2 = 67.0;
constexpr double k45Add32Um2 = 137.0;
constexpr double k45Mult8Um2 = 282.0;
constexpr double k45Fp16AddUm2 = 1360.0;
constexpr double k45Fp16MultUm2 = 1640.0;
// One D flip-flop at 45 nm, about 4.5 um^2 (an open 45 nm standard-cell
// library's DFF_X1; from memory, L).
constexpr double k45FlipFlopUm2 = 4.5;
// 7 nm logic: the 45 nm areas times classic scaling (7/45)^2 = 0.0242
// (estimate; real 45 -> 7 nm logic density gains have been somewhat smaller).
constexpr double k7LogicScale = (7.0 / 45.0) * (7.0 / 45.0);

// SRAM high-density bitcell: 7 nm 0.027 um^2, Wu et al. IEDM 2016 (M);
// 45 nm 0.346 um^2, a 45 nm high-k/metal-gate process's bitcell (from
// memory, L).
constexpr double k7BitcellUm2 = 0.027;
constexpr double k45BitcellUm2 = 0.346;

// The trit decoder's 243-entry LUT, as area of four 8-bit adders (L).
constexpr double kDecoderLutInAdd8 = 4.0;

constexpr double kUm2PerMm2 = 1e6;
constexpr double kBitsPerKib = 8.0 * 1024.0;

// 45 nm-equivalent areas scaled to the node.
double LogicScale(const std::string& node) {
  if (node == "7nm") return k7LogicScale;
  if (node == "45nm") return 1.0;
  throw Error(ExitCode::kBadInput, "energy.node: unknown node '" + node + "'; allowed: 7nm | 45nm");
}

// 45 nm area of an integer adder holding `bits` (narrowest of 8/16/32 that
// holds it; 33..64 bits: two 32-bit adders), um^2.
double IntAdderUm2(int bits) {
  if (bits < 8 || bits > 64) {
    throw Error(ExitCode::kBadInput, "array.accumulator_bits: " + std::to_string(bits) +
                                         " not allowed; must be in [8, 64]");
  }
  if (bits <= 8) return k45Add8Um2;
  if (bits <= 16) return k45Add16Um2;
  if (bits <= 32) return k45Add32Um2;
  return 2.0 * k45Add32Um2;
}

// One tree of the array at 45 nm, um^2.
double Tree45Um2(const TreeArrayConfig& a) {
  const double f = double(a.fan_in);
  if (a.kind == ArrayKind::kFp16Mac) {
    return f * k45Fp16MultUm2 + (f - 1.0) * k45Fp16AddUm2 + k45Fp16AddUm2 + 16.0 * k45FlipFlopUm2;
  }
  const double accumulator = IntAdderUm2(a.accumulator_bits) + a.accumulator_bits * k45FlipFlopUm2;
  const double tree = (f - 1.0) * k45Add16Um2 + accumulator;
  return a.kind == ArrayKind::kInt8Mac ? tree + f * k45Mult8Um2 : tree;
}

double Vector45Um2(const VectorUnitConfig& v) {
  return double(v.lanes) * (k45Mult8Um2 + k45Add32Um2) +
         double(v.special_per_cycle) * (k45Fp16MultUm2 + k45Fp16AddUm2);
}

double Decoder45Um2(const PackingConfig& p) {
  if (p.format != TritPacking::kBase3) return 0.0;
  return double(p.decoder_bytes_per_cycle) * kDecoderLutInAdd8 * k45Add8Um2;
}

}  // namespace

double SramBitcellUm2(const std::string& node) {
  if (node == "7nm") return k7BitcellUm2;
  if (node == "45nm") return k45BitcellUm2;
  throw Error(ExitCode::kBadInput, "energy.node: unknown node '" + node + "'; allowed: 7nm | 45nm");
}

AreaBreakdown EstimateArea(const ArchConfig& arch) {
  const std::string& node = arch.energy.node;
  const double scale = LogicScale(node) / kUm2PerMm2;  // 45 nm um^2 -> node mm^2
  AreaBreakdown a;
  a.array_mm2 = double(arch.array.trees) * Tree45Um2(arch.array) * scale;
  a.vector_mm2 = Vector45Um2(arch.vector) * scale;
  a.decoder_mm2 = Decoder45Um2(arch.packing) * scale;
  a.sram_mm2 = double(arch.sram.capacity_kib) * kBitsPerKib * SramBitcellUm2(node) *
               kSramArrayOverhead / kUm2PerMm2;
  a.other_mm2 = kOtherFraction * (a.array_mm2 + a.vector_mm2 + a.sram_mm2 + a.decoder_mm2);
  return a;
}

}  // namespace tritsim
