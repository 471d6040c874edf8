// Bit-level arithmetic of one adder tree and its accumulator
// (docs/datapath.md, "Reduction order" and "Accumulator rule").
//
// A tree takes F products x * t (x an int8 activation, t a trit: the product
// is a select of +x, -x or 0, no multiplier) and sums adjacent pairs level by
// level through ceil(log2 F) adder levels. Each level is exactly as wide as
// its worst case needs, so no level can wrap. The tree's sum is added into an
// A-bit two's-complement accumulator that wraps around on overflow.
#pragma once

#include <cstdint>
#include <vector>

namespace tritsim {

// Largest |x| of an int8 activation (x = -128), so |x * t| <= 128.
inline constexpr int64_t kMaxActivationMagnitude = 128;

// Two's complement: `value` reduced modulo 2^bits into [-2^(bits-1), 2^(bits-1) - 1].
// REQUIRES: bits in [1, 64] (64: unchanged).
int64_t WrapToBits(int64_t value, int bits);
bool FitsInBits(int64_t value, int bits);

// Fewest two's-complement bits holding every integer in [-magnitude, +magnitude]:
// ceil(log2(magnitude + 1)) + 1 (magnitude bits plus a sign bit).
int SignedBitsForMagnitude(int64_t magnitude);

// ceil(log2 F): adder levels of a tree of fan-in F >= 1.
int TreeLevels(int64_t fan_in);

// Width of adder level `level` (0: the products). Level l holds sums of 2^l
// products, |sum| <= 128 * 2^l, so it needs SignedBitsForMagnitude(128 * 2^l)
// = 9 + l bits.
int AdderLevelBits(int level);

// One tree input: the activation selected by the trit (+x, -x or 0).
inline int64_t TernaryProduct(int8_t activation, int8_t trit) {
  return trit == 0 ? 0 : (trit > 0 ? activation : -int64_t(activation));
}

// The tree's sum of `lanes` (its F inputs; unused inputs are 0). Level l adds
// lanes 2i and 2i+1 of level l-1 into lane i, wrapped to AdderLevelBits(l);
// an odd last lane passes through. Overwrites `lanes`.
int64_t TreeSum(std::vector<int64_t>& lanes);

// An A-bit wrap-around accumulator that also keeps the exact running sum,
// to count overflows and the largest magnitude a design would need.
class Accumulator {
 public:
  explicit Accumulator(int bits) : bits_(bits) {}  // bits in [1, 64]

  // Adds one tree's sum. An overflow event is an add after which the exact
  // running sum lies outside the A-bit range.
  void Add(int64_t tree_sum);

  int64_t value() const { return value_; }  // the register: exact sum modulo 2^A
  int64_t exact() const { return exact_; }
  int64_t overflow_events() const { return overflow_events_; }
  int64_t max_magnitude() const { return max_magnitude_; }  // largest |exact running sum|

 private:
  int bits_;
  int64_t value_ = 0;
  int64_t exact_ = 0;
  int64_t overflow_events_ = 0;
  int64_t max_magnitude_ = 0;
};

}  // namespace tritsim
