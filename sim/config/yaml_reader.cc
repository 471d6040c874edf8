// Strict YAML reading for the config loader. See yaml_reader.h.
#include "config/yaml_reader.h"

#include "config/config_fields.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <functional>
#include <sstream>
#include <system_error>

#include <fmt/core.h>
#include <yaml-cpp/depthguard.h>
#include <yaml-cpp/eventhandler.h>

namespace tritsim::config_internal {
namespace {

using FailFn = std::function<Error(int line, const std::string& message)>;

constexpr size_t kMaxShownValueChars = 40;                 // longer values are cut in messages
constexpr size_t kMaxStringChars = kMaxConfigStringChars;  // names and labels

int LineOf(const YAML::Mark& mark) { return mark.line < 0 ? 0 : mark.line + 1; }

// Counts nodes and rejects what the loader does not accept, during a first
// parse of the text. Throws through `fail`.
class GuardHandler : public YAML::EventHandler {
 public:
  explicit GuardHandler(FailFn fail) : fail_(std::move(fail)) {}

  void OnDocumentStart(const YAML::Mark& mark) override {
    if (++documents_ > 1) throw fail_(LineOf(mark), "holds more than one YAML document");
  }
  void OnDocumentEnd() override {}
  void OnNull(const YAML::Mark& mark, YAML::anchor_t) override { Count(mark); }
  void OnAlias(const YAML::Mark& mark, YAML::anchor_t) override {
    throw fail_(LineOf(mark), "YAML aliases ('*name') are not supported; write the value out");
  }
  void OnScalar(const YAML::Mark& mark, const std::string&, YAML::anchor_t,
                const std::string&) override {
    Count(mark);
  }
  void OnSequenceStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t,
                       YAML::EmitterStyle::value) override {
    Count(mark);
  }
  void OnSequenceEnd() override {}
  void OnMapStart(const YAML::Mark& mark, const std::string&, YAML::anchor_t,
                  YAML::EmitterStyle::value) override {
    Count(mark);
  }
  void OnMapEnd() override {}

 private:
  void Count(const YAML::Mark& mark) {
    if (++nodes_ > kMaxYamlNodes) {
      throw fail_(LineOf(mark), "more than " + std::to_string(kMaxYamlNodes) +
                                    " YAML nodes; a config file is far smaller");
    }
  }

  FailFn fail_;
  int64_t documents_ = 0;
  int64_t nodes_ = 0;
};

// Refuses NUL and other control bytes, which no text config holds.
void CheckText(const std::string& text, const FailFn& fail) {
  int line = 1;
  for (size_t i = 0; i < text.size(); ++i) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    if (c == '\n') ++line;
    if (c < 0x20 && c != '\n' && c != '\r' && c != '\t') {
      throw fail(line, fmt::format("not a text file: control byte 0x{:02x}", c) + " at offset " +
                           std::to_string(i));
    }
    if (c == 0x7f) throw fail(line, "not a text file: DEL byte at offset " + std::to_string(i));
  }
}

// Parses `text` twice: once through GuardHandler, then into a node tree.
// Every yaml-cpp exception becomes a one-line error through `fail`.
YAML::Node LoadGuarded(const std::string& text, const FailFn& fail) {
  CheckText(text, fail);
  try {
    std::istringstream stream(text);
    YAML::Parser parser(stream);
    GuardHandler guard(fail);
    while (parser.HandleNextDocument(guard)) {
    }
    return YAML::Load(text);
  } catch (const Error&) {
    throw;
  } catch (const YAML::DeepRecursion& e) {
    throw fail(LineOf(e.mark), "nested too deeply (more than 2000 levels)");
  } catch (const YAML::Exception& e) {
    throw fail(LineOf(e.mark), "YAML syntax error: " + e.msg);
  } catch (const std::exception& e) {
    throw fail(0, std::string("cannot parse as YAML: ") + e.what());
  }
}

std::vector<std::string> SplitPath(const std::string& path) {
  std::vector<std::string> parts;
  std::string part;
  std::istringstream in(path);
  while (std::getline(in, part, '.')) parts.push_back(part);
  if (!path.empty() && path.back() == '.') parts.push_back("");
  return parts;
}

bool StartsWith(const std::string& s, const std::string& prefix) {
  return s.size() >= prefix.size() && s.compare(0, prefix.size(), prefix) == 0;
}

bool Contains(const std::vector<std::string>& v, const std::string& s) {
  return std::find(v.begin(), v.end(), s) != v.end();
}

std::string LastPart(const std::string& path) {
  const size_t dot = path.rfind('.');
  return dot == std::string::npos ? path : path.substr(dot + 1);
}

// The keys the schema allows directly under `path` ("" for the top level).
std::vector<std::string> KnownChildren(const Schema& schema, const std::string& path) {
  std::vector<std::string> all = schema.leaves;
  all.insert(all.end(), schema.open_maps.begin(), schema.open_maps.end());
  const std::string prefix = path.empty() ? "" : path + ".";
  std::vector<std::string> children;
  for (const std::string& full : all) {
    if (!StartsWith(full, prefix) || full.size() == prefix.size()) continue;
    const std::string rest = full.substr(prefix.size());
    const std::string child = rest.substr(0, rest.find('.'));
    if (!Contains(children, child)) children.push_back(child);
  }
  return children;
}

std::string JoinList(const std::vector<std::string>& items) {
  std::string out;
  for (const std::string& item : items) out += (out.empty() ? "" : ", ") + item;
  return out;
}

// A value as shown after "got": the text as written, cut to a readable size.
std::string ShowValue(const YAML::Node& value) {
  if (!value.IsDefined() || value.IsNull()) return "nothing (an empty value)";
  if (value.IsSequence()) return "a list";
  if (value.IsMap()) return "a map";
  std::string text = value.Scalar();
  if (text.size() > kMaxShownValueChars) text = text.substr(0, kMaxShownValueChars) + "...";
  const bool quoted = value.Tag() == "!";
  return quoted ? "\"" + text + "\" (a quoted string)" : text;
}

std::string DescribeRule(const IntRule& rule) {
  const std::string range = "[" + std::to_string(rule.lo) + ", " + std::to_string(rule.hi) + "]";
  return rule.power_of_two ? "a power of two in " + range : "an integer in " + range;
}

std::string DescribeRule(const RealRule& rule) {
  return std::string("a number in ") + (rule.lo_open ? "(" : "[") + FormatReal(rule.lo) + ", " +
         FormatReal(rule.hi) + (rule.hi_open ? ")" : "]");
}

bool IsPowerOfTwo(int64_t v) { return v > 0 && (v & (v - 1)) == 0; }

// Strict decimal integer; false for anything else, including overflow.
bool ParseInt(const std::string& text, int64_t& out) {
  const char* first = text.data();
  const char* last = first + text.size();
  if (first != last && *first == '+') ++first;
  if (first == last || *first == '+' || (*first == '-' && first != text.data())) return false;
  const auto result = std::from_chars(first, last, out);
  return result.ec == std::errc() && result.ptr == last;
}

// Strict decimal real (no hex, no nan/inf spellings); false if not finite.
bool ParseReal(const std::string& text, double& out) {
  if (text.empty()) return false;
  for (char c : text) {
    if (!(std::isdigit(static_cast<unsigned char>(c)) || c == '.' || c == 'e' || c == 'E' ||
          c == '+' || c == '-')) {
      return false;
    }
  }
  const char* first = text.data();
  const char* last = first + text.size();
  if (*first == '+') ++first;
  const auto result = std::from_chars(first, last, out);
  return result.ec == std::errc() && result.ptr == last && std::isfinite(out);
}

}  // namespace

std::string ReadConfigFile(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {
    throw InputError(path, 0, "", "cannot open file (it is a directory)");
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, 0, "", "cannot open file");
  const auto size = std::filesystem::file_size(path, ec);
  if (!ec && size > static_cast<uintmax_t>(kMaxYamlBytes)) {
    throw InputError(path, 0, "",
                     "file is larger than 1 MiB (" + std::to_string(size) +
                         " bytes); a config file is far smaller");
  }
  std::ostringstream text;
  text << in.rdbuf();
  if (in.bad()) throw InputError(path, 0, "", "cannot open file (read error)");
  return text.str();
}

int EditDistance(const std::string& a, const std::string& b) {
  // Optimal string alignment: insertions, deletions, substitutions and
  // swaps of neighbours each cost 1 (a swap is the commonest typo).
  const size_t n = b.size();
  std::vector<std::vector<int>> d(a.size() + 1, std::vector<int>(n + 1));
  for (size_t i = 0; i <= a.size(); ++i) d[i][0] = static_cast<int>(i);
  for (size_t j = 0; j <= n; ++j) d[0][j] = static_cast<int>(j);
  for (size_t i = 1; i <= a.size(); ++i) {
    for (size_t j = 1; j <= n; ++j) {
      const int cost = a[i - 1] == b[j - 1] ? 0 : 1;
      d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) {
        d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
      }
    }
  }
  return d[a.size()][n];
}

std::string NearestWord(const std::string& word, const std::vector<std::string>& candidates) {
  std::string best;
  int best_distance = 0;
  for (const std::string& c : candidates) {
    const int d = EditDistance(word, c);
    if (best.empty() || d < best_distance) {
      best = c;
      best_distance = d;
    }
  }
  // A suggestion must be plausibly what was meant: a few edits, or a third
  // of the word for long words (common practice in spelling suggestions).
  const int limit = std::max<int>(2, static_cast<int>(word.size()) / 3);
  return best_distance <= limit ? best : "";
}

// ---------------------------------------------------------------- Document

Document::Document(const std::string& text, std::string source, const Schema& schema,
                   std::string flag_prefix)
    : source_(std::move(source)), schema_(schema), flag_prefix_(std::move(flag_prefix)) {
  if (static_cast<int64_t>(text.size()) > kMaxYamlBytes) {
    throw InputError(source_, 0, "", "text is larger than 1 MiB; a config file is far smaller");
  }
  const FailFn fail = [this](int line, const std::string& message) {
    return InputError(source_, line, "", message);
  };
  root_ = LoadGuarded(text, fail);
  if (!root_.IsDefined() || root_.IsNull()) {
    throw InputError(source_, 0, "", "file is empty; expected a map of keys");
  }
  if (!root_.IsMap()) {
    throw InputError(source_, LineOf(root_.Mark()), "",
                     "top level must be a map of keys, got " + ShowValue(root_));
  }
}

Error Document::Fail(const std::string& path, int line, const std::string& message) const {
  for (auto it = overridden_.rbegin(); it != overridden_.rend(); ++it) {
    if (*it == path) return InputError(source_, 0, Flag(path), message);
    if (StartsWith(path, *it + ".")) {
      return InputError(source_, 0, Flag(*it), path + ": " + message);
    }
  }
  return InputError(source_, line, path, message);
}

void Document::ApplyOverrides(const ConfigOverrides& overrides) {
  for (const ConfigOverride& entry : overrides) ApplyOne(entry);
}

void Document::CheckOverrideKey(const std::string& key) const {
  const std::vector<std::string> parts = SplitPath(key);
  const bool well_formed =
      !parts.empty() &&
      std::none_of(parts.begin(), parts.end(), [](const std::string& p) { return p.empty(); });
  if (!well_formed) {
    throw InputError(source_, 0, Flag(key),
                     "malformed key path; expected names joined by single dots");
  }
  const std::string parent = key.substr(0, key.size() - parts.back().size());
  const bool in_open_map =
      parts.size() > 1 && Contains(schema_.open_maps, parent.substr(0, parent.size() - 1));
  const bool is_section = !KnownChildren(schema_, key).empty();
  if (Contains(schema_.leaves, key) || Contains(schema_.open_maps, key) || in_open_map ||
      is_section) {
    return;
  }
  std::string suggestion = NearestWord(key, schema_.leaves);
  if (suggestion.empty()) {
    for (const std::string& leaf : schema_.leaves) {
      if (LastPart(leaf) == parts.back()) suggestion = leaf;
    }
  }
  throw InputError(source_, 0, Flag(key),
                   suggestion.empty()
                       ? "unknown key"
                       : "unknown key; did you mean '" + flag_prefix_ + suggestion + "'?");
}

std::string Document::Flag(const std::string& key) const { return "--set " + flag_prefix_ + key; }

void Document::ApplyOne(const ConfigOverride& entry) {
  CheckOverrideKey(entry.key);
  const std::string flag = Flag(entry.key);
  const FailFn fail = [&](int, const std::string& message) {
    return InputError(source_, 0, flag, message);
  };
  if (static_cast<int64_t>(entry.value.size()) > kMaxYamlBytes) {
    throw fail(0, "value is larger than 1 MiB");
  }
  const YAML::Node value = LoadGuarded(entry.value, fail);
  if (!value.IsDefined() || value.IsNull()) throw fail(0, "empty value");

  const std::vector<std::string> parts = SplitPath(entry.key);
  YAML::Node map = root_;
  std::string walked;
  for (size_t i = 0; i + 1 < parts.size(); ++i) {
    walked += (walked.empty() ? "" : ".") + parts[i];
    YAML::Node child = map[parts[i]];
    if (!child.IsDefined() || child.IsNull()) {
      map[parts[i]] = YAML::Node(YAML::NodeType::Map);
    } else if (!child.IsMap()) {
      throw fail(0, "cannot set inside '" + walked + "', which is not a map in the file");
    }
    YAML::Node next = map[parts[i]];  // binds; assignment would overwrite
    map.reset(next);
  }
  map[parts.back()] = value;
  overridden_.push_back(entry.key);
}

// ----------------------------------------------------------------- Section

Section::Section(const Document& doc, const YAML::Node& node, std::string path)
    : doc_(&doc), path_(std::move(path)) {
  if (!node.IsDefined() || node.IsNull()) return;  // absent: all defaults
  if (!node.IsMap()) {
    throw doc.Fail(path_, LineOf(node.Mark()), "must be a map of keys, got " + ShowValue(node));
  }
  for (auto it = node.begin(); it != node.end(); ++it) {
    const int line = LineOf(it->first.Mark());
    if (!it->first.IsScalar()) throw doc.Fail(path_, line, "keys must be plain names");
    const std::string key = it->first.Scalar();
    if (const Entry* first = Find(key)) {
      throw doc.Fail(PathOf(key), line,
                     "duplicate key (first given on line " + std::to_string(first->line) + ")");
    }
    entries_.push_back(Entry{key, line, it->second});
  }
  CheckKeys();
}

void Section::CheckKeys() const {
  if (Contains(doc_->schema().open_maps, path_)) return;
  const std::vector<std::string> known = KnownChildren(doc_->schema(), path_);
  for (const Entry& e : entries_) {
    if (Contains(known, e.key)) continue;
    const std::string suggestion = NearestWord(e.key, known);
    throw doc_->Fail(PathOf(e.key), e.line,
                     suggestion.empty() ? "unknown key; known keys here: " + JoinList(known)
                                        : "unknown key; did you mean '" + suggestion + "'?");
  }
}

std::string Section::PathOf(const std::string& key) const {
  return path_.empty() ? key : path_ + "." + key;
}

const Section::Entry* Section::Find(const std::string& key) const {
  for (const Entry& e : entries_) {
    if (e.key == key) return &e;
  }
  return nullptr;
}

bool Section::Has(const std::string& key) const { return Find(key) != nullptr; }

Section Section::Child(const std::string& key) const {
  const Entry* e = Find(key);
  return Section(*doc_, e ? e->value : YAML::Node(), PathOf(key));
}

void Section::FailAt(const std::string& key, const std::string& message) const {
  const Entry* e = Find(key);
  throw doc_->Fail(PathOf(key), e ? e->line : 0, message);
}

void Section::FailAtAny(const std::vector<std::string>& keys, const std::string& message) const {
  for (const std::string& key : keys) {
    if (Has(key)) FailAt(key, message);
  }
  FailAt(keys.front(), message);
}

// Numbers and booleans must be plain, untagged scalars ("?" is yaml-cpp's
// tag of a plain scalar; quoted ones get "!", explicit tags their own).
std::string Section::PlainScalar(const Entry& e, const std::string& expected) const {
  if (!e.value.IsScalar() || e.value.Tag() != "?") {
    FailAt(e.key, "must be " + expected + ", got " + ShowValue(e.value));
  }
  return e.value.Scalar();
}

void Section::ReadInt(const std::string& key, const IntRule& rule, int64_t& field) const {
  const Entry* e = Find(key);
  if (!e) return;
  const std::string text = PlainScalar(*e, DescribeRule(rule));
  int64_t v = 0;
  if (!ParseInt(text, v))
    FailAt(key, "must be " + DescribeRule(rule) + ", got " + ShowValue(e->value));
  if (v < rule.lo && rule.what) FailAt(key, std::string("must be ") + rule.what + ", got " + text);
  if (v > rule.hi && rule.unit) {
    FailAt(key, "must be at most " + std::to_string(rule.hi) + " " + rule.unit + ", got " + text);
  }
  if (v < rule.lo || v > rule.hi || (rule.power_of_two && !IsPowerOfTwo(v))) {
    FailAt(key, "must be " + DescribeRule(rule) + ", got " + text);
  }
  field = v;
}

void Section::ReadInt(const std::string& key, const IntRule& rule, int& field) const {
  int64_t wide = field;
  ReadInt(key, rule, wide);
  field = static_cast<int>(wide);  // REQUIRES: rule within int range (all our rules are)
}

void Section::ReadIntChoice(const std::string& key, const std::vector<int64_t>& allowed,
                            int64_t& field) const {
  const Entry* e = Find(key);
  if (!e) return;
  std::vector<std::string> names;
  for (int64_t a : allowed) names.push_back(std::to_string(a));
  const std::string expected = "one of " + JoinList(names);
  const std::string text = PlainScalar(*e, expected);
  int64_t v = 0;
  if (!ParseInt(text, v) || std::find(allowed.begin(), allowed.end(), v) == allowed.end()) {
    FailAt(key, "must be " + expected + "; got " + ShowValue(e->value));
  }
  field = v;
}

void Section::ReadIntChoice(const std::string& key, const std::vector<int64_t>& allowed,
                            int& field) const {
  int64_t wide = field;
  ReadIntChoice(key, allowed, wide);
  field = static_cast<int>(wide);
}

void Section::ReadReal(const std::string& key, const RealRule& rule, double& field) const {
  const Entry* e = Find(key);
  if (!e) return;
  const std::string text = PlainScalar(*e, DescribeRule(rule));
  double v = 0.0;
  if (!ParseReal(text, v)) {
    FailAt(key,
           "must be a finite " + DescribeRule(rule).substr(2) + ", got " + ShowValue(e->value));
  }
  const bool below = rule.lo_open ? v <= rule.lo : v < rule.lo;
  const bool above = rule.hi_open ? v >= rule.hi : v > rule.hi;
  if (below || above) FailAt(key, "must be " + DescribeRule(rule) + ", got " + text);
  field = v;
}

void Section::ReadBool(const std::string& key, bool& field) const {
  const Entry* e = Find(key);
  if (!e) return;
  const std::string text = PlainScalar(*e, "true or false");
  if (text != "true" && text != "false") {
    FailAt(key, "must be true or false, got " + ShowValue(e->value));
  }
  field = text == "true";
}

void Section::ReadString(const std::string& key, std::string& field) const {
  const Entry* e = Find(key);
  if (!e) return;
  if (!e->value.IsScalar() || e->value.Scalar().empty() ||
      e->value.Scalar().size() > kMaxStringChars) {
    FailAt(key, "must be a string of 1 to " + std::to_string(kMaxStringChars) +
                    " characters, got " + ShowValue(e->value));
  }
  field = e->value.Scalar();
}

int Section::ReadChoice(const std::string& key, const std::vector<std::string>& names) const {
  const Entry* e = Find(key);
  if (!e) return -1;
  const std::string expected = "one of " + JoinList(names);
  if (!e->value.IsScalar()) FailAt(key, "must be " + expected + ", got " + ShowValue(e->value));
  const auto it = std::find(names.begin(), names.end(), e->value.Scalar());
  if (it == names.end()) {
    FailAt(key, "must be " + expected + "; got '" +
                    e->value.Scalar().substr(0, kMaxShownValueChars) + "'");
  }
  return static_cast<int>(it - names.begin());
}

bool Section::ReadNameList(const std::string& key, const std::vector<std::string>& names,
                           std::vector<int>& indices) const {
  const Entry* e = Find(key);
  if (!e) return false;
  const std::string expected = "a list of names from " + JoinList(names);
  if (!e->value.IsSequence()) FailAt(key, "must be " + expected + ", got " + ShowValue(e->value));
  indices.clear();
  for (size_t i = 0; i < e->value.size(); ++i) {
    const YAML::Node item = e->value[i];
    const auto it =
        item.IsScalar() ? std::find(names.begin(), names.end(), item.Scalar()) : names.end();
    if (it == names.end()) {
      FailAt(key, "entry " + std::to_string(i + 1) + " must be one of " + JoinList(names) +
                      "; got " + ShowValue(item));
    }
    indices.push_back(static_cast<int>(it - names.begin()));
  }
  return true;
}

void Section::ReadNumberMap(const std::string& key, const RealRule& rule,
                            const std::vector<std::string>& known,
                            std::vector<std::pair<std::string, double>>& entries) const {
  const Section map = Child(key);
  for (const Entry& e : map.entries_) {
    if (!Contains(known, e.key)) {
      const std::string suggestion = NearestWord(e.key, known);
      map.FailAt(e.key, suggestion.empty() ? "unknown entry; known: " + JoinList(known)
                                           : "unknown entry; did you mean '" + suggestion + "'?");
    }
    double v = 0.0;
    map.ReadReal(e.key, rule, v);
    entries.emplace_back(e.key, v);
  }
}

}  // namespace tritsim::config_internal
