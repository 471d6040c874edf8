// The field tables: one row per key of a config file kind (architecture,
// model), the one place a key's path, kind, unit, default and allowed range
// live. The loader iterates a table to read, range-check and store each
// value (config_loader.cc) and builds its unknown-key suggestions from the
// same rows; a test checks docs/config-reference.md against the rendered
// range text. Cross-key rules (tRC >= tRAS + tRP, heads divisible by
// kv_heads, ...) stay in the loader. No yaml-cpp here.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <utility>
#include <vector>

#include "config/arch_config.h"
#include "config/field_rules.h"
#include "config/model_config.h"

namespace tritsim {

// What a field's value is and how it is checked.
enum class FieldKind {
  kInt,          // integer under int_rule
  kIntChoice,    // integer, one of int_choices
  kReal,         // finite real number under real_rule
  kBool,         // true or false
  kString,       // 1 to 200 printable characters
  kChoice,       // one of names
  kPermutation,  // a list holding each of names exactly once
  kNumberMap,    // map of known entry name -> real number under real_rule
};

// A checked value on its way into a config struct; only the member of the
// field's kind is meaningful.
struct FieldValue {
  int64_t integer = 0;                                  // kInt, kIntChoice
  double real = 0.0;                                    // kReal
  bool boolean = false;                                 // kBool
  std::string text;                                     // kString; kChoice: the chosen name
  int index = -1;                                       // kChoice: index into names
  std::vector<int> indices;                             // kPermutation: indices into names
  std::vector<std::pair<std::string, double>> entries;  // kNumberMap, in file order
};

// One key of a config file kind and how it reaches the struct `Config`.
template <typename Config>
struct ConfigField {
  std::string key;                   // dotted key path in the file, e.g. "dram.timing.tRCD"
  FieldKind kind = FieldKind::kInt;  // what the value is and how it is checked
  std::string unit;                  // unit as docs/config-reference.md names it; "" for none
  IntRule int_rule{0, 0};            // kInt: inclusive range, power of two or not
  RealRule real_rule{0.0, 0.0};      // kReal, kNumberMap: the allowed range
  std::vector<int64_t> int_choices;  // kIntChoice: the allowed values, in order
  std::vector<std::string> names;    // kChoice, kPermutation: the allowed spellings
  bool from_preset = false;          // the default comes from dram.preset
  // kNumberMap: the entry names allowed, given the fields read before it.
  std::function<std::vector<std::string>(const Config&)> known_names;
  std::function<void(Config&, const FieldValue&)> set;  // stores a checked value
  std::function<std::string(const Config&)> show;       // a value as the docs write it
};

using ArchField = ConfigField<ArchConfig>;
using ModelField = ConfigField<ModelConfig>;

// The tables, in reading order (a preset before the keys it fills, a
// choice before a map whose names depend on it).
const std::vector<ArchField>& ArchFields();
const std::vector<ModelField>& ModelFields();

// The allowed values as docs/config-reference.md writes them, e.g.
// "integer in [1, 65536]", "power of two in [2, 4096]", "real in (0, 1000000]",
// "8 or 16", "`open`, `closed`".
std::string AllowedText(FieldKind kind, const IntRule& int_rule, const RealRule& real_rule,
                        const std::vector<int64_t>& int_choices,
                        const std::vector<std::string>& names);

template <typename Config>
std::string AllowedText(const ConfigField<Config>& f) {
  return AllowedText(f.kind, f.int_rule, f.real_rule, f.int_choices, f.names);
}

// The default as docs/config-reference.md writes it (without backticks):
// "preset" for a field the DRAM preset fills, else the struct default.
template <typename Config>
std::string DefaultText(const ConfigField<Config>& f) {
  return f.from_preset ? "preset" : f.show(Config{});
}

// Real numbers as messages and docs print them (%.10g: 1e6 is "1000000").
std::string FormatReal(double v);

}  // namespace tritsim
