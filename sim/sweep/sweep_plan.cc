// Sweep plan: expansion, validation, constraints, ids. See sweep_plan.h.
#include "sweep/sweep_plan.h"

#include <charconv>
#include <cstdint>
#include <cstdlib>

#include "common/error.h"
#include "common/fnv1a.h"
#include "config/config_loader.h"
#include "config/energy_table.h"
#include "energy/area_model.h"

namespace tritsim {
namespace {

constexpr int kMinIdDigits = 4;

// A candidate point before validation: the settings and where they came from.
struct Candidate {
  std::vector<std::string> values;  // per axis key, "" = not set
  int line = 0;                     // line to blame for combination errors
  std::string path;                 // key path to blame ("axes" or "points[i]")
};

std::vector<SweepSetting> SettingsOf(const std::vector<std::string>& keys,
                                     const std::vector<std::string>& values) {
  std::vector<SweepSetting> out;
  for (size_t i = 0; i < keys.size(); ++i) {
    if (!values[i].empty()) out.push_back({keys[i], values[i]});
  }
  return out;
}

ArchConfig LoadPointArch(const SweepFile& file, const ConfigOverrides& overrides) {
  return file.arch_path.empty() ? DefaultArch(overrides) : LoadArchFile(file.arch_path, overrides);
}

ModelConfig LoadPointModel(const SweepFile& file, const ConfigOverrides& overrides) {
  return file.model_path.empty() ? DefaultModel(overrides)
                                 : LoadModelFile(file.model_path, overrides);
}

bool ParseWorkloadValue(const std::string& text, int64_t& out) {
  const auto r = std::from_chars(text.data(), text.data() + text.size(), out);
  return r.ec == std::errc() && r.ptr == text.data() + text.size();
}

// The base workload with the workload.* settings applied. Throws for a
// value that is not an integer.
WorkloadConfig PointWorkload(const SweepFile& file, const std::vector<SweepSetting>& settings,
                             int line, const std::string& path) {
  WorkloadConfig w = file.workload;
  for (const SweepSetting& s : settings) {
    if (!IsWorkloadKey(s.key)) continue;
    int64_t v = 0;
    if (!ParseWorkloadValue(s.value, v)) {
      throw InputError(file.path, line, path + "." + s.key,
                       "must be a whole number of tokens or sequences, got " + s.value);
    }
    if (s.key == "workload.prefill") w.prefill_tokens = v;
    if (s.key == "workload.decode") w.decode_tokens = v;
    if (s.key == "workload.context") w.context_tokens = v;
    if (s.key == "workload.batch") w.batch = v;
  }
  return w;
}

// Loads the base files with one setting alone, so an unknown key or a bad
// value is blamed on the line that gave it.
void CheckOneSetting(const SweepFile& file, const SweepSetting& s, int line,
                     const std::string& path) {
  try {
    ConfigOverrides arch, model;
    SplitOverrides({s}, arch, model);
    if (!arch.empty()) LoadPointArch(file, arch);
    if (!model.empty()) LoadPointModel(file, model);
    PointWorkload(file, {s}, line, path);
  } catch (const Error& e) {
    if (std::string(e.what()).rfind(file.path + ":", 0) == 0) throw;
    throw InputError(file.path, line, path + "." + s.key,
                     "value " + s.value + ": " + std::string(e.what()));
  }
}

std::string Fingerprint(const std::vector<SweepSetting>& settings) {
  uint64_t h = kFnv1aOffset;
  for (const SweepSetting& s : settings) h = Fnv1a64(s.key + "=" + s.value + "\n", h);
  return Hex64(h).substr(8);  // the low 32 bits
}

std::string PointId(size_t index, size_t count, const std::vector<SweepSetting>& settings) {
  int digits = kMinIdDigits;
  for (size_t n = count; n >= 10000; n /= 10) ++digits;
  std::string number = std::to_string(index);
  if (number.size() < size_t(digits)) number.insert(0, size_t(digits) - number.size(), '0');
  return "p" + number + "-" + Fingerprint(settings);
}

// Candidates in product order: the last axis varies fastest.
std::vector<Candidate> ExpandAxes(const SweepFile& file) {
  size_t total = 1;
  for (const SweepAxis& a : file.axes) {
    total *= a.values.size();
    if (total > kMaxSweepPoints) {
      throw InputError(file.path, a.line, "axes." + a.key,
                       "the axes multiply to more than " + std::to_string(kMaxSweepPoints) +
                           " points; split the sweep");
    }
  }
  std::vector<Candidate> out(total);
  for (size_t i = 0; i < total; ++i) {
    size_t rest = i;
    out[i].values.resize(file.axes.size());
    for (size_t a = file.axes.size(); a-- > 0;) {
      out[i].values[a] = file.axes[a].values[rest % file.axes[a].values.size()];
      rest /= file.axes[a].values.size();
    }
    out[i].line = file.axes.front().line;
    out[i].path = "axes";
  }
  return out;
}

std::vector<Candidate> ExplicitPoints(const SweepFile& file, const std::vector<std::string>& keys) {
  std::vector<Candidate> out;
  for (size_t i = 0; i < file.points.size(); ++i) {
    Candidate c;
    c.values.assign(keys.size(), "");
    for (const SweepSetting& s : file.points[i].settings) {
      for (size_t k = 0; k < keys.size(); ++k) {
        if (keys[k] == s.key) c.values[k] = s.value;
      }
    }
    c.line = file.points[i].line;
    c.path = "points[" + std::to_string(i) + "]";
    out.push_back(c);
  }
  return out;
}

std::vector<std::string> AxisKeys(const SweepFile& file) {
  std::vector<std::string> keys;
  for (const SweepAxis& a : file.axes) keys.push_back(a.key);
  for (const SweepPointSpec& p : file.points) {
    for (const SweepSetting& s : p.settings) {
      bool seen = false;
      for (const std::string& k : keys) seen = seen || k == s.key;
      if (!seen) keys.push_back(s.key);
    }
  }
  return keys;
}

void CheckSettingsAlone(const SweepFile& file) {
  for (const SweepAxis& a : file.axes) {
    for (const std::string& v : a.values) CheckOneSetting(file, {a.key, v}, a.line, "axes");
  }
  for (size_t i = 0; i < file.points.size(); ++i) {
    for (const SweepSetting& s : file.points[i].settings) {
      CheckOneSetting(file, s, file.points[i].line, "points[" + std::to_string(i) + "]");
    }
  }
}

// Value of a constraint key for a point: an axis value or the area.
// Throws if the axis value is not a number.
double ConstraintValue(const SweepFile& file, const SweepConstraint& c,
                       const std::vector<std::string>& keys, const Candidate& cand, double area) {
  if (c.key == kAreaKey) return area;
  for (size_t k = 0; k < keys.size(); ++k) {
    if (keys[k] != c.key) continue;
    char* end = nullptr;
    const double v = std::strtod(cand.values[k].c_str(), &end);
    if (cand.values[k].empty() || *end != '\0') {
      throw InputError(file.path, c.line, "constraints",
                       c.text + ": " + c.key + " is '" +
                           (cand.values[k].empty() ? "not set" : cand.values[k]) +
                           "' in a point, not a number");
    }
    return v;
  }
  return 0.0;  // unreachable: LoadSweepFile checked the key
}

// Loads the point's files, checks its workload; returns its area.
double ValidateCandidate(const SweepFile& file, const std::vector<SweepSetting>& settings,
                         const Candidate& cand, WorkloadConfig& workload) {
  ConfigOverrides arch_over, model_over;
  SplitOverrides(settings, arch_over, model_over);
  try {
    const ArchConfig arch = LoadPointArch(file, arch_over);
    ResolveEnergyTable(arch.energy, arch.dram.preset);
    const ModelConfig model = LoadPointModel(file, model_over);
    workload = PointWorkload(file, settings, cand.line, cand.path);
    ValidateWorkload(workload, model);
    return EstimateArea(arch).total_mm2();
  } catch (const Error& e) {
    std::string desc;
    for (const SweepSetting& s : settings)
      desc += (desc.empty() ? "" : " ") + s.key + "=" + s.value;
    throw InputError(file.path, cand.line, cand.path,
                     "point (" + desc + "): " + std::string(e.what()));
  }
}

}  // namespace

void SplitOverrides(const std::vector<SweepSetting>& settings, ConfigOverrides& arch,
                    ConfigOverrides& model) {
  for (const SweepSetting& s : settings) {
    if (s.key.rfind("arch.", 0) == 0) arch.push_back({s.key.substr(5), s.value});
    if (s.key.rfind("model.", 0) == 0) model.push_back({s.key.substr(6), s.value});
  }
}

SweepPlan BuildSweepPlan(const SweepFile& file) {
  SweepPlan plan;
  plan.file = file;
  plan.axis_keys = AxisKeys(file);
  CheckSettingsAlone(file);
  plan.identity = IdentityOf(file);
  const std::vector<Candidate> candidates =
      file.axes.empty() ? ExplicitPoints(file, plan.axis_keys) : ExpandAxes(file);
  for (const Candidate& cand : candidates) {
    SweepPoint p;
    p.values = cand.values;
    p.settings = SettingsOf(plan.axis_keys, cand.values);
    p.area_mm2 = ValidateCandidate(file, p.settings, cand, p.workload);
    bool keep = true;
    for (const SweepConstraint& c : file.constraints) {
      keep = keep && CompareHolds(c.op, ConstraintValue(file, c, plan.axis_keys, cand, p.area_mm2),
                                  c.number);
    }
    if (!keep) {
      ++plan.excluded;
      continue;
    }
    plan.points.push_back(p);
  }
  if (plan.points.empty()) {
    throw InputError(
        file.path, 0, "constraints",
        "no point satisfies the constraints (" + std::to_string(plan.excluded) + " excluded)");
  }
  for (size_t i = 0; i < plan.points.size(); ++i) {
    plan.points[i].index = i;
    SweepPoint& p = plan.points[i];
    p.id = PointId(i, plan.points.size(), p.settings);
    p.input_hash = InputHash(plan.identity, p.settings, p.workload);
  }
  return plan;
}

std::vector<const SweepPoint*> ShardPoints(const SweepPlan& plan, size_t shard, size_t shards) {
  std::vector<const SweepPoint*> out;
  for (const SweepPoint& p : plan.points) {
    if (p.index % shards == shard) out.push_back(&p);
  }
  return out;
}

std::vector<std::string> PointRunArgs(const SweepPlan& plan, const SweepPoint& point,
                                      const std::string& json_path) {
  std::vector<std::string> args = {"run"};
  const std::string& model = point.model_path.empty() ? plan.file.model_path : point.model_path;
  const std::string& arch = point.arch_path.empty() ? plan.file.arch_path : point.arch_path;
  if (!model.empty()) args.insert(args.end(), {"--model", model});
  if (!arch.empty()) args.insert(args.end(), {"--arch", arch});
  for (const SweepSetting& s : point.settings) {
    if (!IsWorkloadKey(s.key)) args.insert(args.end(), {"--set", s.key + "=" + s.value});
  }
  const WorkloadConfig& w = point.workload;
  args.insert(args.end(),
              {"--prefill", std::to_string(w.prefill_tokens), "--decode",
               std::to_string(w.decode_tokens), "--context", std::to_string(w.context_tokens),
               "--batch", std::to_string(w.batch), "--json", json_path, "-q"});
  if (plan.file.sampling) args.push_back("--sample");
  return args;
}

std::string DescribePoint(const SweepPoint& point) {
  std::string out;
  for (const SweepSetting& s : point.settings)
    out += (out.empty() ? "" : " ") + s.key + "=" + s.value;
  return out;
}

}  // namespace tritsim
