// Run comparison. See run_diff.h.
#include "report/run_diff.h"

#include <fmt/format.h>

#include <map>
#include <set>
#include <vector>

namespace tritsim {
namespace {

using nlohmann::json;
using nlohmann::ordered_json;

constexpr int kDigits = 6;          // significant digits on the console
constexpr int kLabelWidth = 40;     // first console column
constexpr int kNumberWidth = 14;    // each value column
constexpr const char* kNone = "-";  // a figure the run does not have

ordered_json Ratio(const json& a, const json& b) {
  if (!a.is_number() || !b.is_number() || a.get<double>() == 0) return nullptr;
  return b.get<double>() / a.get<double>();
}

// {"a", "b", "ratio"} for one figure (a missing side is null).
ordered_json Figure(const json& a, const json& b) {
  return {{"a", a}, {"b", b}, {"ratio", Ratio(a, b)}};
}

const json& Get(const json& object, const std::string& key) {
  static const json kNull;
  return object.is_object() && object.contains(key) ? object[key] : kNull;
}

// Keys of A's object in order, then the keys only B has.
std::vector<std::string> KeyUnion(const json& a, const json& b) {
  std::vector<std::string> keys;
  std::set<std::string> seen;
  for (const json* side : {&a, &b}) {
    if (!side->is_object()) continue;
    for (auto it = side->begin(); it != side->end(); ++it) {
      if (seen.insert(it.key()).second) keys.push_back(it.key());
    }
  }
  return keys;
}

ordered_json Figures(const json& a, const json& b, const std::set<std::string>& skip = {}) {
  ordered_json out = ordered_json::object();
  for (const std::string& key : KeyUnion(a, b)) {
    if (!skip.count(key)) out[key] = Figure(Get(a, key), Get(b, key));
  }
  return out;
}

// phases[] as {name: phase}.
json ByName(const json& list) {
  json out = json::object();
  if (!list.is_array()) return out;
  for (const json& item : list) {
    if (item.is_object() && item.contains("name")) out[item["name"].get<std::string>()] = item;
  }
  return out;
}

ordered_json Phases(const json& a, const json& b) {
  const json pa = ByName(Get(a, "phases")), pb = ByName(Get(b, "phases"));
  ordered_json out = ordered_json::object();
  for (const std::string& name : KeyUnion(pa, pb)) {
    out[name] = Figures(Get(pa, name), Get(pb, name), {"name"});
  }
  return out;
}

// layers[] grouped by "kind/tensor": count and summed figures.
json OpClasses(const json& run) {
  static const char* const kSummed[] = {"cycles", "ops", "dram_bytes", "energy_joules"};
  json out = json::object();
  const json& layers = Get(run, "layers");
  if (!layers.is_array()) return out;
  for (const json& layer : layers) {
    const std::string key =
        Get(layer, "kind").get<std::string>() + "/" + Get(layer, "tensor").get<std::string>();
    json& group = out[key];
    group["count"] = Get(group, "count").is_null() ? 1 : group["count"].get<int64_t>() + 1;
    for (const char* figure : kSummed) {
      const double prior = Get(group, figure).is_null() ? 0.0 : group[figure].get<double>();
      group[figure] = prior + Get(layer, figure).get<double>();
    }
  }
  return out;
}

ordered_json OpClassFigures(const json& a, const json& b) {
  const json ca = OpClasses(a), cb = OpClasses(b);
  ordered_json out = ordered_json::object();
  for (const std::string& key : KeyUnion(ca, cb)) out[key] = Figures(Get(ca, key), Get(cb, key));
  return out;
}

// Flattens objects into {dotted.key: leaf}; arrays stay whole leaves.
void Flatten(const json& value, const std::string& prefix, std::map<std::string, json>& out) {
  if (!value.is_object()) {
    out[prefix] = value;
    return;
  }
  for (auto it = value.begin(); it != value.end(); ++it) {
    Flatten(it.value(), prefix.empty() ? it.key() : prefix + "." + it.key(), out);
  }
}

ordered_json ResolvedDifferences(const json& a, const json& b) {
  if (!a.contains("resolved") || !b.contains("resolved")) return nullptr;
  std::map<std::string, json> fa, fb;
  Flatten(a["resolved"], "", fa);
  Flatten(b["resolved"], "", fb);
  for (const auto& [key, value] : fb) fa.emplace(key, json());
  ordered_json out = ordered_json::array();
  for (const auto& [key, value] : fa) {
    const json& other = fb.count(key) ? fb[key] : json();
    if (value != other) out.push_back({{"key", key}, {"a", value}, {"b", other}});
  }
  return out;
}

std::string Cell(const json& v) {
  if (v.is_null()) return kNone;
  if (v.is_number_integer()) return v.dump();
  if (v.is_number()) return fmt::format("{:.{}g}", v.get<double>(), kDigits);
  if (v.is_string()) return v.get<std::string>();
  return v.dump();
}

void PrintRow(const std::string& label, const json& figure, std::ostream& out) {
  out << fmt::format("  {:<{}} {:>{}} {:>{}} {:>{}}\n", label, kLabelWidth, Cell(figure["a"]),
                     kNumberWidth, Cell(figure["b"]), kNumberWidth, Cell(figure["ratio"]),
                     kNumberWidth);
}

void PrintSection(const std::string& title, const ordered_json& figures, const std::string& prefix,
                  std::ostream& out) {
  out << title << "\n";
  for (auto it = figures.begin(); it != figures.end(); ++it) {
    PrintRow(prefix + it.key(), it.value(), out);
  }
}

void PrintGrouped(const std::string& title, const ordered_json& groups, std::ostream& out) {
  out << title << "\n";
  for (auto g = groups.begin(); g != groups.end(); ++g) {
    for (auto it = g.value().begin(); it != g.value().end(); ++it) {
      PrintRow(g.key() + " " + it.key(), it.value(), out);
    }
  }
}

void PrintResolved(const ordered_json& differences, std::ostream& out) {
  if (differences.is_null()) {
    out << "resolved config: not compared (a run JSON lacks the resolved section)\n";
    return;
  }
  out << "resolved config: " << differences.size()
      << (differences.size() == 1 ? " key differs\n" : " keys differ\n");
  for (const ordered_json& d : differences) {
    out << fmt::format("  {:<{}} {:>{}} {:>{}}\n", d["key"].get<std::string>(), kLabelWidth,
                       Cell(d["a"]), kNumberWidth, Cell(d["b"]), kNumberWidth);
  }
}

}  // namespace

ordered_json DiffJson(const json& a, const json& b, const std::string& a_path,
                      const std::string& b_path) {
  ordered_json j;
  j["schema"] = kDiffSchema;
  j["a"] = a_path;
  j["b"] = b_path;
  j["totals"] = Figures(Get(a, "totals"), Get(b, "totals"));
  j["phases"] = Phases(a, b);
  j["op_classes"] = OpClassFigures(a, b);
  j["resolved_differences"] = ResolvedDifferences(a, b);
  return j;
}

void PrintDiff(const ordered_json& diff, std::ostream& out) {
  out << "tritsim diff: A = " << diff["a"].get<std::string>()
      << ", B = " << diff["b"].get<std::string>() << "\n";
  out << fmt::format("  {:<{}} {:>{}} {:>{}} {:>{}}\n", "", kLabelWidth, "A", kNumberWidth, "B",
                     kNumberWidth, "B/A", kNumberWidth);
  PrintSection("totals", diff["totals"], "", out);
  PrintGrouped("phases", diff["phases"], out);
  PrintGrouped("op classes (kind/tensor, summed over layers)", diff["op_classes"], out);
  PrintResolved(diff["resolved_differences"], out);
  out << "Model estimates for architecture exploration, not sign-off numbers.\n";
}

}  // namespace tritsim
