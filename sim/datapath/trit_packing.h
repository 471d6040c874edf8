// Ternary weights as the design stores them, and a model of the decoder that
// expands them back into trits (docs/datapath.md, "Packing layouts").
//
// A weight matrix [K x N] is one trit stream in column-major order: the K
// trits of column 0 with k ascending, then column 1, and so on; a tree's F
// trits of one column chunk are consecutive in it. The stream is cut into
// groups of TritsPerByte() trits, one byte each; the last byte is padded
// with zero trits.
//
// base3: byte = sum over i of (t_i + 1) * 3^i for the group's trits t_0..t_4
//   in stream order (digit i is trit i, least significant digit first; digit
//   0 means -1, 1 means 0, 2 means +1). Codes 243..255 are never written.
// two_bit: trit i sits in bits [2i+1 : 2i], least significant first, as a
//   2-bit two's-complement number: 00 = 0, 01 = +1, 11 = -1; 10 is never written.
#pragma once

#include <cstdint>
#include <vector>

#include "config/arch_config.h"

namespace tritsim {

using Trits = std::vector<int8_t>;  // each -1, 0 or +1

// 3^5 = 243 <= 256 < 3^6 = 729: five trits is the most one byte holds (arithmetic).
inline constexpr int kBase3TritsPerByte = 5;
inline constexpr int kBase3Codes = 243;  // 3^5 valid codes, 0..242
// 8 bits / 2 bits per trit.
inline constexpr int kTwoBitTritsPerByte = 4;

int TritsPerByte(TritPacking packing);

// Bytes that hold `trits` trits: ceil(trits / TritsPerByte(packing)).
int64_t PackedBytes(int64_t trits, TritPacking packing);

// The stored bytes of a trit stream. REQUIRES: every trit in {-1, 0, +1}.
std::vector<uint8_t> PackTrits(const Trits& trits, TritPacking packing);

// The decoder: the first `count` trits of a packed stream. Throws
// tritsim::Error (internal) for a code the packer never writes or a stream
// shorter than `count` trits.
Trits UnpackTrits(const std::vector<uint8_t>& bytes, int64_t count, TritPacking packing);

// "base3" or "two_bit", the spelling of the `packing.format` key.
const char* PackingName(TritPacking packing);

}  // namespace tritsim
