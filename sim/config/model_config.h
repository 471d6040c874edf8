// A decoder-only transformer, as the trace builder and `inspect` see it.
//
// Plain value type, filled by config_loader (the only code that reads YAML)
// or by the embedded default. Every field has a default; each key's range is
// in the field table (config_fields.cc), consistency checks in the loader.
#pragma once

#include <cstdint>
#include <string>

namespace tritsim {

enum class FfnKind { kPlain, kGated };  // plain: up, act, down; gated: gate*up
enum class Activation { kRelu, kGelu, kSilu, kRelu2 };

// Storage precision of a weight tensor class. Ternary tensors are packed by
// the architecture (2-bit or base-3); the model only says they are ternary.
// kFp16 is IEEE half precision: stored like kInt16 (2 bytes a weight), named
// apart so a model states what an FP16 baseline really holds. New values go
// at the end: traces name formats by spelling (trace_format.cc).
enum class WeightFormat { kTernary, kInt8, kInt16, kFp16 };

struct ModelConfig {
  std::string name = "unnamed";  // label for reports
  int64_t layers = 24;           // decoder blocks, >= 1
  int64_t width = 2048;          // model (residual) width d, >= 1
  int64_t heads = 16;            // query heads, divides into width via head_dim
  int64_t kv_heads = 16;         // key/value heads, must divide heads (grouped-query)
  int64_t head_dim = 128;        // size of one head
  int64_t ffn_width = 5632;      // FFN hidden width
  FfnKind ffn_kind = FfnKind::kGated;
  Activation activation = Activation::kSilu;
  int64_t vocab = 32000;         // vocabulary size
  bool tied_embeddings = false;  // output head shares the embedding matrix

  // Precision per tensor class.
  WeightFormat attention_weights = WeightFormat::kTernary;  // q, k, v, o projections
  WeightFormat ffn_weights = WeightFormat::kTernary;        // gate, up, down
  WeightFormat embedding_weights = WeightFormat::kInt8;     // int8, int16 or fp16 only
  WeightFormat head_weights = WeightFormat::kInt8;          // int8, int16 or fp16 only
  int norm_bits = 16;                                       // RMSNorm gains, 8 or 16 bit
  int activation_bits = 8;                                  // activations between ops, 8 or 16
  int kv_bits = 8;                                          // KV-cache entries, 8 or 16

  // Fraction of ternary weights that are zero. Default: absmean quantization
  // of Gaussian weights leaves erf(1/(2 sqrt(pi))) = 0.31006 zeros
  // (derivation in docs/references.md). Range [0, 1).
  double weight_zero_fraction = 0.31006;
};

}  // namespace tritsim
