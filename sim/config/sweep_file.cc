// Sweep file reader. See sweep_file.h.
#include "config/sweep_file.h"

#include <fmt/core.h>
#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <set>

#include "common/error.h"
#include "config/yaml_reader.h"

namespace tritsim {
namespace {

using config_internal::Document;
using config_internal::IntRule;
using config_internal::NearestWord;
using config_internal::Schema;
using config_internal::Section;

const std::vector<std::string> kWorkloadKeys = {"workload.prefill", "workload.decode",
                                                "workload.context", "workload.batch"};

// Largest workload figures a sweep file may name; the run checks the real
// limits (ValidateWorkload) when the plan loads each point.
constexpr int64_t kMaxWorkloadValue = int64_t(1) << 40;
// A range end is reached when within this fraction of a step (rounding).
constexpr double kRangeSlack = 1e-9;

const Schema& SweepSchema() {
  static const Schema schema{
      {"name", "base.arch", "base.model", "base.workload.prefill", "base.workload.decode",
       "base.workload.context", "base.workload.batch", "points", "constraints", "sampling"},
      {"axes"}};
  return schema;
}

int LineOf(const YAML::Node& node) {
  const int line = node.Mark().line;
  return line < 0 ? 0 : line + 1;
}

// Shortest text that reads back as `v` (integers without a fraction).
std::string FormatNumber(double v) {
  if (std::floor(v) == v && std::fabs(v) < 1e15) return std::to_string(int64_t(v));
  return fmt::format("{:.12g}", v);  // 12 digits: hides range rounding (0.1 * 3)
}

bool ParseNumber(const std::string& text, double& out) {
  if (text.empty()) return false;
  const char* first = text.data();
  const char* last = first + text.size();
  if (*first == '+') ++first;
  const auto result = std::from_chars(first, last, out);
  return result.ec == std::errc() && result.ptr == last && std::isfinite(out);
}

// Reads a whole sweep document; holds the source name for messages.
class SweepReader {
 public:
  SweepReader(const std::string& text, const std::string& source, const std::string& base_dir)
      : doc_(text, source, SweepSchema()), source_(source), base_dir_(base_dir) {}

  SweepFile Read() {
    SweepFile file;
    file.path = source_;
    const Section top(doc_, doc_.root(), "");
    if (!top.Has("name")) Fail("name", 0, "missing; give the sweep a name");
    top.ReadString("name", file.name);
    top.ReadBool("sampling", file.sampling);
    ReadBase(top.Child("base"), file);
    const YAML::Node axes = doc_.root()["axes"];
    const YAML::Node points = doc_.root()["points"];
    if (axes.IsDefined() == points.IsDefined()) {
      Fail(axes.IsDefined() ? "points" : "axes", axes.IsDefined() ? LineOf(points) : 0,
           "give exactly one of axes: (a product of values) or points: (an explicit list)");
    }
    if (axes.IsDefined()) file.axes = ReadAxes(axes);
    if (points.IsDefined()) file.points = ReadPoints(points);
    const YAML::Node constraints = doc_.root()["constraints"];
    if (constraints.IsDefined()) file.constraints = ReadConstraints(constraints, KeysOf(file));
    return file;
  }

 private:
  [[noreturn]] void Fail(const std::string& key, int line, const std::string& message) const {
    throw InputError(source_, line, key, message);
  }

  std::string Resolve(const std::string& path) const {
    if (path.empty() || std::filesystem::path(path).is_absolute()) return path;
    return (std::filesystem::path(base_dir_) / path).lexically_normal().string();
  }

  void ReadBase(const Section& base, SweepFile& file) const {
    base.ReadString("arch", file.arch_path);
    base.ReadString("model", file.model_path);
    file.arch_path = Resolve(file.arch_path);
    file.model_path = Resolve(file.model_path);
    const Section workload = base.Child("workload");
    workload.ReadInt("prefill", IntRule{0, kMaxWorkloadValue}, file.workload.prefill_tokens);
    workload.ReadInt("decode", IntRule{0, kMaxWorkloadValue}, file.workload.decode_tokens);
    workload.ReadInt("context", IntRule{0, kMaxWorkloadValue}, file.workload.context_tokens);
    workload.ReadInt("batch", IntRule{1, kMaxWorkloadValue}, file.workload.batch);
  }

  // Checks the form of a key path; arch./model. keys are checked against
  // their files later (BuildSweepPlan).
  void CheckKey(const std::string& path, const std::string& key, int line) const {
    if (IsWorkloadKey(key)) return;
    for (const char* prefix : {"arch.", "model."}) {
      const std::string p = prefix;
      if (key.size() > p.size() && key.compare(0, p.size(), p) == 0) return;
    }
    const std::string near = NearestWord(key, kWorkloadKeys);
    Fail(path + "." + key, line,
         near.empty() ? "unknown key; a key is arch.<key>, model.<key> or one of "
                        "workload.prefill, workload.decode, workload.context, workload.batch"
                      : "unknown key; did you mean '" + near + "'?");
  }

  std::string Scalar(const YAML::Node& value, const std::string& path) const {
    if (!value.IsScalar() || value.Scalar().empty()) {
      Fail(path, LineOf(value),
           "each value must be a single number or name, got " +
               std::string(value.IsSequence() ? "a list"
                           : value.IsMap()    ? "a map"
                                              : "nothing"));
    }
    return value.Scalar();
  }

  std::vector<SweepAxis> ReadAxes(const YAML::Node& axes) const {
    if (!axes.IsMap() || axes.size() == 0) {
      Fail("axes", LineOf(axes), "must be a map of KEY: values with at least one axis");
    }
    std::vector<SweepAxis> out;
    for (auto it = axes.begin(); it != axes.end(); ++it) {
      SweepAxis axis;
      axis.key = it->first.Scalar();
      axis.line = LineOf(it->first);
      CheckKey("axes", axis.key, axis.line);
      for (const SweepAxis& seen : out) {
        if (seen.key == axis.key) {
          Fail("axes." + axis.key, axis.line,
               "duplicate axis (first given on line " + std::to_string(seen.line) + ")");
        }
      }
      axis.values = ReadValues(it->second, "axes." + axis.key, axis.line);
      out.push_back(axis);
    }
    return out;
  }

  std::vector<std::string> ReadValues(const YAML::Node& node, const std::string& path,
                                      int line) const {
    std::vector<std::string> values;
    if (node.IsMap()) {
      values = ReadRange(node, path, line);
    } else if (node.IsSequence() && node.size() > 0) {
      for (const YAML::Node& v : node) values.push_back(Scalar(v, path));
    } else {
      Fail(path, line, "must be a list of values or a range {from: A, to: B, step: S | factor: F}");
    }
    if (values.size() > kMaxAxisValues) {
      Fail(path, line,
           "has " + std::to_string(values.size()) + " values; at most " +
               std::to_string(kMaxAxisValues) + " per axis");
    }
    std::set<std::string> seen;
    for (const std::string& v : values) {
      if (!seen.insert(v).second) Fail(path, line, "value " + v + " is listed twice");
    }
    return values;
  }

  double RangeNumber(const YAML::Node& range, const std::string& key,
                     const std::string& path) const {
    const YAML::Node v = range[key];
    double out = 0;
    if (!v.IsDefined()) Fail(path, LineOf(range), "range needs '" + key + "'");
    if (!v.IsScalar() || !ParseNumber(v.Scalar(), out)) {
      Fail(path + "." + key, LineOf(v),
           "must be a number, got " + (v.IsScalar() ? v.Scalar() : std::string("a list")));
    }
    return out;
  }

  void CheckRangeKeys(const YAML::Node& range, const std::string& path) const {
    const std::vector<std::string> known = {"from", "to", "step", "factor"};
    for (auto it = range.begin(); it != range.end(); ++it) {
      const std::string key = it->first.Scalar();
      if (std::find(known.begin(), known.end(), key) != known.end()) continue;
      const std::string near = NearestWord(key, known);
      Fail(path + "." + key, LineOf(it->first),
           near.empty() ? "unknown key; a range has from, to and step or factor"
                        : "unknown key; did you mean '" + near + "'?");
    }
    if (range["step"].IsDefined() == range["factor"].IsDefined()) {
      Fail(path, LineOf(range),
           "a range needs exactly one of step (arithmetic) or factor "
           "(geometric)");
    }
  }

  std::vector<std::string> ReadRange(const YAML::Node& range, const std::string& path,
                                     int line) const {
    CheckRangeKeys(range, path);
    const double from = RangeNumber(range, "from", path);
    const double to = RangeNumber(range, "to", path);
    if (to < from) Fail(path + ".to", line, "must be at least from (" + FormatNumber(from) + ")");
    const bool geometric = range["factor"].IsDefined();
    const double by = RangeNumber(range, geometric ? "factor" : "step", path);
    if (geometric && (by <= 1.0 || from <= 0.0)) {
      Fail(path + ".factor", line,
           "a geometric range needs factor > 1 and from > 0, got factor " + FormatNumber(by) +
               ", from " + FormatNumber(from));
    }
    if (!geometric && by <= 0.0) {
      Fail(path + ".step", line, "must be positive, got " + FormatNumber(by));
    }
    std::vector<std::string> values;
    for (size_t i = 0; values.size() <= kMaxAxisValues; ++i) {
      const double v = geometric ? from * std::pow(by, double(i)) : from + by * double(i);
      const double slack = kRangeSlack * (geometric ? v : by);
      if (v > to + slack) break;
      values.push_back(FormatNumber(std::min(v, std::max(to, v - slack))));
    }
    return values;
  }

  std::vector<SweepPointSpec> ReadPoints(const YAML::Node& points) const {
    if (!points.IsSequence() || points.size() == 0) {
      Fail("points", LineOf(points), "must be a list of maps KEY: value, at least one");
    }
    std::vector<SweepPointSpec> out;
    for (size_t i = 0; i < points.size(); ++i) {
      const YAML::Node p = points[i];
      const std::string path = "points[" + std::to_string(i) + "]";
      if (!p.IsMap() || p.size() == 0) Fail(path, LineOf(p), "must be a map of KEY: value");
      SweepPointSpec spec;
      spec.line = LineOf(p);
      for (auto it = p.begin(); it != p.end(); ++it) {
        const std::string key = it->first.Scalar();
        CheckKey(path, key, LineOf(it->first));
        for (const SweepSetting& s : spec.settings) {
          if (s.key == key) Fail(path + "." + key, LineOf(it->first), "duplicate key");
        }
        spec.settings.push_back({key, Scalar(it->second, path + "." + key)});
      }
      out.push_back(spec);
    }
    return out;
  }

  static std::vector<std::string> KeysOf(const SweepFile& file) {
    std::vector<std::string> keys;
    for (const SweepAxis& a : file.axes) keys.push_back(a.key);
    for (const SweepPointSpec& p : file.points) {
      for (const SweepSetting& s : p.settings) {
        if (std::find(keys.begin(), keys.end(), s.key) == keys.end()) keys.push_back(s.key);
      }
    }
    keys.push_back(kAreaKey);
    return keys;
  }

  std::vector<SweepConstraint> ReadConstraints(const YAML::Node& list,
                                               const std::vector<std::string>& keys) const {
    if (!list.IsSequence()) {
      Fail("constraints", LineOf(list), "must be a list of 'KEY OP NUMBER', e.g. area_mm2 <= 50");
    }
    std::vector<SweepConstraint> out;
    for (size_t i = 0; i < list.size(); ++i) {
      out.push_back(ParseConstraint(list[i], "constraints[" + std::to_string(i) + "]", keys));
    }
    return out;
  }

  SweepConstraint ParseConstraint(const YAML::Node& node, const std::string& path,
                                  const std::vector<std::string>& keys) const {
    SweepConstraint c;
    c.line = LineOf(node);
    const std::string usage =
        "must be 'KEY OP NUMBER' with OP one of <, <=, >, >=, ==, != "
        "(e.g. area_mm2 <= 50)";
    if (!node.IsScalar()) Fail(path, c.line, usage);
    c.text = node.Scalar();
    const size_t op_at = c.text.find_first_of("<>=!");
    if (op_at == std::string::npos) Fail(path, c.line, usage + ", got " + c.text);
    size_t op_len = 1;
    if (op_at + 1 < c.text.size() && c.text[op_at + 1] == '=') op_len = 2;
    const std::string op = c.text.substr(op_at, op_len);
    static const std::vector<std::pair<std::string, CompareOp>> kOps = {
        {"<", CompareOp::kLess},    {"<=", CompareOp::kLessEqual},
        {">", CompareOp::kGreater}, {">=", CompareOp::kGreaterEqual},
        {"==", CompareOp::kEqual},  {"!=", CompareOp::kNotEqual}};
    auto found =
        std::find_if(kOps.begin(), kOps.end(), [&](const auto& p) { return p.first == op; });
    if (found == kOps.end()) Fail(path, c.line, usage + ", got " + c.text);
    c.op = found->second;
    c.key = Trim(c.text.substr(0, op_at));
    if (!ParseNumber(Trim(c.text.substr(op_at + op_len)), c.number)) {
      Fail(path, c.line, usage + "; the right side must be a number, got " + c.text);
    }
    if (std::find(keys.begin(), keys.end(), c.key) == keys.end()) {
      const std::string near = NearestWord(c.key, keys);
      Fail(path, c.line,
           "unknown key '" + c.key + "'" +
               (near.empty() ? "; use an axis key or area_mm2" : "; did you mean '" + near + "'?"));
    }
    return c;
  }

  static std::string Trim(const std::string& s) {
    const size_t b = s.find_first_not_of(" \t");
    const size_t e = s.find_last_not_of(" \t");
    return b == std::string::npos ? "" : s.substr(b, e - b + 1);
  }

  Document doc_;
  std::string source_;
  std::string base_dir_;
};

}  // namespace

bool IsWorkloadKey(const std::string& key) {
  return std::find(kWorkloadKeys.begin(), kWorkloadKeys.end(), key) != kWorkloadKeys.end();
}

std::string NearestKey(const std::string& word, const std::vector<std::string>& candidates) {
  return NearestWord(word, candidates);
}

bool CompareHolds(CompareOp op, double value, double number) {
  switch (op) {
    case CompareOp::kLess:
      return value < number;
    case CompareOp::kLessEqual:
      return value <= number;
    case CompareOp::kGreater:
      return value > number;
    case CompareOp::kGreaterEqual:
      return value >= number;
    case CompareOp::kEqual:
      return value == number;
    case CompareOp::kNotEqual:
      return value != number;
  }
  return false;
}

SweepFile LoadSweepText(const std::string& text, const std::string& source_name,
                        const std::string& base_dir) {
  try {
    return SweepReader(text, source_name, base_dir).Read();
  } catch (const Error&) {
    throw;
  } catch (const YAML::Exception& e) {
    throw InputError(source_name, e.mark.line < 0 ? 0 : e.mark.line + 1, "", e.msg);
  }
}

SweepFile LoadSweepFile(const std::string& path) {
  const std::string text = config_internal::ReadConfigFile(path);
  const std::string dir = std::filesystem::path(path).parent_path().string();
  return LoadSweepText(text, path, dir.empty() ? "." : dir);
}

}  // namespace tritsim
