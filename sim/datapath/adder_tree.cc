#include "datapath/adder_tree.h"

#include <algorithm>
#include <cstdlib>

namespace tritsim {
namespace {

constexpr int kWordBits = 64;
// SignedBitsForMagnitude(128): the products of level 0 lie in [-128, +128].
constexpr int kProductBits = 9;

// Bits of the unsigned binary form of `value` (0 for 0).
int BitLength(uint64_t value) {
  int bits = 0;
  for (; value != 0; value >>= 1) ++bits;
  return bits;
}

}  // namespace

int64_t WrapToBits(int64_t value, int bits) {
  if (bits >= kWordBits) return value;
  const uint64_t low_mask = (uint64_t(1) << bits) - 1;
  const uint64_t low = uint64_t(value) & low_mask;
  const bool negative = (low >> (bits - 1)) != 0;
  return negative ? int64_t(low | ~low_mask) : int64_t(low);  // sign-extends bit bits-1
}

bool FitsInBits(int64_t value, int bits) { return WrapToBits(value, bits) == value; }

int SignedBitsForMagnitude(int64_t magnitude) { return BitLength(uint64_t(magnitude)) + 1; }

int TreeLevels(int64_t fan_in) { return BitLength(uint64_t(fan_in - 1)); }

int AdderLevelBits(int level) { return kProductBits + level; }

int64_t TreeSum(std::vector<int64_t>& lanes) {
  int level = 0;
  for (size_t width = lanes.size(); width > 1; width = (width + 1) / 2) {
    const int bits = AdderLevelBits(++level);
    for (size_t i = 0; i < width / 2; ++i) {
      lanes[i] = WrapToBits(lanes[2 * i] + lanes[2 * i + 1], bits);
    }
    if (width % 2 != 0) lanes[width / 2] = lanes[width - 1];
  }
  return lanes.empty() ? 0 : lanes[0];
}

void Accumulator::Add(int64_t tree_sum) {
  exact_ += tree_sum;
  value_ = WrapToBits(value_ + tree_sum, bits_);
  if (!FitsInBits(exact_, bits_)) ++overflow_events_;
  max_magnitude_ = std::max(max_magnitude_, exact_ < 0 ? -exact_ : exact_);
}

}  // namespace tritsim
