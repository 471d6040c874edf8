// Study plan. See study_plan.h.
#include "study/study_plan.h"

#include <fmt/core.h>
#include <cstdio>
#include <fstream>
#include <sstream>

#include "common/error.h"
#include "config/config_loader.h"
#include "config/energy_table.h"
#include "energy/area_model.h"
#include "model/model_stats.h"

namespace tritsim {
namespace {

constexpr uint64_t kFnvOffset = 1469598103934665603ull;  // FNV-1a 64-bit (Fowler et al.)
constexpr uint64_t kFnvPrime = 1099511628211ull;
constexpr int kIdHashHexDigits = 8;

uint64_t Fnv(uint64_t h, const std::string& text) {
  for (unsigned char c : text) h = (h ^ c) * kFnvPrime;
  return (h ^ 0xffu) * kFnvPrime;  // a separator, so "ab"+"c" != "a"+"bc"
}

// The file's bytes, or "" for the embedded default (an empty path).
std::string FileText(const std::string& path) {
  if (path.empty()) return "";
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

std::string VariantId(size_t index, const StudyVariant& v) {
  uint64_t h = kFnvOffset;
  for (const std::string& part :
       {v.name, v.model_path, FileText(v.model_path), v.arch_path, FileText(v.arch_path)}) {
    h = Fnv(h, part);
  }
  for (const SweepSetting& s : v.settings) h = Fnv(Fnv(h, s.key), s.value);
  const WorkloadConfig& w = v.workload;
  for (int64_t n : {w.prefill_tokens, w.decode_tokens, w.context_tokens, w.batch}) {
    h = Fnv(h, std::to_string(n));
  }
  return fmt::format("v{:02}-{:0{}x}", index, h >> 32, kIdHashHexDigits);
}

// Loads the variant's files with its overrides; what it implies.
VariantFacts LoadFacts(const StudyVariant& v) {
  ConfigOverrides arch_over, model_over;
  SplitOverrides(v.settings, arch_over, model_over);
  const ArchConfig arch =
      v.arch_path.empty() ? DefaultArch(arch_over) : LoadArchFile(v.arch_path, arch_over);
  ResolveEnergyTable(arch.energy, arch.dram.preset);
  const ModelConfig model =
      v.model_path.empty() ? DefaultModel(model_over) : LoadModelFile(v.model_path, model_over);
  ValidateWorkload(v.workload, model);
  const WorkloadConfig& w = v.workload;
  VariantFacts f;
  f.model_name = model.name;
  f.arch_name = arch.name;
  f.weight_bytes = WeightBytesOn(model, arch.array.kind, arch.packing.format).total();
  f.kv_bytes = ComputeModelStats(model).kv_bytes_per_token * double(w.batch) *
               double(w.context_tokens + w.prefill_tokens + w.decode_tokens);
  f.area_mm2 = EstimateArea(arch).total_mm2();
  return f;
}

SweepPoint VariantPoint(size_t index, const StudyVariant& v, const VariantFacts& facts) {
  SweepPoint p;
  p.index = index;
  p.id = VariantId(index, v);
  p.values = {v.name};
  p.settings = v.settings;
  p.workload = v.workload;
  p.area_mm2 = facts.area_mm2;
  p.model_path = v.model_path;
  p.arch_path = v.arch_path;
  return p;
}

}  // namespace

StudyPlan BuildStudyPlan(const StudyFile& file) {
  StudyPlan plan;
  plan.file = file;
  plan.runs.file.path = file.path;
  plan.runs.file.name = file.name;
  plan.runs.file.workload = file.workload;
  plan.runs.axis_keys = {kVariantColumn};
  for (size_t i = 0; i < file.variants.size(); ++i) {
    const StudyVariant& v = file.variants[i];
    try {
      plan.facts.push_back(LoadFacts(v));
    } catch (const Error& e) {
      throw InputError(file.path, v.line, "variants[" + std::to_string(i) + "]",
                       "variant " + v.name + ": " + e.what());
    }
    plan.runs.points.push_back(VariantPoint(i, v, plan.facts.back()));
  }
  return plan;
}

}  // namespace tritsim
