#include "datapath/accumulator_width.h"

#include <algorithm>

#include "datapath/adder_tree.h"

namespace tritsim {

int AccumulatorBitsNeeded(int64_t k) { return SignedBitsForMagnitude(k * kMaxActivationMagnitude); }

int64_t LargestTernaryGemmK(const ModelConfig& model) {
  int64_t k = 0;
  if (model.attention_weights == WeightFormat::kTernary) {
    k = std::max({k, model.width, model.heads * model.head_dim});
  }
  if (model.ffn_weights == WeightFormat::kTernary) k = std::max({k, model.width, model.ffn_width});
  return k;
}

std::string AccumulatorWarning(const ArchConfig& arch, const ModelConfig& model) {
  const int64_t k = LargestTernaryGemmK(model);
  if (arch.array.kind != ArrayKind::kTernary || k == 0) return "";
  const int needed = AccumulatorBitsNeeded(k);
  if (arch.array.accumulator_bits >= needed) return "";
  return "array.accumulator_bits = " + std::to_string(arch.array.accumulator_bits) +
         " is narrower than the " + std::to_string(needed) +
         " bits a ternary GEMM with K = " + std::to_string(k) + " of model '" + model.name +
         "' can need; sums may wrap (docs/datapath.md)";
}

}  // namespace tritsim
