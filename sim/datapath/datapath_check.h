// `tritsim datapath`: real integer GEMMs through the modelled datapath
// (packing, decoder, adder trees, accumulators), compared bit for bit with an
// Eigen reference. docs/datapath.md describes the model and the report.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include "config/arch_config.h"
#include "datapath/trit_packing.h"

namespace tritsim {

// Bounds that keep one check within seconds: each dimension, and the
// products m * k * n (2^27, about a second of the datapath model).
inline constexpr int64_t kMaxDatapathDim = 4096;
inline constexpr int64_t kMaxDatapathProducts = int64_t(1) << 27;

struct DatapathShape {
  int64_t m = 8;     // activation rows (tokens), [1, kMaxDatapathDim]
  int64_t k = 2048;  // reduction depth, [1, kMaxDatapathDim]
  int64_t n = 256;   // output columns, [1, kMaxDatapathDim]; m * k * n <= kMaxDatapathProducts
};

// Throws UsageError naming --m, --k or --n and the allowed range.
void ValidateDatapathShape(const DatapathShape& shape);

// The integers fed to the datapath.
struct DatapathInputs {
  DatapathShape shape;
  std::vector<int8_t> activations;  // [m x k] row-major, int8 codes
  Trits weights;                    // [k x n] column-major trits
  double weight_gamma = 0.0;        // absmean scale of the weights (0 if not quantized)
};

// N(0, 1) weights quantized by absmean and N(0, 1) activations quantized by
// per-row absmax, drawn from one std::mt19937_64 seeded with `seed`.
DatapathInputs RandomDatapathInputs(const DatapathShape& shape, uint64_t seed);

struct Mismatch {
  int64_t row = 0;
  int64_t col = 0;
  int64_t got = 0;       // the datapath's accumulator
  int64_t expected = 0;  // the exact reference
};

struct DatapathResult {
  DatapathShape shape;
  std::vector<int64_t> outputs;            // [m x n] row-major accumulator values
  int64_t packed_bytes = 0;                // bytes of the stored weight stream
  double bits_per_trit = 0.0;              // 8 * packed_bytes / (k * n)
  double weight_zero_fraction = 0.0;       // measured on the decoded trits
  int64_t max_accumulator_magnitude = 0;   // largest |exact running sum|
  int64_t overflow_events = 0;             // adds whose exact running sum left the A-bit range
  int64_t outputs_with_overflow = 0;       // outputs with at least one such add
  std::optional<Mismatch> first_mismatch;  // row-major first output != reference
  bool matches_modulo = true;              // every output == reference wrapped to A bits
  bool bit_exact() const { return !first_mismatch; }
};

// Packs the weights with arch.packing.format, decodes them, reduces K in
// chunks of arch.array.fan_in through the adder tree into an
// arch.array.accumulator_bits accumulator, and compares with ReferenceGemm.
DatapathResult RunDatapath(const ArchConfig& arch, const DatapathInputs& inputs);

}  // namespace tritsim
