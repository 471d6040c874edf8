// Range rules of numeric config values, shared by the field tables
// (config_fields.h) and the strict YAML reader (yaml_reader.h). No yaml-cpp.
#pragma once

#include <cstddef>
#include <cstdint>

namespace tritsim {

// Longest name or label a config file may hold, characters.
inline constexpr size_t kMaxConfigStringChars = 200;

// An integer rule: inclusive range, optionally a power of two. `what`
// replaces the generic "an integer in [lo, hi]" in messages for values below
// `lo` (e.g. "a positive integer number of DRAM cycles"); `unit` follows
// "at most HI" for values above `hi`.
struct IntRule {
  int64_t lo;                  // smallest allowed value
  int64_t hi;                  // largest allowed value
  bool power_of_two = false;   // the value must also be a power of two
  const char* what = nullptr;  // message text for values below lo; nullptr: the range
  const char* unit = nullptr;  // unit named after "at most HI"; nullptr: the range
};

// A real-number rule: finite, in [lo, hi], with either end open on request.
struct RealRule {
  double lo;             // lower bound
  double hi;             // upper bound
  bool lo_open = false;  // lo itself is not allowed
  bool hi_open = false;  // hi itself is not allowed
};

}  // namespace tritsim
