#include "datapath/reference_gemm.h"

#include <Eigen/Core>

namespace tritsim {

std::vector<int64_t> ReferenceGemm(const std::vector<int8_t>& activations, const Trits& weights,
                                   int64_t m, int64_t k, int64_t n) {
  using RowMajorI8 = Eigen::Matrix<int8_t, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;
  using ColMajorI8 = Eigen::Matrix<int8_t, Eigen::Dynamic, Eigen::Dynamic, Eigen::ColMajor>;
  using RowMajorI64 = Eigen::Matrix<int64_t, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;
  const Eigen::Map<const RowMajorI8> a(activations.data(), m, k);
  const Eigen::Map<const ColMajorI8> w(weights.data(), k, n);
  std::vector<int64_t> out(static_cast<size_t>(m * n));
  Eigen::Map<RowMajorI64>(out.data(), m, n) = a.cast<int64_t>() * w.cast<int64_t>();
  return out;
}

}  // namespace tritsim
