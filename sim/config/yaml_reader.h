// Internal to sim/config: strict, message-rich reading of one YAML document.
//
// The only header that includes yaml-cpp. config_loader.cc maps sections of
// a document onto the config structs with the typed readers below; every
// failure throws tritsim::Error (ExitCode::kBadInput) formatted by
// InputError as "FILE:LINE: KEY.PATH: what is wrong, got VALUE".
//
// Guards against hostile input (all checked before the structs are filled):
//   * files larger than kMaxYamlBytes are refused unread;
//   * NUL and other control bytes are refused (binary garbage);
//   * YAML aliases ("*name") are refused, so no alias expansion can blow up;
//   * more than kMaxYamlNodes nodes, or more than one document, are refused;
//   * yaml-cpp's own nesting-depth guard (2000 levels) is reported cleanly.
#pragma once

#include <cstdint>
#include <set>
#include <string>
#include <utility>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "common/error.h"
#include "config/config_loader.h"
#include "config/field_rules.h"

namespace tritsim::config_internal {

constexpr int64_t kMaxYamlBytes = 1 << 20;  // 1 MiB: far above any real config
constexpr int64_t kMaxYamlNodes = 10000;    // our schemas have about 100 keys

// The keys a file kind may hold. `leaves` are dotted paths of scalar or
// list values ("dram.timing.tRCD"); sections are their prefixes.
// `open_maps` are maps whose keys are free-form names ("energy.overrides").
struct Schema {
  std::vector<std::string> leaves;
  std::vector<std::string> open_maps;
};

// Reads a whole file. Throws "PATH: cannot open file" or, above
// kMaxYamlBytes, "PATH: file is larger than 1 MiB ...".
std::string ReadConfigFile(const std::string& path);

// Edit distance (optimal string alignment: a swap of neighbours costs 1),
// for "did you mean" suggestions.
int EditDistance(const std::string& a, const std::string& b);

// The candidate nearest to `word`, or "" if none is plausibly meant.
std::string NearestWord(const std::string& word, const std::vector<std::string>& candidates);

// A parsed, guarded document plus the overrides applied to it. Messages for
// values that came from an override name "--set PREFIX.KEY" instead of a line.
class Document {
 public:
  // Parses `text`; throws on syntax errors, guards, or a top level that is
  // not a map. An empty document is an error.
  // `flag_prefix` is how the command line names keys of this file kind
  // ("arch." or "model."), so override messages read "--set arch.array.trees".
  Document(const std::string& text, std::string source, const Schema& schema,
           std::string flag_prefix = "");

  // Replaces or creates each key path with its value (parsed as YAML), in
  // order. Throws for a key path not in the schema, with a suggestion.
  void ApplyOverrides(const ConfigOverrides& overrides);

  const YAML::Node& root() const { return root_; }
  const Schema& schema() const { return schema_; }

  // An error at key path `path` on 1-based `line` (0: no line). When the
  // value came from an override, names "--set KEY" instead of the line.
  Error Fail(const std::string& path, int line, const std::string& message) const;

 private:
  void ApplyOne(const ConfigOverride& override_entry);
  std::string Flag(const std::string& key) const;  // "--set " + flag_prefix + key
  void CheckOverrideKey(const std::string& key) const;

  std::string source_;
  const Schema& schema_;
  std::string flag_prefix_;
  YAML::Node root_;
  std::vector<std::string> overridden_;  // override key paths, in order applied
};

// The rules live in config/field_rules.h (shared with the field tables).
using tritsim::IntRule;
using tritsim::RealRule;

// One map in the document at key path `path` ("" for the top level).
// Construction checks that the node is a map (an absent node is an empty
// section), that no key repeats, and that every key is known to the schema
// at this level (suggesting the nearest otherwise). Readers leave the field
// untouched when the key is absent, so struct defaults stand.
class Section {
 public:
  Section(const Document& doc, const YAML::Node& node, std::string path);

  bool Has(const std::string& key) const;
  Section Child(const std::string& key) const;

  void ReadInt(const std::string& key, const IntRule& rule, int64_t& field) const;
  void ReadInt(const std::string& key, const IntRule& rule, int& field) const;
  // An integer that must be one of `allowed` (e.g. 8 or 16 bits).
  void ReadIntChoice(const std::string& key, const std::vector<int64_t>& allowed,
                     int64_t& field) const;
  void ReadIntChoice(const std::string& key, const std::vector<int64_t>& allowed, int& field) const;
  void ReadReal(const std::string& key, const RealRule& rule, double& field) const;
  void ReadBool(const std::string& key, bool& field) const;
  // A plain or quoted string of 1 to 200 printable characters.
  void ReadString(const std::string& key, std::string& field) const;
  // One of the spellings in `names`; returns its index, or -1 if absent.
  int ReadChoice(const std::string& key, const std::vector<std::string>& names) const;
  // A list of strings, each one of `names`; returns indices in order, or
  // nothing if the key is absent. Duplicates and missing names are allowed
  // here; the caller checks the combination.
  bool ReadNameList(const std::string& key, const std::vector<std::string>& names,
                    std::vector<int>& indices) const;
  // An open map of name -> real number; each name must be one of `known`
  // (an unknown one is an error suggesting the nearest).
  void ReadNumberMap(const std::string& key, const RealRule& rule,
                     const std::vector<std::string>& known,
                     std::vector<std::pair<std::string, double>>& entries) const;

  // An error at `key` (its line if present, else this section's).
  [[noreturn]] void FailAt(const std::string& key, const std::string& message) const;
  // An error at the first of `keys` present here (else the first key).
  [[noreturn]] void FailAtAny(const std::vector<std::string>& keys,
                              const std::string& message) const;

 private:
  struct Entry {
    std::string key;
    int line;  // 1-based line of the key, 0 if unknown (created by an override)
    YAML::Node value;
  };

  std::string PathOf(const std::string& key) const;
  const Entry* Find(const std::string& key) const;
  // The plain scalar text of `entry`, or throws "must be EXPECTED, got ...".
  std::string PlainScalar(const Entry& entry, const std::string& expected) const;
  void CheckKeys() const;

  const Document* doc_;
  std::string path_;
  std::vector<Entry> entries_;  // in file order
};

}  // namespace tritsim::config_internal
