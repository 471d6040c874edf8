// Whether a design's accumulator is wide enough for the GEMMs a model runs
// (docs/datapath.md, "Accumulator width").
#pragma once

#include <cstdint>
#include <string>

#include "config/arch_config.h"
#include "config/model_config.h"

namespace tritsim {

// Accumulator bits a ternary GEMM of depth K needs for every int8 input:
// |sum| <= K * 128 (x = -128 times t = -1 in every term reaches +128 K), so
// ceil(log2(128 K + 1)) + 1 signed bits. REQUIRES: k >= 1.
int AccumulatorBitsNeeded(int64_t k);

// Largest K of the model's ternary GEMMs on the tree array (the shapes of
// model/trace_builder.cc: qkv and FFN up/gate have K = width, the attention
// output K = heads * head_dim, FFN down K = ffn_width); 0 if no tensor class
// is ternary. The head and embeddings are never ternary.
int64_t LargestTernaryGemmK(const ModelConfig& model);

// One line explaining that `arch`'s accumulator can wrap on `model`, or ""
// when it is wide enough (or the array is not a ternary tree array).
std::string AccumulatorWarning(const ArchConfig& arch, const ModelConfig& model);

}  // namespace tritsim
