#include "datapath/datapath_check.h"

#include <algorithm>
#include <random>
#include <string>

#include "common/error.h"
#include "datapath/adder_tree.h"
#include "datapath/quantize.h"
#include "datapath/reference_gemm.h"

namespace tritsim {
namespace {

constexpr double kBitsPerByte = 8.0;

void CheckDim(const char* flag, int64_t value) {
  if (value < 1 || value > kMaxDatapathDim) {
    throw UsageError(std::string(flag) + ": must be an integer in [1, " +
                     std::to_string(kMaxDatapathDim) + "], got " + std::to_string(value));
  }
}

// Running totals over all outputs.
struct ReductionStats {
  int64_t max_magnitude = 0;
  int64_t overflow_events = 0;
  int64_t outputs_with_overflow = 0;
};

// One output: K in chunks of F in ascending k, each chunk through the tree
// (lanes past K are 0), the chunk sums into one accumulator.
int64_t ReduceOutput(const int8_t* activation_row, const int8_t* weight_col, int64_t k,
                     const TreeArrayConfig& array, ReductionStats& stats) {
  Accumulator acc(array.accumulator_bits);
  std::vector<int64_t> lanes(static_cast<size_t>(array.fan_in));
  for (int64_t k0 = 0; k0 < k; k0 += array.fan_in) {
    for (int64_t i = 0; i < array.fan_in; ++i) {
      lanes[size_t(i)] =
          k0 + i < k ? TernaryProduct(activation_row[k0 + i], weight_col[k0 + i]) : 0;
    }
    acc.Add(TreeSum(lanes));
  }
  stats.max_magnitude = std::max(stats.max_magnitude, acc.max_magnitude());
  stats.overflow_events += acc.overflow_events();
  stats.outputs_with_overflow += acc.overflow_events() > 0 ? 1 : 0;
  return acc.value();
}

void Compare(const std::vector<int64_t>& reference, int accumulator_bits, DatapathResult& r) {
  for (size_t i = 0; i < reference.size(); ++i) {
    if (r.outputs[i] == reference[i]) continue;
    if (!r.first_mismatch) {
      const int64_t n = r.shape.n;
      r.first_mismatch = Mismatch{int64_t(i) / n, int64_t(i) % n, r.outputs[i], reference[i]};
    }
    if (r.outputs[i] != WrapToBits(reference[i], accumulator_bits)) r.matches_modulo = false;
  }
}

// The weights as the decoder hands them to the trees, after packing; records
// the stored size and the zero fraction in `r`.
Trits StoreAndDecode(const Trits& weights, TritPacking packing, DatapathResult& r) {
  const std::vector<uint8_t> stored = PackTrits(weights, packing);
  Trits decoded = UnpackTrits(stored, int64_t(weights.size()), packing);
  r.packed_bytes = int64_t(stored.size());
  r.bits_per_trit = kBitsPerByte * double(r.packed_bytes) / double(weights.size());
  r.weight_zero_fraction = ZeroFraction(decoded);
  return decoded;
}

}  // namespace

void ValidateDatapathShape(const DatapathShape& shape) {
  CheckDim("--m", shape.m);
  CheckDim("--k", shape.k);
  CheckDim("--n", shape.n);
  const int64_t products = shape.m * shape.k * shape.n;  // <= 2^36: no overflow
  if (products > kMaxDatapathProducts) {
    throw UsageError("--m * --k * --n: must be at most " + std::to_string(kMaxDatapathProducts) +
                     " (2^27) products, got " + std::to_string(products));
  }
}

DatapathInputs RandomDatapathInputs(const DatapathShape& shape, uint64_t seed) {
  std::mt19937_64 engine(seed);
  DatapathInputs in;
  in.shape = shape;
  TernaryTensor w = AbsmeanTernary(GaussianValues(shape.k * shape.n, engine));
  in.weights = std::move(w.trits);
  in.weight_gamma = w.gamma;
  in.activations = AbsmaxInt8Rows(GaussianValues(shape.m * shape.k, engine), shape.m, shape.k);
  return in;
}

DatapathResult RunDatapath(const ArchConfig& arch, const DatapathInputs& in) {
  const DatapathShape& s = in.shape;
  DatapathResult r;
  r.shape = s;
  const Trits decoded = StoreAndDecode(in.weights, arch.packing.format, r);
  ReductionStats stats;
  r.outputs.resize(size_t(s.m * s.n));
  for (int64_t row = 0; row < s.m; ++row) {
    for (int64_t col = 0; col < s.n; ++col) {
      r.outputs[size_t(row * s.n + col)] = ReduceOutput(
          in.activations.data() + row * s.k, decoded.data() + col * s.k, s.k, arch.array, stats);
    }
  }
  r.max_accumulator_magnitude = stats.max_magnitude;
  r.overflow_events = stats.overflow_events;
  r.outputs_with_overflow = stats.outputs_with_overflow;
  Compare(ReferenceGemm(in.activations, in.weights, s.m, s.k, s.n), arch.array.accumulator_bits, r);
  return r;
}

}  // namespace tritsim
