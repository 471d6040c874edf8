#include "model/model_stats.h"

#include <gtest/gtest.h>

#include <cmath>

namespace tritsim {
namespace {

// Shape of a decoder as in Touvron et al. 2023: gated FFN, untied
// embeddings, RMSNorm, no biases, vocabulary 32000, multi-head attention.
ModelConfig PublishedShape(int64_t width, int64_t layers, int64_t ffn_width) {
  ModelConfig m;
  m.name = "published-shape";
  m.width = width;
  m.layers = layers;
  m.heads = width / 128;
  m.kv_heads = m.heads;
  m.head_dim = 128;
  m.ffn_width = ffn_width;
  m.ffn_kind = FfnKind::kGated;
  m.vocab = 32000;
  m.tied_embeddings = false;
  return m;
}

double RelativeError(double value, double expected) {
  return std::fabs(value - expected) / expected;
}

TEST(ModelStats, SevenBillionShapeMatchesPublishedCount) {
  const ModelStats s = ComputeModelStats(PublishedShape(4096, 32, 11008));
  // Touvron et al. 2023 (docs/references.md, M): about 6.74e9 parameters. The
  // published figure is rounded to three digits, hence 0.5%.
  EXPECT_LT(RelativeError(s.parameters.total(), 6.74e9), 0.005);
}

TEST(ModelStats, ThirteenBillionShapeMatchesPublishedCount) {
  const ModelStats s = ComputeModelStats(PublishedShape(5120, 40, 13824));
  // Touvron et al. 2023 (docs/references.md, M): about 13.0e9 parameters.
  EXPECT_LT(RelativeError(s.parameters.total(), 13.0e9), 0.005);
}

TEST(ModelStats, Base3PacksFiveTritsPerByte) {
  // 3^5 = 243 <= 256 < 3^6 = 729: five trits fit a byte, six do not
  // (docs/references.md, H, arithmetic).
  EXPECT_LE(std::pow(3.0, 5.0), 256.0);
  EXPECT_GT(std::pow(3.0, 6.0), 256.0);
  // 8 bits / 5 trits = 1.6 bits per trit (docs/references.md, H).
  EXPECT_DOUBLE_EQ(WeightBits(WeightFormat::kTernary, ArrayKind::kTernary, TritPacking::kBase3),
                   1.6);
  EXPECT_DOUBLE_EQ(WeightBits(WeightFormat::kTernary, ArrayKind::kTernary, TritPacking::kTwoBit),
                   2.0);
}

TEST(ModelStats, PackingDensityAgainstInformationBound) {
  // log2(3) = 1.58496 bits per trit; base-3 reaches 99.06% of it and a 2-bit
  // code 79.2% (docs/references.md, H, arithmetic).
  const double ideal_bits = std::log2(3.0);
  EXPECT_NEAR(ideal_bits, 1.58496, 1e-5);
  EXPECT_NEAR(ideal_bits / (8.0 * BytesPerTrit(TritPacking::kBase3)), 0.9906, 5e-5);
  EXPECT_NEAR(ideal_bits / (8.0 * BytesPerTrit(TritPacking::kTwoBit)), 0.792, 5e-4);
}

TEST(ModelStats, BaselineArraysStoreTernaryWeightsAtNativeWidth) {
  // Header contract: a MAC baseline keeps ternary tensors at its own width;
  // int8/int16 tensors keep theirs on any array.
  EXPECT_EQ(WeightBits(WeightFormat::kTernary, ArrayKind::kInt8Mac, TritPacking::kBase3), 8.0);
  EXPECT_EQ(WeightBits(WeightFormat::kTernary, ArrayKind::kFp16Mac, TritPacking::kBase3), 16.0);
  EXPECT_EQ(WeightBits(WeightFormat::kInt8, ArrayKind::kTernary, TritPacking::kBase3), 8.0);
  EXPECT_EQ(WeightBits(WeightFormat::kInt16, ArrayKind::kInt8Mac, TritPacking::kTwoBit), 16.0);
}

TEST(ModelStats, EightBitKvCacheHalvesBytesPerToken) {
  // An 8-bit KV cache holds twice the context of a 16-bit one in the same
  // memory (DESIGN.md storage checks; Ma et al. 2024 claim, arithmetic).
  ModelConfig m = PublishedShape(4096, 32, 11008);
  m.kv_bits = 16;
  const double fp16_bytes = ComputeModelStats(m).kv_bytes_per_token;
  m.kv_bits = 8;
  EXPECT_DOUBLE_EQ(ComputeModelStats(m).kv_bytes_per_token * 2.0, fp16_bytes);
  // 7B shape at 16 bits: 2 (K,V) x 32 layers x 4096 x 2 bytes = 512 KiB per
  // token, the figure usually quoted for this shape (from memory, L).
  EXPECT_DOUBLE_EQ(fp16_bytes, 512.0 * 1024.0);
}

TEST(ModelStats, GroupedQueryAttentionShrinksKvCache) {
  ModelConfig m = PublishedShape(4096, 32, 11008);
  const double full = ComputeModelStats(m).kv_bytes_per_token;
  m.kv_heads = 8;  // four query heads share one KV head
  EXPECT_DOUBLE_EQ(ComputeModelStats(m).kv_bytes_per_token * 4.0, full);
}

TEST(ModelStats, TiedEmbeddingsHaveNoHeadParameters) {
  ModelConfig m = PublishedShape(4096, 32, 11008);
  const ModelStats untied = ComputeModelStats(m);
  m.tied_embeddings = true;
  const ModelStats tied = ComputeModelStats(m);
  EXPECT_EQ(tied.parameters.head, 0.0);
  EXPECT_EQ(tied.weight_bytes_base3.head, 0.0);
  EXPECT_DOUBLE_EQ(untied.parameters.total() - tied.parameters.total(), 32000.0 * 4096.0);
  // The head GEMM still runs (with the embedding matrix), so the work per
  // token does not change.
  EXPECT_DOUBLE_EQ(tied.ops_per_token, untied.ops_per_token);
}

TEST(ModelStats, OpsPerTokenAreTwoPerNonEmbeddingWeight) {
  // Common practice: a forward pass costs about 2 ops per weight per token;
  // the embedding is a lookup and norms are not products.
  const ModelStats s = ComputeModelStats(PublishedShape(4096, 32, 11008));
  const ByClass& p = s.parameters;
  EXPECT_DOUBLE_EQ(s.ops_per_token, 2.0 * (p.attention + p.ffn + p.head));
  // q.k and p.v: per layer and cached token, 2 x heads x head_dim MACs.
  EXPECT_DOUBLE_EQ(s.attention_ops_per_context_token, 2.0 * 2.0 * 32 * 32 * 128);
}

TEST(ModelStats, WeightBytesFollowPackingAndPrecision) {
  ModelConfig m = PublishedShape(4096, 32, 11008);
  m.embedding_weights = WeightFormat::kInt16;
  m.head_weights = WeightFormat::kInt8;
  const ModelStats s = ComputeModelStats(m);
  const ByClass& p = s.parameters;
  EXPECT_DOUBLE_EQ(s.weight_bytes_base3.ffn, p.ffn * 0.2);     // 1.6 bits
  EXPECT_DOUBLE_EQ(s.weight_bytes_two_bit.ffn, p.ffn * 0.25);  // 2 bits
  EXPECT_DOUBLE_EQ(s.weight_bytes_base3.embedding, p.embedding * 2.0);
  EXPECT_DOUBLE_EQ(s.weight_bytes_base3.head, p.head * 1.0);
  EXPECT_DOUBLE_EQ(s.weight_bytes_base3.norm, p.norm * 2.0);  // norm_bits 16
  EXPECT_DOUBLE_EQ(s.weight_bytes_int8.attention, p.attention);
  EXPECT_DOUBLE_EQ(s.weight_bytes_fp16.total() - s.weight_bytes_fp16.norm,
                   2.0 * (p.total() - p.norm));
  // A ternary model in base-3 needs 10x less than fp16 for its projections.
  EXPECT_DOUBLE_EQ(s.weight_bytes_fp16.attention / s.weight_bytes_base3.attention, 10.0);
}

TEST(ModelStats, PlainFfnHasTwoMatrices) {
  ModelConfig m = PublishedShape(4096, 32, 11008);
  const double gated = ComputeModelStats(m).parameters.ffn;
  m.ffn_kind = FfnKind::kPlain;
  EXPECT_DOUBLE_EQ(ComputeModelStats(m).parameters.ffn * 3.0, gated * 2.0);
}

}  // namespace
}  // namespace tritsim
