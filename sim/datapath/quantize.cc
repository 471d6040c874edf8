#include "datapath/quantize.h"

#include <algorithm>
#include <cmath>

namespace tritsim {
namespace {

// clip(round(value), -limit, limit)
int RoundClip(double value, int limit) {
  return int(std::clamp(std::round(value), -double(limit), double(limit)));
}

double MeanAbs(const std::vector<double>& values) {
  double sum = 0.0;
  for (double v : values) sum += std::fabs(v);
  return values.empty() ? 0.0 : sum / double(values.size());
}

double MaxAbs(const double* first, const double* last) {
  double largest = 0.0;
  for (const double* v = first; v != last; ++v) largest = std::max(largest, std::fabs(*v));
  return largest;
}

}  // namespace

TernaryTensor AbsmeanTernary(const std::vector<double>& weights) {
  TernaryTensor out;
  out.gamma = MeanAbs(weights);
  const double divisor = out.gamma + kAbsmeanEpsilon;
  out.trits.reserve(weights.size());
  for (double w : weights) out.trits.push_back(int8_t(RoundClip(w / divisor, 1)));
  return out;
}

std::vector<int8_t> AbsmaxInt8Rows(const std::vector<double>& values, int64_t rows, int64_t cols) {
  std::vector<int8_t> codes(values.size(), 0);
  for (int64_t r = 0; r < rows; ++r) {
    const double* row = values.data() + r * cols;
    const double largest = MaxAbs(row, row + cols);
    if (largest == 0.0) continue;
    const double scale = double(kActivationMaxCode) / largest;
    for (int64_t c = 0; c < cols; ++c) {
      codes[size_t(r * cols + c)] = int8_t(RoundClip(row[c] * scale, kActivationMaxCode));
    }
  }
  return codes;
}

double ZeroFraction(const Trits& trits) {
  if (trits.empty()) return 0.0;
  return double(std::count(trits.begin(), trits.end(), 0)) / double(trits.size());
}

std::vector<double> GaussianValues(int64_t count, std::mt19937_64& engine) {
  std::normal_distribution<double> normal(0.0, 1.0);
  std::vector<double> values(static_cast<size_t>(count));
  for (double& v : values) v = normal(engine);
  return values;
}

}  // namespace tritsim
