// FNV-1a 64-bit hashing (Fowler, Noll, Vo; the published offset basis and
// prime), used for sweep point ids and the resolved-input hashes of sweep
// rows. Stable across platforms and versions: a contract of the sweep CSV.
#pragma once

#include <fmt/core.h>
#include <cstdint>
#include <string>
#include <string_view>

namespace tritsim {

inline constexpr uint64_t kFnv1aOffset = 14695981039346656037ull;
inline constexpr uint64_t kFnv1aPrime = 1099511628211ull;

// Continues the hash `h` over `bytes`; start with kFnv1aOffset.
inline uint64_t Fnv1a64(std::string_view bytes, uint64_t h = kFnv1aOffset) {
  for (char c : bytes) {
    h ^= static_cast<unsigned char>(c);
    h *= kFnv1aPrime;
  }
  return h;
}

// The hash as 16 lower-case hex digits.
inline std::string Hex64(uint64_t h) { return fmt::format("{:016x}", h); }

}  // namespace tritsim
