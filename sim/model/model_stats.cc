#include "model/model_stats.h"

#include <algorithm>
#include <cmath>

#include "config/dram_presets.h"

namespace tritsim {
namespace {

// 2 bits per trit: four trits per byte.
constexpr double kTwoBitBytesPerTrit = 0.25;
// 3^5 = 243 <= 256: five trits per byte (arithmetic), 1.6 bits per trit.
constexpr double kBase3BytesPerTrit = 0.2;
constexpr double kBitsPerByte = 8.0;
// Arithmetic ops per weight use: one multiply-equivalent plus one add
// (common practice for counting GEMM work).
constexpr double kOpsPerMac = 2.0;

// Parameters of one class, before any storage format is applied.
ByClass CountParameters(const ModelConfig& m) {
  const double width = double(m.width);
  const double layers = double(m.layers);
  const double q_width = double(m.heads * m.head_dim);
  const double kv_width = double(m.kv_heads * m.head_dim);
  const double ffn_matrices = m.ffn_kind == FfnKind::kGated ? 3.0 : 2.0;
  ByClass p;
  // q and o are width x heads*head_dim; k and v are width x kv_heads*head_dim.
  p.attention = layers * (2.0 * width * q_width + 2.0 * width * kv_width);
  p.ffn = layers * ffn_matrices * width * double(m.ffn_width);
  p.embedding = double(m.vocab) * width;
  p.head = m.tied_embeddings ? 0.0 : double(m.vocab) * width;
  p.norm = layers * 2.0 * width + width;  // two RMSNorm gains per block, one final
  return p;
}

// Bytes of one stored weight of `format`, ternary tensors at `ternary_bytes`.
double BytesPerWeight(WeightFormat format, double ternary_bytes) {
  switch (format) {
    case WeightFormat::kTernary:
      return ternary_bytes;
    case WeightFormat::kInt8:
      return 1.0;
    case WeightFormat::kInt16:
    case WeightFormat::kFp16:
      return 2.0;
  }
  return 0.0;
}

// Storage of every class under the model's formats, ternary at `ternary_bytes`.
ByClass BytesByFormat(const ModelConfig& m, const ByClass& p, double ternary_bytes) {
  ByClass b;
  b.attention = p.attention * BytesPerWeight(m.attention_weights, ternary_bytes);
  b.ffn = p.ffn * BytesPerWeight(m.ffn_weights, ternary_bytes);
  b.embedding = p.embedding * BytesPerWeight(m.embedding_weights, ternary_bytes);
  b.head = p.head * BytesPerWeight(m.head_weights, ternary_bytes);
  b.norm = p.norm * double(m.norm_bits) / kBitsPerByte;
  return b;
}

// Storage with every weight at `bytes` (a baseline), norms at norm_bits.
ByClass BytesUniform(const ModelConfig& m, const ByClass& p, double bytes) {
  ByClass b;
  b.attention = p.attention * bytes;
  b.ffn = p.ffn * bytes;
  b.embedding = p.embedding * bytes;
  b.head = p.head * bytes;
  b.norm = p.norm * double(m.norm_bits) / kBitsPerByte;
  return b;
}

}  // namespace

ModelStats ComputeModelStats(const ModelConfig& model) {
  ModelStats s;
  s.parameters = CountParameters(model);
  s.weight_bytes_two_bit = BytesByFormat(model, s.parameters, kTwoBitBytesPerTrit);
  s.weight_bytes_base3 = BytesByFormat(model, s.parameters, kBase3BytesPerTrit);
  s.weight_bytes_int8 = BytesUniform(model, s.parameters, 1.0);
  s.weight_bytes_fp16 = BytesUniform(model, s.parameters, 2.0);
  s.kv_bytes_per_token = 2.0 * double(model.layers) * double(model.kv_heads) *
                         double(model.head_dim) * double(model.kv_bits) / kBitsPerByte;
  // The head GEMM runs even when tied (it then reads the embedding matrix).
  const double head_gemm_weights = double(model.vocab) * double(model.width);
  s.ops_per_token = kOpsPerMac * (s.parameters.attention + s.parameters.ffn + head_gemm_weights);
  // Per cached token: q.k and p.v, each one MAC per head element.
  s.attention_ops_per_context_token =
      kOpsPerMac * 2.0 * double(model.layers) * double(model.heads) * double(model.head_dim);
  return s;
}

double BytesPerTrit(TritPacking packing) {
  return packing == TritPacking::kBase3 ? kBase3BytesPerTrit : kTwoBitBytesPerTrit;
}

double WeightBits(WeightFormat format, ArrayKind kind, TritPacking packing) {
  switch (format) {
    case WeightFormat::kInt8:
      return 8.0;
    case WeightFormat::kInt16:
    case WeightFormat::kFp16:
      return 16.0;
    case WeightFormat::kTernary:
      break;
  }
  switch (kind) {
    case ArrayKind::kInt8Mac:
      return 8.0;
    case ArrayKind::kFp16Mac:
      return 16.0;
    case ArrayKind::kTernary:
      break;
  }
  return BytesPerTrit(packing) * kBitsPerByte;
}

ByClass WeightBytesOn(const ModelConfig& model, ArrayKind kind, TritPacking packing) {
  const ByClass p = CountParameters(model);
  const auto bytes = [&](WeightFormat format) {
    return WeightBits(format, kind, packing) / kBitsPerByte;
  };
  ByClass b;
  b.attention = p.attention * bytes(model.attention_weights);
  b.ffn = p.ffn * bytes(model.ffn_weights);
  b.embedding = p.embedding * bytes(model.embedding_weights);
  b.head = p.head * bytes(model.head_weights);
  b.norm = p.norm * double(model.norm_bits) / kBitsPerByte;
  return b;
}

int64_t FinalContextTokens(const WorkloadConfig& w) {
  return w.context_tokens + w.prefill_tokens + w.decode_tokens;
}

double ActivationBufferBytes(const ModelConfig& m, const WorkloadConfig& w) {
  constexpr double kSpillAreas = 2.0;  // input and output (tiler.cc)
  const double rows = double(w.batch) * double(std::max<int64_t>(w.prefill_tokens, 1));
  const int64_t widest = std::max({m.width, m.ffn_width, m.heads * m.head_dim, m.vocab});
  return kSpillAreas * rows * double(widest) * double(m.activation_bits) / kBitsPerByte;
}

DramCapacity ComputeDramCapacity(const ModelConfig& model, const ArchConfig& arch,
                                 const WorkloadConfig& workload) {
  DramCapacity c;
  c.dram_bytes = DramCapacityBytes(arch.dram);
  c.weight_bytes = WeightBytesOn(model, arch.array.kind, arch.packing.format).total();
  c.activation_bytes = ActivationBufferBytes(model, workload);
  c.kv_bytes_per_token = ComputeModelStats(model).kv_bytes_per_token;
  c.free_bytes = std::max(0.0, c.dram_bytes - c.weight_bytes - c.activation_bytes);
  c.max_kv_tokens = int64_t(std::floor(c.free_bytes / c.kv_bytes_per_token));
  c.max_context_at_batch = c.max_kv_tokens / std::max<int64_t>(workload.batch, 1);
  const int64_t context = std::max<int64_t>(FinalContextTokens(workload), 1);
  c.max_batch_at_context = c.max_kv_tokens / context;
  c.kv_bytes_at_end = c.kv_bytes_per_token * double(workload.batch) * double(context);
  return c;
}

}  // namespace tritsim
