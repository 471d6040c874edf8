// The reference the datapath is checked against: the exact integer product
// computed by Eigen, with no code shared with the datapath model.
#pragma once

#include <cstdint>
#include <vector>

#include "datapath/trit_packing.h"

namespace tritsim {

// [m x k] int8 activations (row-major) times [k x n] trits (column-major),
// exactly, as a row-major [m x n] matrix.
std::vector<int64_t> ReferenceGemm(const std::vector<int8_t>& activations, const Trits& weights,
                                   int64_t m, int64_t k, int64_t n);

}  // namespace tritsim
