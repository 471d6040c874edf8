// Integer helpers shared by the tiler and the units' cost models.
#pragma once

#include <cmath>
#include <cstdint>

namespace tritsim {

// ceil(a / b). REQUIRES: b > 0.
inline uint64_t CeilDiv(uint64_t a, uint64_t b) { return (a + b - 1) / b; }

// Adder levels of a binary tree over `x` inputs: ceil(log2 x).
inline uint64_t Log2Ceil(uint64_t x) {
  uint64_t levels = 0;
  while ((uint64_t(1) << levels) < x) ++levels;
  return levels;
}

// Bytes that hold `elements` values of `bits` bits each, packed (rounded up;
// the 1e-9 keeps 5 trits at 1.6 bits from rounding 8.000000001 to 9 bytes).
inline uint64_t BitsToBytes(uint64_t elements, double bits) {
  return uint64_t(std::ceil(double(elements) * bits / 8.0 - 1e-9));
}

}  // namespace tritsim
