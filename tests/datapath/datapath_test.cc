// Checks of the bit-exact datapath model against outside sources: the
// arithmetic of the packings and of two's complement, the closed-form zero
// fraction of absmean quantization (Ma et al. 2024; derivation in
// docs/datapath.md), and Eigen's integer GEMM as the reference library.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "common/error.h"
#include "datapath/accumulator_width.h"
#include "datapath/adder_tree.h"
#include "datapath/datapath_check.h"
#include "datapath/quantize.h"
#include "datapath/trit_packing.h"

namespace tritsim {
namespace {

constexpr uint64_t kSeed = 20240227;
const double kPi = std::acos(-1.0);

// Trits t_0..t_{count-1} of the base-3 number `index` (digit 0 first), as
// a second, independent statement of the base-3 layout.
Trits TritsOfIndex(int index, int count) {
  Trits trits;
  for (int i = 0; i < count; ++i, index /= 3) trits.push_back(int8_t(index % 3 - 1));
  return trits;
}

Trits RandomTrits(int64_t count, std::mt19937_64& engine) {
  std::uniform_int_distribution<int> pick(-1, 1);
  Trits trits(static_cast<size_t>(count));
  for (int8_t& t : trits) t = int8_t(pick(engine));
  return trits;
}

std::vector<int8_t> RandomInt8(int64_t count, std::mt19937_64& engine) {
  std::uniform_int_distribution<int> pick(-128, 127);
  std::vector<int8_t> values(static_cast<size_t>(count));
  for (int8_t& v : values) v = int8_t(pick(engine));
  return values;
}

ArchConfig Design(int64_t fan_in, int accumulator_bits, TritPacking packing) {
  ArchConfig arch;
  arch.array.fan_in = fan_in;
  arch.array.accumulator_bits = accumulator_bits;
  arch.packing.format = packing;
  return arch;
}

// Every input the same: all activations `x`, all weights `t`.
DatapathInputs Uniform(const DatapathShape& shape, int8_t x, int8_t t) {
  DatapathInputs in;
  in.shape = shape;
  in.activations.assign(size_t(shape.m * shape.k), x);
  in.weights.assign(size_t(shape.k * shape.n), t);
  return in;
}

// --- packing -----------------------------------------------------------------

TEST(TritPacking, AllBase3CodesRoundTrip) {
  // 3^5 = 243 codes (arithmetic): each decodes to five trits that pack back to it.
  for (int code = 0; code < kBase3Codes; ++code) {
    const Trits trits = UnpackTrits({uint8_t(code)}, kBase3TritsPerByte, TritPacking::kBase3);
    EXPECT_EQ(trits, TritsOfIndex(code, kBase3TritsPerByte)) << code;
    EXPECT_EQ(PackTrits(trits, TritPacking::kBase3), std::vector<uint8_t>{uint8_t(code)}) << code;
  }
}

TEST(TritPacking, Base3DigitOrderIsLeastSignificantFirst) {
  // Arithmetic of the documented layout: (+1, 0, 0, 0, 0) has digits
  // (2, 1, 1, 1, 1), so the byte is 2 + 3 + 9 + 27 + 81 = 122.
  EXPECT_EQ(PackTrits({1, 0, 0, 0, 0}, TritPacking::kBase3), std::vector<uint8_t>{122});
  // (0, 0, 0, 0, -1): 1 + 3 + 9 + 27 + 0 * 81 = 40.
  EXPECT_EQ(PackTrits({0, 0, 0, 0, -1}, TritPacking::kBase3), std::vector<uint8_t>{40});
}

TEST(TritPacking, Base3RejectsCodesAbove242) {
  // 243..255 are the 256 - 243 = 13 byte values no group of five trits produces.
  for (int code = kBase3Codes; code < 256; ++code) {
    EXPECT_THROW(UnpackTrits({uint8_t(code)}, 1, TritPacking::kBase3), Error) << code;
  }
}

TEST(TritPacking, Base3IsOnePointSixBitsPerTrit) {
  // 8 bits / 5 trits = 1.6 bits per trit (arithmetic); log2(3) = 1.585 is the bound.
  EXPECT_EQ(PackedBytes(5000, TritPacking::kBase3), 1000);
  EXPECT_DOUBLE_EQ(8.0 * double(PackedBytes(5000, TritPacking::kBase3)) / 5000.0, 1.6);
  EXPECT_GE(8.0 / kBase3TritsPerByte, std::log2(3.0));
  // A partial last byte still takes a byte: ceil(7 / 5) = 2.
  EXPECT_EQ(PackedBytes(7, TritPacking::kBase3), 2);
}

TEST(TritPacking, TwoBitRoundTripsAndUsesTheDocumentedCodes) {
  // All 3^4 = 81 groups of four trits (arithmetic) round-trip.
  for (int index = 0; index < 81; ++index) {
    const Trits trits = TritsOfIndex(index, kTwoBitTritsPerByte);
    const std::vector<uint8_t> bytes = PackTrits(trits, TritPacking::kTwoBit);
    ASSERT_EQ(bytes.size(), 1u);
    EXPECT_EQ(UnpackTrits(bytes, kTwoBitTritsPerByte, TritPacking::kTwoBit), trits) << index;
  }
  // Codes: 0 -> 00, +1 -> 01, -1 -> 11 (2-bit two's complement), slot 0 lowest.
  EXPECT_EQ(PackTrits({1, -1, 0, 1}, TritPacking::kTwoBit), std::vector<uint8_t>{0x4D});
  EXPECT_THROW(UnpackTrits({0x02}, 1, TritPacking::kTwoBit), Error);  // 10 is unused
  // 8 bits / 4 trits = 2 bits per trit (arithmetic).
  EXPECT_EQ(PackedBytes(4000, TritPacking::kTwoBit), 1000);
}

TEST(TritPacking, RandomStreamsOfAnyLengthRoundTrip) {
  std::mt19937_64 engine(kSeed);
  for (TritPacking packing : {TritPacking::kBase3, TritPacking::kTwoBit}) {
    for (int64_t count = 0; count < 40; ++count) {
      const Trits trits = RandomTrits(count, engine);
      EXPECT_EQ(UnpackTrits(PackTrits(trits, packing), count, packing), trits) << count;
    }
  }
}

// --- quantization ---------------------------------------------------------------

// Three standard errors of a binomial proportion p over n draws, sqrt(p(1-p)/n)
// (common practice for a seeded Monte-Carlo check).
double ThreeStandardErrors(double p, double n) { return 3.0 * std::sqrt(p * (1.0 - p) / n); }

constexpr int64_t kQuantizationDraws = 1000000;

TEST(Quantize, AbsmeanZeroFractionOfGaussianWeights) {
  // Gaussian: gamma = E|w| = sigma sqrt(2/pi); zero where |w| < gamma / 2, so
  // P = erf(gamma / (2 sigma sqrt 2)) = erf(1 / (2 sqrt(pi))) (docs/datapath.md).
  const double p = std::erf(1.0 / (2.0 * std::sqrt(kPi)));
  EXPECT_NEAR(p, 0.31006, 5e-6);  // the value quoted in model_config.h
  std::mt19937_64 engine(kSeed);
  const TernaryTensor w = AbsmeanTernary(GaussianValues(kQuantizationDraws, engine));
  EXPECT_NEAR(ZeroFraction(w.trits), p, ThreeStandardErrors(p, kQuantizationDraws));
  // gamma estimates E|w| = sqrt(2/pi) for sigma = 1 (half-normal mean).
  EXPECT_NEAR(w.gamma, std::sqrt(2.0 / kPi), 0.003);
}

TEST(Quantize, AbsmeanZeroFractionOfLaplaceWeights) {
  // Laplace of scale b: E|w| = b; zero where |w| < b / 2, so
  // P = 1 - e^(-1/2) = 0.3935 (docs/datapath.md). Drawn as a random sign
  // times an exponential of mean b = 1.
  const double p = 1.0 - std::exp(-0.5);
  std::mt19937_64 engine(kSeed);
  std::exponential_distribution<double> magnitude(1.0);
  std::bernoulli_distribution negative(0.5);
  std::vector<double> w(static_cast<size_t>(kQuantizationDraws));
  for (double& v : w) v = negative(engine) ? -magnitude(engine) : magnitude(engine);
  EXPECT_NEAR(ZeroFraction(AbsmeanTernary(w).trits), p, ThreeStandardErrors(p, kQuantizationDraws));
}

TEST(Quantize, AbsmaxMapsEachRowsLargestValueTo127) {
  // Per-token absmax (Ma et al. 2024): scale = 127 / max|x|, so each row's
  // largest magnitude becomes exactly 127 and no code leaves [-127, 127].
  std::mt19937_64 engine(kSeed);
  const int64_t rows = 16, cols = 300;
  const std::vector<int8_t> q = AbsmaxInt8Rows(GaussianValues(rows * cols, engine), rows, cols);
  for (int64_t r = 0; r < rows; ++r) {
    int largest = 0;
    for (int64_t c = 0; c < cols; ++c)
      largest = std::max(largest, std::abs(int(q[size_t(r * cols + c)])));
    EXPECT_EQ(largest, kActivationMaxCode) << r;
  }
  EXPECT_EQ(AbsmaxInt8Rows({0.0, 0.0}, 1, 2), (std::vector<int8_t>{0, 0}));
  EXPECT_EQ(AbsmaxInt8Rows({-2.0, 1.0}, 1, 2), (std::vector<int8_t>{-127, 64}));  // round(63.5)
}

// --- arithmetic of the trees and the accumulator ----------------------------------

TEST(AdderTree, WrapToBitsIsTwosComplement) {
  // Two's complement reduces modulo 2^bits into [-2^(bits-1), 2^(bits-1) - 1].
  EXPECT_EQ(WrapToBits(127, 8), 127);
  EXPECT_EQ(WrapToBits(128, 8), -128);
  EXPECT_EQ(WrapToBits(255, 8), -1);
  EXPECT_EQ(WrapToBits(-129, 8), 127);
  EXPECT_EQ(WrapToBits(65024, 16), 65024 - 65536);
  EXPECT_EQ(WrapToBits(INT64_MIN, 64), INT64_MIN);
  EXPECT_EQ(WrapToBits(int64_t(1) << 62, 63), -(int64_t(1) << 62));
}

TEST(AdderTree, AccumulatorBitsNeededIsTheSmallestWidthForK) {
  // Arithmetic: the sum of K terms x * t lies in [-128 K, +128 K]; b bits are
  // enough iff +128 K <= 2^(b-1) - 1 (and then -128 K fits too).
  EXPECT_EQ(AccumulatorBitsNeeded(1), 9);      // [-128, 128] is one more than int8
  EXPECT_EQ(AccumulatorBitsNeeded(2048), 20);  // ceil(log2(262145)) + 1
  for (int64_t k = 1; k <= kMaxDatapathDim; ++k) {
    const int bits = AccumulatorBitsNeeded(k);
    ASSERT_TRUE(FitsInBits(128 * k, bits) && FitsInBits(-128 * k, bits)) << k;
    ASSERT_FALSE(FitsInBits(128 * k, bits - 1)) << k;
  }
}

TEST(AdderTree, LevelWidthsHoldTheWorstChunkAndNoLess) {
  // The largest tree sum is F * 128 (x = -128, t = -1 in every lane); the top
  // level's width AdderLevelBits(log2 F) holds it and one bit fewer would not.
  for (int64_t fan_in = 2; fan_in <= 4096; fan_in *= 2) {
    std::vector<int64_t> lanes(static_cast<size_t>(fan_in), TernaryProduct(-128, -1));
    EXPECT_EQ(TreeSum(lanes), 128 * fan_in) << fan_in;
    EXPECT_FALSE(FitsInBits(128 * fan_in, AdderLevelBits(TreeLevels(fan_in)) - 1)) << fan_in;
  }
  EXPECT_EQ(TreeLevels(64), 6);  // log2 64 = 6
  EXPECT_EQ(TreeLevels(65), 7);  // ceil(log2 65) = 7
}

// --- the datapath against Eigen ------------------------------------------------------

constexpr int kRandomShapes = 50;

void ExpectBitExactOnRandomShapes(TritPacking packing) {
  std::mt19937_64 engine(kSeed + int(packing));
  std::uniform_int_distribution<int64_t> rows(1, 64), depth(1, 512), cols(1, 64);
  std::uniform_int_distribution<int> log_fan_in(1, 8);  // F in 2..256
  for (int trial = 0; trial < kRandomShapes; ++trial) {
    DatapathInputs in;
    in.shape = {rows(engine), depth(engine), cols(engine)};
    in.activations = RandomInt8(in.shape.m * in.shape.k, engine);  // the full int8 range
    in.weights = RandomTrits(in.shape.k * in.shape.n, engine);
    const int64_t fan_in = int64_t(1) << log_fan_in(engine);
    const DatapathResult r = RunDatapath(Design(fan_in, 32, packing), in);
    ASSERT_TRUE(r.bit_exact()) << "trial " << trial << ": (" << r.first_mismatch->row << ", "
                               << r.first_mismatch->col << ") got " << r.first_mismatch->got
                               << " expected " << r.first_mismatch->expected;
    EXPECT_EQ(r.overflow_events, 0);
    EXPECT_LE(SignedBitsForMagnitude(r.max_accumulator_magnitude),
              AccumulatorBitsNeeded(in.shape.k));
  }
}

TEST(Datapath, BitExactAgainstEigenWithBase3Packing) {
  // Reference: Eigen's int64 matrix product (reference library).
  ExpectBitExactOnRandomShapes(TritPacking::kBase3);
}

TEST(Datapath, BitExactAgainstEigenWithTwoBitPacking) {
  // Reference: Eigen's int64 matrix product (reference library).
  ExpectBitExactOnRandomShapes(TritPacking::kTwoBit);
}

TEST(Datapath, QuantizedGaussianInputsAreBitExact) {
  const DatapathInputs in = RandomDatapathInputs({8, 1000, 40}, kSeed);
  const DatapathResult r = RunDatapath(Design(64, 32, TritPacking::kBase3), in);
  EXPECT_TRUE(r.bit_exact());
  EXPECT_EQ(r.packed_bytes, 8000);  // 40000 trits / 5 per byte (arithmetic)
  EXPECT_DOUBLE_EQ(r.bits_per_trit, 1.6);
  // Absmean on Gaussian weights (docs/datapath.md); 4e4 draws, 3 standard errors.
  EXPECT_NEAR(r.weight_zero_fraction, 0.31006, ThreeStandardErrors(0.31006, 40000));
}

TEST(Datapath, NarrowAccumulatorOverflowIsCountedAndWrapsModulo2PowA) {
  // Adversarial input: all activations 127, all weights +1, K = 512, F = 64.
  // Exact sum 127 * 512 = 65024 > 2^15 - 1, so a 16-bit accumulator wraps to
  // 65024 - 2^16 = -512 (two's complement). Running sums 8128 c for chunks
  // c = 1..8 leave the range from c = 5 on: 4 overflow events per output.
  const DatapathShape shape{3, 512, 5};
  const DatapathResult r = RunDatapath(Design(64, 16, TritPacking::kBase3), Uniform(shape, 127, 1));
  ASSERT_FALSE(r.bit_exact());
  EXPECT_EQ(r.first_mismatch->row, 0);
  EXPECT_EQ(r.first_mismatch->col, 0);
  EXPECT_EQ(r.first_mismatch->got, -512);
  EXPECT_EQ(r.first_mismatch->expected, 65024);
  EXPECT_TRUE(r.matches_modulo);
  EXPECT_EQ(r.overflow_events, 4 * 3 * 5);
  EXPECT_EQ(r.outputs_with_overflow, 3 * 5);
  EXPECT_EQ(r.max_accumulator_magnitude, 65024);
  EXPECT_GT(AccumulatorBitsNeeded(shape.k), 16);
}

TEST(Datapath, MostNegativeActivationsReachPlus128K) {
  // x = -128, t = -1: every product is +128, the sum +128 K, the one value
  // that needs the extra bit of AccumulatorBitsNeeded (arithmetic).
  const DatapathShape shape{1, 2048, 1};
  const int bits = AccumulatorBitsNeeded(shape.k);
  const DatapathInputs in = Uniform(shape, -128, -1);
  EXPECT_TRUE(RunDatapath(Design(64, bits, TritPacking::kTwoBit), in).bit_exact());
  const DatapathResult narrow = RunDatapath(Design(64, bits - 1, TritPacking::kTwoBit), in);
  EXPECT_FALSE(narrow.bit_exact());
  EXPECT_EQ(narrow.outputs_with_overflow, 1);
  EXPECT_TRUE(narrow.matches_modulo);
}

TEST(Datapath, ShapesOutsideTheBoundsAreUsageErrors) {
  EXPECT_THROW(ValidateDatapathShape({1, 0, 1}), Error);
  EXPECT_THROW(ValidateDatapathShape({kMaxDatapathDim + 1, 1, 1}), Error);
  EXPECT_THROW(ValidateDatapathShape({4096, 4096, 4096}), Error);
  EXPECT_NO_THROW(ValidateDatapathShape({}));
  try {
    ValidateDatapathShape({1, -3, 1});
    ADD_FAILURE() << "--k -3 was accepted";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kUsage);
    EXPECT_NE(std::string(e.what()).find("--k: must be an integer in [1, 4096], got -3"),
              std::string::npos)
        << e.what();
  }
}

// --- the warning for run and inspect -----------------------------------------------------

TEST(AccumulatorWidth, WarnsOnlyWhenTheModelsLargestKCanWrap) {
  ModelConfig model;  // width 2048, FFN 5632: ffn.down has K = 5632
  EXPECT_EQ(LargestTernaryGemmK(model), 5632);
  // 128 * 5632 = 720896 < 2^20, so ceil(log2(720897)) + 1 = 21 bits (arithmetic).
  ArchConfig arch;
  arch.array.accumulator_bits = 21;
  EXPECT_EQ(AccumulatorWarning(arch, model), "");
  arch.array.accumulator_bits = 20;
  const std::string warning = AccumulatorWarning(arch, model);
  EXPECT_NE(warning.find("array.accumulator_bits = 20"), std::string::npos) << warning;
  EXPECT_NE(warning.find("21 bits"), std::string::npos) << warning;
  EXPECT_EQ(warning.find('\n'), std::string::npos);
  model.ffn_weights = WeightFormat::kInt8;  // then qkv / attn.out: K = 2048
  EXPECT_EQ(LargestTernaryGemmK(model), 2048);
  arch.array.kind = ArrayKind::kInt8Mac;  // not a ternary tree array
  EXPECT_EQ(AccumulatorWarning(arch, model), "");
}

}  // namespace
}  // namespace tritsim
