// What a model description implies before any simulation: parameters and
// weight bytes by tensor class, KV-cache bytes per token, ops per token.
// Pure functions of the config; used by `tritsim inspect` and the reports.
#pragma once

#include <cstdint>

#include "config/arch_config.h"
#include "config/model_config.h"
#include "config/workload_config.h"

namespace tritsim {

// One number per tensor class, as in the JSON `model.parameters_by_class`.
struct ByClass {
  double attention = 0;  // q, k, v, o projections
  double ffn = 0;        // gate (if gated), up, down
  double embedding = 0;  // token embedding table
  double head = 0;       // output head (0 when tied)
  double norm = 0;       // RMSNorm gains (two per block plus the final norm)
  double total() const { return attention + ffn + embedding + head + norm; }
};

struct ModelStats {
  ByClass parameters;             // weights per class
  ByClass weight_bytes_two_bit;   // storage with ternary tensors at 2 bits per trit
  ByClass weight_bytes_base3;     // storage with ternary tensors at 5 trits per byte
  ByClass weight_bytes_int8;      // every weight at 8 bits (int8 baseline)
  ByClass weight_bytes_fp16;      // every weight at 16 bits (fp16 baseline)
  double kv_bytes_per_token = 0;  // K and V of all layers for one token at kv_bits
  // Arithmetic ops to produce one token at context 0: 2 per weight use
  // (multiply-equivalent plus add, common practice), embeddings excluded
  // (a lookup, not a product).
  double ops_per_token = 0;
  // Extra attention ops per token per token of context (q.k and p.v).
  double attention_ops_per_context_token = 0;
};

ModelStats ComputeModelStats(const ModelConfig& model);

// Bytes per ternary weight under a packing: 0.25 (2-bit) or 0.2 (base-3).
double BytesPerTrit(TritPacking packing);

// Bits of one stored weight of `format` on an array of `kind` with `packing`:
// ternary tensors on a ternary array use the packing; on a baseline MAC
// array they are stored at the array's native width (8 or 16 bits).
double WeightBits(WeightFormat format, ArrayKind kind, TritPacking packing);

// Bytes each tensor class occupies on an array of `kind` with `packing`
// (WeightBits per class; norms at norm_bits; a tied head stores nothing).
// What the design point must hold in DRAM for the model's weights.
ByClass WeightBytesOn(const ModelConfig& model, ArrayKind kind, TritPacking packing);

// What the design point's DRAM holds for a model and workload (`inspect`'s
// "capacity" section; `run` refuses a workload that does not fit).
struct DramCapacity {
  double dram_bytes = 0;             // DramCapacityBytes: dram.capacity_gib or preset x channels
  double weight_bytes = 0;           // WeightBytesOn, all classes
  double activation_bytes = 0;       // DRAM activation spill areas, ActivationBufferBytes
  double kv_bytes_per_token = 0;     // K and V of all layers for one token at kv_bits
  double free_bytes = 0;             // dram - weights - activations, at least 0: room for KV
  int64_t max_kv_tokens = 0;         // floor(free / kv_bytes_per_token), over all sequences
  int64_t max_context_at_batch = 0;  // floor(max_kv_tokens / batch): tokens per sequence
  int64_t max_batch_at_context = 0;  // floor(max_kv_tokens / final context of the workload)
  double kv_bytes_at_end = 0;        // KV cache of the workload: batch x final context tokens
  // True if weights, activation buffers and the workload's KV cache fit.
  bool fits() const { return weight_bytes + activation_bytes + kv_bytes_at_end <= dram_bytes; }
};

// Tokens in one sequence's KV cache at the end of the workload:
// context + prefill + decode.
int64_t FinalContextTokens(const WorkloadConfig& workload);

// Bytes of the DRAM activation spill areas (the tiler's input and output
// areas, sim/mapping/tiler.cc): two areas, each one step's widest activation
// matrix, batch x max(prefill, 1) rows x max(width, ffn.width, heads x
// head_dim, vocab) elements at activation_bits. An upper estimate.
double ActivationBufferBytes(const ModelConfig& model, const WorkloadConfig& workload);

DramCapacity ComputeDramCapacity(const ModelConfig& model, const ArchConfig& arch,
                                 const WorkloadConfig& workload);

}  // namespace tritsim
