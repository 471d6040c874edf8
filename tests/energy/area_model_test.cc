// Area model, checked against published bitcell and logic areas
// (docs/references.md) and its documented scaling rules.
#include "energy/area_model.h"

#include <gtest/gtest.h>

#include "common/error.h"

namespace tritsim {
namespace {

ArchConfig Arch(const std::string& node, ArrayKind kind) {
  ArchConfig arch;
  arch.energy.node = node;
  arch.array.kind = kind;
  return arch;
}

TEST(AreaModel, OneMibOfSramAt7nmIsBitsTimesWuBitcell) {
  ArchConfig arch = Arch("7nm", ArrayKind::kTernary);
  arch.sram.capacity_kib = 1024;
  // Wu et al. IEDM 2016: 0.027 um^2 high-density bitcell at 7 nm (M);
  // times the array overhead factor (common practice, L).
  double expected_mm2 = 8.0 * 1024 * 1024 * 0.027 * kSramArrayOverhead * 1e-6;
  EXPECT_NEAR(EstimateArea(arch).sram_mm2, expected_mm2, 1e-12);
}

TEST(AreaModel, TotalIsSumOfParts) {
  AreaBreakdown a = EstimateArea(Arch("7nm", ArrayKind::kTernary));
  for (double part : {a.array_mm2, a.vector_mm2, a.sram_mm2, a.decoder_mm2, a.other_mm2}) {
    EXPECT_GT(part, 0.0);
  }
  EXPECT_EQ(a.total_mm2(), a.array_mm2 + a.vector_mm2 + a.sram_mm2 + a.decoder_mm2 + a.other_mm2);
}

TEST(AreaModel, SevenNmLogicIsClassicScalingOf45nm) {
  // Classic area scaling (7/45)^2 (common practice; an estimate).
  double ratio = EstimateArea(Arch("7nm", ArrayKind::kTernary)).array_mm2 /
                 EstimateArea(Arch("45nm", ArrayKind::kTernary)).array_mm2;
  EXPECT_NEAR(ratio, (7.0 / 45.0) * (7.0 / 45.0), 1e-12);
}

TEST(AreaModel, Int8BaselineAddsOneDallyMultiplierPerLane) {
  ArchConfig arch = Arch("45nm", ArrayKind::kTernary);
  double ternary = EstimateArea(arch).array_mm2;
  arch.array.kind = ArrayKind::kInt8Mac;
  double int8 = EstimateArea(arch).array_mm2;
  double lanes = double(arch.array.trees * arch.array.fan_in);
  // Dally NIPS 2015 tutorial, 45 nm: int8 multiplier 282 um^2 (L/M).
  EXPECT_NEAR((int8 - ternary) / lanes, 282.0e-6, 1e-12);
}

TEST(AreaModel, Fp16BaselineIsLargestArray) {
  double ternary = EstimateArea(Arch("7nm", ArrayKind::kTernary)).array_mm2;
  double int8 = EstimateArea(Arch("7nm", ArrayKind::kInt8Mac)).array_mm2;
  double fp16 = EstimateArea(Arch("7nm", ArrayKind::kFp16Mac)).array_mm2;
  // Dally NIPS 2015: FP16 mult + add 1640 + 1360 um^2 against int8 mult 282 um^2.
  EXPECT_LT(ternary, int8);
  EXPECT_LT(int8, fp16);
}

TEST(AreaModel, TwoBitPackingHasNoDecoder) {
  ArchConfig arch = Arch("7nm", ArrayKind::kTernary);
  arch.packing.format = TritPacking::kTwoBit;
  EXPECT_EQ(EstimateArea(arch).decoder_mm2, 0.0);
}

TEST(AreaModel, UnknownNodeIsBadInput) {
  try {
    EstimateArea(Arch("3nm", ArrayKind::kTernary));
    FAIL() << "expected tritsim::Error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    EXPECT_NE(std::string(e.what()).find("7nm | 45nm"), std::string::npos);
  }
}

}  // namespace
}  // namespace tritsim
