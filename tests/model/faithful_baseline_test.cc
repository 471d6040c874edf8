// Faithful multiplier baselines (issue 16, part 1): an FP16 model stores
// 16 bits everywhere, so its bytes follow from the bit widths alone.
#include <gtest/gtest.h>

#include "config/config_loader.h"
#include "model/model_stats.h"

namespace tritsim {
namespace {

// The demo 3B-class model with every class and the KV cache at FP16.
ModelConfig Fp16Twin(ModelConfig m) {
  m.attention_weights = WeightFormat::kFp16;
  m.ffn_weights = WeightFormat::kFp16;
  m.embedding_weights = WeightFormat::kFp16;
  m.head_weights = WeightFormat::kFp16;
  m.activation_bits = 16;
  m.kv_bits = 16;
  return m;
}

TEST(FaithfulBaseline, Fp16KvBytesPerTokenAreTwiceEightBit) {
  const ModelConfig ternary = DefaultModel();  // kv_bits 8
  const ModelStats t = ComputeModelStats(ternary);
  const ModelStats f = ComputeModelStats(Fp16Twin(ternary));
  // Arithmetic: 16-bit entries over 8-bit entries, same count of entries.
  EXPECT_DOUBLE_EQ(f.kv_bytes_per_token, 2.0 * t.kv_bytes_per_token);
}

TEST(FaithfulBaseline, Fp16ProjectionsAreTenTimesBase3Ternary) {
  const ModelConfig ternary = DefaultModel();
  const ByClass t = WeightBytesOn(ternary, ArrayKind::kTernary, TritPacking::kBase3);
  const ByClass f = WeightBytesOn(Fp16Twin(ternary), ArrayKind::kFp16Mac, TritPacking::kBase3);
  // Arithmetic: 16 bits per FP16 weight over 8/5 = 1.6 bits per trit
  // (five trits per byte, 3^5 = 243 <= 256) is 10.
  EXPECT_DOUBLE_EQ(f.attention / t.attention, 16.0 / 1.6);
  EXPECT_DOUBLE_EQ(f.ffn / t.ffn, 16.0 / 1.6);
  // The head was 8-bit in the ternary model: 16 / 8 = 2 (arithmetic).
  EXPECT_DOUBLE_EQ(f.head / t.head, 2.0);
}

TEST(FaithfulBaseline, Fp16ModelStatsMatchArrayIndependentBytes) {
  const ModelConfig fp16 = Fp16Twin(DefaultModel());
  const ModelStats s = ComputeModelStats(fp16);
  const ByClass on = WeightBytesOn(fp16, ArrayKind::kFp16Mac, TritPacking::kBase3);
  // Arithmetic: with no ternary class the packing is irrelevant, and every
  // weight is 2 bytes, the same as the all-16-bit baseline column.
  EXPECT_DOUBLE_EQ(on.total(), s.weight_bytes_fp16.total());
  EXPECT_DOUBLE_EQ(s.weight_bytes_base3.total(), s.weight_bytes_two_bit.total());
}

TEST(FaithfulBaseline, LoaderAcceptsFp16ForEveryClass) {
  const ModelConfig m = DefaultModel({{"precision.attention", "fp16"},
                                      {"precision.ffn", "fp16"},
                                      {"precision.embedding", "fp16"},
                                      {"precision.head", "fp16"},
                                      {"precision.activation_bits", "16"},
                                      {"precision.kv_bits", "16"}});
  EXPECT_EQ(m.attention_weights, WeightFormat::kFp16);
  EXPECT_EQ(m.head_weights, WeightFormat::kFp16);
  EXPECT_EQ(m.kv_bits, 16);
}

}  // namespace
}  // namespace tritsim
