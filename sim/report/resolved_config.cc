// Provenance and resolved config sections. See resolved_config.h. The enum
// spellings are the loader's (config/config_loader.cc); `tritsim run
// --from-report` on every golden run checks that they read back.
#include "report/resolved_config.h"

#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "common/build_info.h"
#include "common/error.h"
#include "config/config_loader.h"
#include "report/run_report.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

using nlohmann::ordered_json;

const char* FfnKindName(FfnKind k) { return k == FfnKind::kGated ? "gated" : "plain"; }

const char* ActivationName(Activation a) {
  switch (a) {
    case Activation::kRelu:
      return "relu";
    case Activation::kGelu:
      return "gelu";
    case Activation::kSilu:
      return "silu";
    case Activation::kRelu2:
      return "relu2";
  }
  return "relu";
}

const char* PackingName(TritPacking p) { return p == TritPacking::kBase3 ? "base3" : "two_bit"; }

const char* PagePolicyName(PagePolicy p) { return p == PagePolicy::kOpen ? "open" : "closed"; }

const char* AddressFieldName(AddressField f) {
  switch (f) {
    case AddressField::kRow:
      return "row";
    case AddressField::kBank:
      return "bank";
    case AddressField::kBankGroup:
      return "bank_group";
    case AddressField::kColumn:
      return "column";
    case AddressField::kChannel:
      return "channel";
  }
  return "row";
}

ordered_json PrecisionJson(const ModelConfig& m) {
  return {{"attention", WeightFormatName(m.attention_weights)},
          {"ffn", WeightFormatName(m.ffn_weights)},
          {"embedding", WeightFormatName(m.embedding_weights)},
          {"head", WeightFormatName(m.head_weights)},
          {"norm_bits", m.norm_bits},
          {"activation_bits", m.activation_bits},
          {"kv_bits", m.kv_bits}};
}

ordered_json ArrayJson(const TreeArrayConfig& a) {
  return {{"kind", ArrayKindName(a.kind)},
          {"trees", a.trees},
          {"fan_in", a.fan_in},
          {"accumulator_bits", a.accumulator_bits},
          {"register_cut", a.register_cut},
          {"zero_gating", a.zero_gating}};
}

ordered_json TimingJson(const DramTiming& t) {
  return {{"tCK_ns", t.tCK_ns},
          {"CL", t.CL},
          {"CWL", t.CWL},
          {"tRCD", t.tRCD},
          {"tRP", t.tRP},
          {"tRAS", t.tRAS},
          {"tRC", t.tRC},
          {"tCCD_S", t.tCCD_S},
          {"tCCD_L", t.tCCD_L},
          {"tRRD_S", t.tRRD_S},
          {"tRRD_L", t.tRRD_L},
          {"tFAW", t.tFAW},
          {"tWR", t.tWR},
          {"tWTR_S", t.tWTR_S},
          {"tWTR_L", t.tWTR_L},
          {"tRTP", t.tRTP},
          {"tRFC", t.tRFC},
          {"tREFI", t.tREFI},
          {"burst_length", t.burst_length}};
}

ordered_json DramJson(const DramConfig& d) {
  ordered_json map = ordered_json::array();
  for (AddressField f : d.address_map) map.push_back(AddressFieldName(f));
  return {{"preset", d.preset},
          {"channels", d.channels},
          {"bus_width_bits", d.bus_width_bits},
          {"bank_groups", d.bank_groups},
          {"banks_per_group", d.banks_per_group},
          {"row_bytes", d.row_bytes},
          {"queue_depth", d.queue_depth},
          {"page_policy", PagePolicyName(d.page_policy)},
          {"address_map", map},
          {"timing", TimingJson(d.timing)},
          {"ideal_latency_ns", d.ideal_latency_ns},
          {"ideal_bandwidth_gbps", d.ideal_bandwidth_gbps}};
}

ordered_json EnergyJson(const EnergyConfig& e) {
  ordered_json overrides = ordered_json::object();
  for (const auto& [name, value] : e.overrides_pj) overrides[name] = value;
  ordered_json j = {{"node", e.node}, {"overrides", overrides}};
  if (e.dram_pj_per_bit >= 0) j["dram_pj_per_bit"] = e.dram_pj_per_bit;
  return j;
}

// --------------------------------------------------- reading a run JSON back

nlohmann::json ReadRunJsonText(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, 0, "", "cannot open run JSON");
  std::ostringstream text;
  text << in.rdbuf();
  nlohmann::json doc = nlohmann::json::parse(text.str(), nullptr, false);
  if (doc.is_discarded() || !doc.is_object()) {
    throw InputError(path, 0, "", "not a JSON object (expected a tritsim run JSON)");
  }
  if (!doc.contains("schema") || doc["schema"] != kRunSchema) {
    throw InputError(path, 0, "schema", std::string("expected '") + kRunSchema + "'");
  }
  return doc;
}

const nlohmann::json& Member(const nlohmann::json& j, const std::string& key,
                             const std::string& path) {
  if (!j.is_object() || !j.contains(key)) {
    throw InputError(path, 0, "resolved",
                     "missing '" + key + "' (written by tritsim run since provenance was added)");
  }
  return j[key];
}

std::string Text(const nlohmann::json& j, const std::string& key, const std::string& path) {
  if (!j.is_string()) throw InputError(path, 0, key, "expected a string");
  return j.get<std::string>();
}

bool Flag(const nlohmann::json& j, const std::string& path) {
  if (!j.is_boolean())
    throw InputError(path, 0, "resolved.weights_resident", "expected true or false");
  return j.get<bool>();
}

int64_t Count(const nlohmann::json& workload, const char* key, const std::string& path) {
  const nlohmann::json& v = Member(workload, key, path);
  if (!v.is_number_integer()) {
    throw InputError(path, 0, std::string("resolved.workload.") + key, "expected an integer");
  }
  return v.get<int64_t>();
}

WorkloadConfig ReadWorkload(const nlohmann::json& j, const std::string& path) {
  WorkloadConfig w;
  w.prefill_tokens = Count(j, "prefill", path);
  w.decode_tokens = Count(j, "decode", path);
  w.context_tokens = Count(j, "context", path);
  w.batch = Count(j, "batch", path);
  return w;
}

}  // namespace

const char* ArrayKindName(ArrayKind k) {
  switch (k) {
    case ArrayKind::kTernary:
      return "ternary";
    case ArrayKind::kInt8Mac:
      return "int8_mac";
    case ArrayKind::kFp16Mac:
      return "fp16_mac";
  }
  return "ternary";
}

nlohmann::json ReadRunJsonFile(const std::string& path) { return ReadRunJsonText(path); }

ordered_json ProvenanceJson(const std::vector<std::string>& command) {
  return {{"version", BuildVersion()}, {"commit", kBuildCommit}, {"command", command}};
}

ordered_json ResolvedModelJson(const ModelConfig& m) {
  return {{"name", m.name},
          {"layers", m.layers},
          {"width", m.width},
          {"heads", m.heads},
          {"kv_heads", m.kv_heads},
          {"head_dim", m.head_dim},
          {"ffn",
           {{"width", m.ffn_width},
            {"kind", FfnKindName(m.ffn_kind)},
            {"activation", ActivationName(m.activation)}}},
          {"vocab", m.vocab},
          {"tied_embeddings", m.tied_embeddings},
          {"precision", PrecisionJson(m)},
          {"weight_zero_fraction", m.weight_zero_fraction}};
}

ordered_json ResolvedArchJson(const ArchConfig& a) {
  return {
      {"name", a.name},
      {"clock", {{"core_mhz", a.clock.core_mhz}}},
      {"array", ArrayJson(a.array)},
      {"packing",
       {{"format", PackingName(a.packing.format)},
        {"decoder_bytes_per_cycle", a.packing.decoder_bytes_per_cycle}}},
      {"vector",
       {{"lanes", a.vector.lanes},
        {"special_per_cycle", a.vector.special_per_cycle},
        {"pipeline_cycles", a.vector.pipeline_cycles}}},
      {"sram",
       {{"capacity_kib", a.sram.capacity_kib},
        {"banks", a.sram.banks},
        {"bank_width_bytes", a.sram.bank_width_bytes},
        {"ports", a.sram.ports}}},
      {"dma", {{"max_outstanding", a.dma.max_outstanding}, {"setup_cycles", a.dma.setup_cycles}}},
      {"dram", DramJson(a.dram)},
      {"energy", EnergyJson(a.energy)}};
}

ordered_json ResolvedWorkloadJson(const WorkloadConfig& w) {
  return {{"prefill", w.prefill_tokens},
          {"decode", w.decode_tokens},
          {"context", w.context_tokens},
          {"batch", w.batch}};
}

ordered_json ResolvedRunJson(const ResolvedRun& run) {
  ordered_json j;
  j["model"] = run.model ? ResolvedModelJson(*run.model) : ordered_json();
  j["arch"] = ResolvedArchJson(run.arch);
  j["workload"] = ResolvedWorkloadJson(run.workload);
  j["trace"] = run.trace.empty() ? ordered_json() : ordered_json(run.trace);
  j["weights_resident"] = run.weights_resident;
  return j;
}

ResolvedRun LoadResolvedRun(const std::string& path) {
  const nlohmann::json doc = ReadRunJsonText(path);
  const nlohmann::json& resolved = Member(doc, "resolved", path);
  ResolvedRun run;
  run.arch = LoadArchText(Member(resolved, "arch", path).dump(), path + " resolved.arch");
  const nlohmann::json& model = Member(resolved, "model", path);
  if (!model.is_null()) run.model = LoadModelText(model.dump(), path + " resolved.model");
  run.workload = ReadWorkload(Member(resolved, "workload", path), path);
  const nlohmann::json& trace = Member(resolved, "trace", path);
  if (!trace.is_null()) run.trace = Text(trace, "resolved.trace", path);
  run.weights_resident = Flag(Member(resolved, "weights_resident", path), path);
  if (run.trace.empty() == !run.model) {
    throw InputError(path, 0, "resolved", "expected exactly one of model and trace to be non-null");
  }
  return run;
}

ordered_json WithOrigin(const ordered_json& doc, const ordered_json& provenance,
                        const ordered_json& resolved) {
  ordered_json out;
  for (auto it = doc.begin(); it != doc.end(); ++it) {
    out[it.key()] = it.value();
    if (it.key() == "schema") out["provenance"] = provenance;
  }
  if (!out.contains("provenance")) out["provenance"] = provenance;
  out["resolved"] = resolved;
  return out;
}

}  // namespace tritsim
