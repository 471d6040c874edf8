#include "report/inspect_report.h"

#include <fmt/core.h>
#include <cmath>
#include <cstdio>
#include <nlohmann/json.hpp>
#include <string>

#include "common/error.h"
#include "config/dram_presets.h"
#include "mapping/tiler.h"
#include "model/model_stats.h"
#include "report/resolved_config.h"  // ArrayKindName
#include "report/workload_bounds.h"

namespace tritsim {
namespace {

nlohmann::ordered_json ByClassJson(const ByClass& c) {
  return {{"attention", c.attention},
          {"ffn", c.ffn},
          {"embedding", c.embedding},
          {"head", c.head},
          {"norm", c.norm}};
}

// Weight storage on this design: ternary tensors under the packing on a
// ternary array; every tensor at its native width on a MAC baseline.
const ByClass& StorageOnArch(const ModelStats& stats, const ArchConfig& arch) {
  switch (arch.array.kind) {
    case ArrayKind::kInt8Mac:
      return stats.weight_bytes_int8;
    case ArrayKind::kFp16Mac:
      return stats.weight_bytes_fp16;
    case ArrayKind::kTernary:
      break;
  }
  return arch.packing.format == TritPacking::kBase3 ? stats.weight_bytes_base3
                                                    : stats.weight_bytes_two_bit;
}

nlohmann::ordered_json CapacityJson(const DramCapacity& c) {
  return {{"dram_bytes", c.dram_bytes},
          {"weight_bytes", c.weight_bytes},
          {"activation_bytes", c.activation_bytes},
          {"kv_bytes_per_token", c.kv_bytes_per_token},
          {"free_bytes", c.free_bytes},
          {"max_kv_tokens", c.max_kv_tokens},
          {"max_context_at_batch", c.max_context_at_batch},
          {"max_batch_at_context", c.max_batch_at_context}};
}

std::string G(double v) { return fmt::format("{:.4g}", v); }

// A bound in tokens/s; null when unbounded.
nlohmann::ordered_json FiniteOrNull(double v) {
  return std::isfinite(v) ? nlohmann::ordered_json(v) : nullptr;
}

// Tokens/s of each resource; null for a resource the phase does not use.
nlohmann::ordered_json PerResourceJson(const PhaseBounds& phase) {
  nlohmann::ordered_json j;
  for (size_t r = 0; r < kResourceCount; ++r) {
    const double v = phase.tokens_per_second[r];
    j[ResourceName(Resource(r))] = FiniteOrNull(v);
  }
  return j;
}

nlohmann::ordered_json BoundsJson(const WorkloadBounds& b) {
  nlohmann::ordered_json j = nlohmann::ordered_json::object();
  if (b.decode.present) {
    j["decode_tokens_per_second"] = PerResourceJson(b.decode);
    j["decode_bound_by"] = ResourceName(b.decode.bound_by);
    j["decode_serial_compute_tokens_per_second"] =
        FiniteOrNull(b.decode.serial_compute_tokens_per_second);
  }
  if (b.prefill.present) {
    j["prefill_tokens_per_second"] = PerResourceJson(b.prefill);
    j["prefill_bound_by"] = ResourceName(b.prefill.bound_by);
    j["prefill_serial_compute_tokens_per_second"] =
        FiniteOrNull(b.prefill.serial_compute_tokens_per_second);
  }
  return j;
}

// "  decode bounds   dram_bandwidth 41.2, ... tokens/s; bound by X"
void PrintPhaseBounds(const nlohmann::ordered_json& bounds, const std::string& phase,
                      std::ostream& out) {
  if (!bounds.contains(phase + "_bound_by")) return;
  out << "  " << phase << (phase == "decode" ? " bounds  " : " bounds ");
  const char* separator = " ";
  for (const auto& [name, value] : bounds[phase + "_tokens_per_second"].items()) {
    out << separator << name << " " << (value.is_null() ? "-" : G(value.get<double>()));
    separator = ", ";
  }
  out << " tokens/s; bound by " << bounds[phase + "_bound_by"].get<std::string>() << "\n";
  const auto& serial = bounds[phase + "_serial_compute_tokens_per_second"];
  if (serial.is_null()) return;
  out << "  " << phase << (phase == "decode" ? " serial  " : " serial ") << " "
      << G(serial.get<double>())
      << " tokens/s: the tree array and the vector unit take turns, so their cycles add\n";
}

// The tree array's roofline verdict, corrected by the binding resource of the
// workload's decode when the bounds name one.
std::string RidgeVerdict(const nlohmann::ordered_json& j) {
  const auto& a = j["arch"];
  const bool memory =
      a["decode_intensity_ops_per_byte"].get<double>() < a["ridge_ops_per_byte"].get<double>();
  std::string verdict = memory ? "memory-bound on the tree array's roofline" : "compute-bound";
  if (j["bounds"].contains("decode_bound_by")) {
    verdict += "; decode is bound by " + j["bounds"]["decode_bound_by"].get<std::string>();
  }
  return verdict;
}

void PrintCapacity(const nlohmann::ordered_json& c, const WorkloadConfig& w, std::ostream& out) {
  out << "  DRAM capacity   " << G(c["dram_bytes"].get<double>() / 1e9) << " GB: weights "
      << G(c["weight_bytes"].get<double>() / 1e9) << " GB, activation buffers "
      << G(c["activation_bytes"].get<double>() / 1e6) << " MB, room for "
      << c["max_kv_tokens"].get<int64_t>() << " KV tokens\n";
  out << "                  longest context " << c["max_context_at_batch"].get<int64_t>()
      << " at batch " << w.batch << "; largest batch " << c["max_batch_at_context"].get<int64_t>()
      << " at context " << FinalContextTokens(w) << "\n";
}

}  // namespace

double WeightBytesOnArch(const ModelConfig& model, const ArchConfig& arch) {
  return StorageOnArch(ComputeModelStats(model), arch).total();
}

double PeakOpsPerSecond(const ArchConfig& arch) {
  const HardwareRates rates = ComputeRates(arch);
  return rates.array_ops_per_cycle / (double(rates.core_period_ps) * 1e-12);
}

nlohmann::ordered_json InspectJson(const InspectInputs& in) {
  const ModelStats stats = ComputeModelStats(in.model);
  const ByClass& storage = StorageOnArch(stats, in.arch);
  const double peak_ops = PeakOpsPerSecond(in.arch);
  const double peak_bytes = DramPeakBytesPerSecond(in.arch.dram);
  nlohmann::ordered_json j;
  j["schema"] = kInspectSchema;
  j["model"] = {{"name", in.model.name},
                {"parameters", stats.parameters.total()},
                {"weight_bytes", storage.total()},
                {"kv_bytes_per_token", stats.kv_bytes_per_token},
                {"ops_per_token", stats.ops_per_token},
                {"attention_ops_per_context_token", stats.attention_ops_per_context_token},
                {"parameters_by_class", ByClassJson(stats.parameters)},
                {"weight_bytes_by_class", ByClassJson(storage)},
                {"weight_bytes_by_packing",
                 {{"two_bit", stats.weight_bytes_two_bit.total()},
                  {"base3", stats.weight_bytes_base3.total()},
                  {"int8", stats.weight_bytes_int8.total()},
                  {"fp16", stats.weight_bytes_fp16.total()}}}};
  j["workload"] = {{"prefill", in.workload.prefill_tokens},
                   {"decode", in.workload.decode_tokens},
                   {"context", in.workload.context_tokens},
                   {"batch", in.workload.batch}};
  const double kv_tokens =
      double(in.workload.context_tokens + in.workload.prefill_tokens + in.workload.decode_tokens) *
      double(in.workload.batch);
  j["workload"]["kv_cache_bytes_at_end"] = stats.kv_bytes_per_token * kv_tokens;
  j["arch"] = {{"name", in.arch.name},
               {"array_kind", ArrayKindName(in.arch.array.kind)},
               {"peak_ops_per_second", peak_ops},
               {"dram_peak_bytes_per_second", peak_bytes},
               {"ridge_ops_per_byte", peak_ops / peak_bytes},
               {"sram_bytes", double(in.arch.sram.capacity_kib) * 1024.0}};
  // Decode at batch 1 reads every weight once per token: its intensity.
  j["arch"]["decode_intensity_ops_per_byte"] = stats.ops_per_token / storage.total();
  j["capacity"] = CapacityJson(ComputeDramCapacity(in.model, in.arch, in.workload));
  WorkloadBounds bounds;
  try {
    bounds = BoundsOfWorkload(in.model, in.arch, in.workload);
  } catch (const Error& e) {  // the workload cannot run here: say why, keep the rest
    if (e.code() != ExitCode::kSimFailed) throw;
    j["bounds"] = {{"unavailable", e.what()}};
    return j;
  }
  j["bounds"] = BoundsJson(bounds);
  if (bounds.decode.present) {
    j["arch"]["decode_tokens_per_second_bound"] =
        bounds.decode.tokens_per_second[size_t(bounds.decode.bound_by)];
  }
  return j;
}

void PrintInspect(const InspectInputs& in, std::ostream& out) {
  const nlohmann::ordered_json j = InspectJson(in);
  const auto& m = j["model"];
  const auto& a = j["arch"];
  out << "tritsim inspect: model " << in.model.name << ", design " << in.arch.name << "\n";
  out << "  parameters      " << G(m["parameters"].get<double>() / 1e9) << " G  (attention "
      << G(m["parameters_by_class"]["attention"].get<double>() / 1e9) << ", ffn "
      << G(m["parameters_by_class"]["ffn"].get<double>() / 1e9) << ", embedding "
      << G(m["parameters_by_class"]["embedding"].get<double>() / 1e9) << ", head "
      << G(m["parameters_by_class"]["head"].get<double>() / 1e9) << ", norm "
      << G(m["parameters_by_class"]["norm"].get<double>() / 1e6) << " M)\n";
  const auto& p = m["weight_bytes_by_packing"];
  out << "  weight bytes    " << G(m["weight_bytes"].get<double>() / 1e9) << " GB on this design"
      << "  (2-bit " << G(p["two_bit"].get<double>() / 1e9) << ", base-3 "
      << G(p["base3"].get<double>() / 1e9) << ", int8 " << G(p["int8"].get<double>() / 1e9)
      << ", fp16 " << G(p["fp16"].get<double>() / 1e9) << " GB)\n";
  out << "  KV cache        " << G(m["kv_bytes_per_token"].get<double>() / 1024.0)
      << " KiB per token; " << G(j["workload"]["kv_cache_bytes_at_end"].get<double>() / 1e6)
      << " MB at the end of this workload\n";
  out << "  ops per token   " << G(m["ops_per_token"].get<double>() / 1e9) << " Gop at context 0, +"
      << G(m["attention_ops_per_context_token"].get<double>() / 1e6) << " Mop per context token\n";
  out << "  peak compute    " << G(a["peak_ops_per_second"].get<double>() / 1e12) << " Top/s\n";
  out << "  peak DRAM       " << G(a["dram_peak_bytes_per_second"].get<double>() / 1e9)
      << " GB/s\n";
  out << "  ridge point     " << G(a["ridge_ops_per_byte"].get<double>())
      << " op/B; batch-1 decode runs at " << G(a["decode_intensity_ops_per_byte"].get<double>())
      << " op/B (" << RidgeVerdict(j) << ")\n";
  if (a.contains("decode_tokens_per_second_bound")) {
    out << "  decode bound    " << G(a["decode_tokens_per_second_bound"].get<double>())
        << " tokens/s for this workload (every resource a ceiling)\n";
  }
  if (j["bounds"].contains("unavailable")) {
    out << "  bounds          unavailable: " << j["bounds"]["unavailable"].get<std::string>()
        << "\n";
  }
  PrintPhaseBounds(j["bounds"], "prefill", out);
  PrintPhaseBounds(j["bounds"], "decode", out);
  PrintCapacity(j["capacity"], in.workload, out);
  out << "  Model estimates for architecture exploration, not sign-off numbers.\n";
}

}  // namespace tritsim
