// One record of the layer trace: what is computed, independent of hardware.
//
// The trace builder emits these in execution order; the trace reader and
// writer convert them to and from docs/trace-format.md; the engine's
// sequencer maps them onto the hardware. No tiling, no addresses here.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "config/model_config.h"

namespace tritsim {

enum class Phase { kPrefill, kDecode };

enum class OpKind {
  kEmbed,       // embedding lookup: rows = tokens, n = width, weight read per token
  kNorm,        // RMSNorm over n elements per row
  kQuantize,    // per-token absmax requantization of n elements per row
  kGemm,        // [m x k] activations times [k x n] weights -> [m x n]
  kRope,        // positional rotation of q and k: n elements per row
  kKvAppend,    // write this step's k and v (n elements per row) into the cache
  kAttnScores,  // q . k over the cache: heads x m rows x context keys x head_dim
  kSoftmax,     // heads x m rows x context
  kAttnValues,  // weights . v over the cache: heads x m rows x context x head_dim
  kActivation,  // activation function (times gate when gated) over n elements per row
  kResidual     // residual add over n elements per row
};

// Which weight tensor class an op reads (parameter accounting, precision).
enum class TensorClass { kNone, kAttention, kFfn, kEmbedding, kHead, kNorm };

struct TraceOp {
  Phase phase = Phase::kDecode;
  int64_t step = 0;    // 0 for the prefill; decode steps count from 0
  int64_t layer = -1;  // decoder block index, -1 outside the blocks
  std::string name;    // e.g. "attn.qkv", "ffn.down", "head"
  OpKind kind = OpKind::kGemm;
  TensorClass tensor = TensorClass::kNone;
  WeightFormat weights = WeightFormat::kTernary;  // meaningful when tensor has weights

  int64_t m = 0;  // rows: batch x tokens of this step
  int64_t n = 0;  // output columns (GEMM) or elements per row (elementwise)
  int64_t k = 0;  // reduction length (GEMM), 0 otherwise

  // Attention only.
  int64_t heads = 0;     // query heads
  int64_t kv_heads = 0;  // key/value heads
  int64_t head_dim = 0;
  int64_t context = 0;  // keys attended by the last row of this step
  bool causal = false;  // prefill: row i attends to context - m + i + 1 keys

  // Attention and KV append of a mixed step (trace format version 2): the
  // sequences of this op's group, which share new tokens and context; 0: the
  // step's batch (every op of a uniform step).
  int64_t sequences = 0;

  int act_bits = 8;            // bits per activation element in and out
  int kv_bits = 8;             // bits per KV-cache element
  double zero_fraction = 0.0;  // fraction of zero trits in the weights (ternary only)
};

// One sequence of a mixed step: its new tokens (a prompt chunk, or 1 for a
// decode) and the tokens already in its cache.
struct SequenceSpan {
  int64_t tokens = 1;
  int64_t context = 0;
  bool operator==(const SequenceSpan& o) const {
    return tokens == o.tokens && context == o.context;
  }
};

// One step of the workload (the prefill, or one decode token), the header
// record in front of its ops.
//
// A uniform step runs `batch` sequences of `tokens` new tokens at `context`.
// A mixed step (trace format version 2; serving with continuous batching)
// lists each sequence in `mix` instead: `batch` is mix.size(), and `tokens`
// and `context` are 0.
struct TraceStep {
  Phase phase = Phase::kDecode;
  int64_t step = 0;
  int64_t tokens = 1;  // new tokens per sequence in this step
  int64_t batch = 1;
  int64_t context = 0;  // tokens in the cache before this step
  std::vector<SequenceSpan> mix;
  bool mixed() const { return !mix.empty(); }
  // New tokens of all sequences: the rows of the step's projections.
  int64_t new_tokens() const {
    if (!mixed()) return tokens * batch;
    int64_t n = 0;
    for (const SequenceSpan& s : mix) n += s.tokens;
    return n;
  }
};

}  // namespace tritsim
