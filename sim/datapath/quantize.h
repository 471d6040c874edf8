// Quantization of real-valued weights and activations to the integers the
// datapath computes with (docs/datapath.md, "Quantization").
//
// Weights: absmean quantization to ternary (Ma et al. 2024), per tensor:
//   gamma = mean |W|,  W_q = clip(round(W / (gamma + eps)), -1, 1).
// Activations: absmax quantization to int8 (Ma et al. 2024, after Wang et al.
// 2023), per token (row): scale = 127 / max |x|,  x_q = clip(round(x * scale),
// -127, 127). The clip range is the symmetric [-127, 127]; round(x * scale)
// never leaves it, so the clip only guards rounding of the largest entry.
// Rounding is half away from zero (std::round); ties have probability zero
// for the continuous inputs used here.
#pragma once

#include <cstdint>
#include <random>
#include <vector>

#include "datapath/trit_packing.h"

namespace tritsim {

// eps of absmean: keeps an all-zero tensor finite. 1e-5 is the value of the
// paper's reference code (from memory); it shifts the threshold by 1e-5 / gamma.
inline constexpr double kAbsmeanEpsilon = 1e-5;
// Largest int8 activation code after absmax quantization (2^(8-1) - 1).
inline constexpr int kActivationMaxCode = 127;

struct TernaryTensor {
  Trits trits;         // W_q, same order as the input
  double gamma = 0.0;  // mean |W| of the input
};

// Absmean quantization of a whole tensor. An empty input gives an empty tensor.
TernaryTensor AbsmeanTernary(const std::vector<double>& weights);

// Absmax quantization of a row-major [rows x cols] matrix, each row with its
// own scale. A row of zeros quantizes to zeros. REQUIRES size == rows * cols.
std::vector<int8_t> AbsmaxInt8Rows(const std::vector<double>& values, int64_t rows, int64_t cols);

// Fraction of zero trits (0 for an empty stream).
double ZeroFraction(const Trits& trits);

// `count` draws of N(0, 1) from `engine` (std::normal_distribution: the same
// values for the same seed with the same C++ standard library).
std::vector<double> GaussianValues(int64_t count, std::mt19937_64& engine);

}  // namespace tritsim
