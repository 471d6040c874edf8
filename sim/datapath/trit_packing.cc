#include "datapath/trit_packing.h"

#include <array>
#include <string>

#include "common/error.h"

namespace tritsim {
namespace {

constexpr uint8_t kTwoBitMask = 0x3;
constexpr uint8_t kTwoBitUnused = 0x2;  // "10", the one 2-bit code no trit maps to

// What the base-3 decoder's 256-entry table holds for one byte.
struct Base3Entry {
  std::array<int8_t, kBase3TritsPerByte> trits{};
  bool valid = false;
};

// The decoder's lookup table, filled by repeated division by 3: digit i of
// code c is (c / 3^i) mod 3, minus 1.
std::array<Base3Entry, 256> BuildBase3Table() {
  std::array<Base3Entry, 256> table{};
  for (int code = 0; code < kBase3Codes; ++code) {
    int rest = code;
    for (int8_t& trit : table[size_t(code)].trits) {
      trit = int8_t(rest % 3 - 1);
      rest /= 3;
    }
    table[size_t(code)].valid = true;
  }
  return table;
}

const Base3Entry& Base3Decode(uint8_t code, size_t byte_index) {
  static const std::array<Base3Entry, 256> table = BuildBase3Table();
  const Base3Entry& entry = table[code];
  if (!entry.valid) {
    throw Error(ExitCode::kInternal, "trit decoder: byte " + std::to_string(byte_index) +
                                         " holds code " + std::to_string(code) +
                                         ", not a base3 code (0.." +
                                         std::to_string(kBase3Codes - 1) + ")");
  }
  return entry;
}

uint8_t Base3Code(const Trits& trits, size_t first) {
  int code = 0;
  for (int i = kBase3TritsPerByte - 1; i >= 0; --i) {
    const size_t at = first + size_t(i);
    code = code * 3 + (at < trits.size() ? trits[at] + 1 : 1);  // padding: zero trits
  }
  return uint8_t(code);
}

uint8_t TwoBitCode(const Trits& trits, size_t first) {
  uint8_t byte = 0;
  for (int i = 0; i < kTwoBitTritsPerByte && first + size_t(i) < trits.size(); ++i) {
    byte |= uint8_t((uint8_t(trits[first + size_t(i)]) & kTwoBitMask) << (2 * i));
  }
  return byte;
}

int8_t TwoBitDecode(uint8_t byte, int slot, size_t byte_index) {
  const uint8_t code = (byte >> (2 * slot)) & kTwoBitMask;
  if (code == kTwoBitUnused) {
    throw Error(ExitCode::kInternal, "trit decoder: byte " + std::to_string(byte_index) + " slot " +
                                         std::to_string(slot) +
                                         " holds 2-bit code 10, which no trit uses");
  }
  return code == kTwoBitMask ? int8_t(-1) : int8_t(code);
}

}  // namespace

int TritsPerByte(TritPacking packing) {
  return packing == TritPacking::kBase3 ? kBase3TritsPerByte : kTwoBitTritsPerByte;
}

int64_t PackedBytes(int64_t trits, TritPacking packing) {
  const int64_t per_byte = TritsPerByte(packing);
  return (trits + per_byte - 1) / per_byte;
}

std::vector<uint8_t> PackTrits(const Trits& trits, TritPacking packing) {
  std::vector<uint8_t> bytes(static_cast<size_t>(PackedBytes(int64_t(trits.size()), packing)));
  const size_t per_byte = size_t(TritsPerByte(packing));
  for (size_t b = 0; b < bytes.size(); ++b) {
    bytes[b] = packing == TritPacking::kBase3 ? Base3Code(trits, b * per_byte)
                                              : TwoBitCode(trits, b * per_byte);
  }
  return bytes;
}

Trits UnpackTrits(const std::vector<uint8_t>& bytes, int64_t count, TritPacking packing) {
  if (PackedBytes(count, packing) > int64_t(bytes.size())) {
    throw Error(ExitCode::kInternal, "trit decoder: " + std::to_string(bytes.size()) +
                                         " bytes cannot hold " + std::to_string(count) + " trits");
  }
  const size_t per_byte = size_t(TritsPerByte(packing));
  Trits trits(static_cast<size_t>(count));
  for (size_t t = 0; t < trits.size(); ++t) {
    const size_t b = t / per_byte;
    const int slot = int(t % per_byte);
    trits[t] = packing == TritPacking::kBase3 ? Base3Decode(bytes[b], b).trits[size_t(slot)]
                                              : TwoBitDecode(bytes[b], slot, b);
  }
  return trits;
}

const char* PackingName(TritPacking packing) {
  return packing == TritPacking::kBase3 ? "base3" : "two_bit";
}

}  // namespace tritsim
