// Model and architecture files -> config structs, strictly. See
// config_loader.h for the contract, config_fields.cc for every key, its unit,
// default and range (the table this reader iterates) and
// docs/config-reference.md for the same in prose.
#include "config/config_loader.h"

#include <fmt/core.h>
#include <algorithm>
#include <cstdio>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/config_fields.h"
#include "config/dram_presets.h"
#include "config/embedded_defaults.h"
#include "config/yaml_reader.h"

namespace tritsim {
namespace {

using config_internal::Document;
using config_internal::Schema;
using config_internal::Section;

// ------------------------------------------------------- table-driven reading

// The keys a table allows: its number maps are open maps, the rest leaves.
template <typename Config>
Schema SchemaOf(const std::vector<ConfigField<Config>>& fields) {
  Schema schema;
  for (const ConfigField<Config>& f : fields) {
    (f.kind == FieldKind::kNumberMap ? schema.open_maps : schema.leaves).push_back(f.key);
  }
  return schema;
}

const Schema& ModelSchema() {
  static const Schema kSchema = SchemaOf(ModelFields());
  return kSchema;
}

const Schema& ArchSchema() {
  static const Schema kSchema = SchemaOf(ArchFields());
  return kSchema;
}

// The section holding `key` (its path up to the last dot) and the last part.
std::pair<Section, std::string> SectionOf(const Section& top, const std::string& key) {
  Section section = top;
  size_t start = 0;
  for (size_t dot = key.find('.'); dot != std::string::npos; dot = key.find('.', start)) {
    section = section.Child(key.substr(start, dot - start));
    start = dot + 1;
  }
  return {section, key.substr(start)};
}

std::string JoinNames(const std::vector<std::string>& names) {
  std::string out;
  for (const std::string& n : names) out += (out.empty() ? "" : ", ") + n;
  return out;
}

// A kPermutation list must hold each name exactly once.
void CheckPermutation(const Section& s, const std::string& key,
                      const std::vector<std::string>& names, const std::vector<int>& indices) {
  const std::string rule = "must list each of " + JoinNames(names) + " exactly once";
  for (size_t i = 0; i < names.size(); ++i) {
    const auto n = std::count(indices.begin(), indices.end(), static_cast<int>(i));
    if (n != 1) {
      s.FailAt(key, rule + "; '" + names[i] + "' appears " + std::to_string(n) + " times");
    }
  }
}

// Reads and checks the value of `f` at `key` of `s` (present) into `v`.
template <typename Config>
void ReadValue(const Section& s, const std::string& key, const ConfigField<Config>& f,
               const Config& config, FieldValue& v) {
  switch (f.kind) {
    case FieldKind::kInt:
      return s.ReadInt(key, f.int_rule, v.integer);
    case FieldKind::kIntChoice:
      return s.ReadIntChoice(key, f.int_choices, v.integer);
    case FieldKind::kReal:
      return s.ReadReal(key, f.real_rule, v.real);
    case FieldKind::kBool:
      return s.ReadBool(key, v.boolean);
    case FieldKind::kString:
      return s.ReadString(key, v.text);
    case FieldKind::kChoice:
      v.index = s.ReadChoice(key, f.names);
      v.text = f.names[static_cast<size_t>(v.index)];
      return;
    case FieldKind::kPermutation:
      s.ReadNameList(key, f.names, v.indices);
      return CheckPermutation(s, key, f.names, v.indices);
    case FieldKind::kNumberMap:
      return s.ReadNumberMap(key, f.real_rule, f.known_names(config), v.entries);
  }
}

// Every field of the table present in the document, in table order; absent
// keys keep the struct defaults.
template <typename Config>
void ReadFields(const Section& top, const std::vector<ConfigField<Config>>& fields,
                Config& config) {
  for (const ConfigField<Config>& f : fields) {
    const auto [section, key] = SectionOf(top, f.key);
    if (!section.Has(key)) continue;
    FieldValue value;
    ReadValue(section, key, f, config, value);
    f.set(config, value);
  }
}

// ------------------------------------------------------ cross-key rules

constexpr int64_t kMaxHeadWidthRatio = 4;  // heads * head_dim <= 4 * width

void CheckModelShape(const Section& top, const ModelConfig& m) {
  if (m.kv_heads > m.heads || m.heads % m.kv_heads != 0) {
    top.FailAtAny({"kv_heads", "heads"}, "kv_heads (" + std::to_string(m.kv_heads) +
                                             ") must divide heads (" + std::to_string(m.heads) +
                                             ")");
  }
  if (m.heads * m.head_dim > kMaxHeadWidthRatio * m.width) {
    top.FailAtAny({"head_dim", "heads", "width"},
                  "heads * head_dim (" + std::to_string(m.heads * m.head_dim) +
                      ") must be at most 4 * width (" + std::to_string(4 * m.width) + ")");
  }
}

ModelConfig ReadModel(const Document& doc) {
  const Section top(doc, doc.root(), "");
  ModelConfig m;
  ReadFields(top, ModelFields(), m);
  CheckModelShape(top, m);
  return m;
}

void CheckSram(const Section& s, const ScratchpadConfig& c) {
  const int64_t stripe_bytes = c.banks * c.bank_width_bytes;
  if ((c.capacity_kib * 1024) % stripe_bytes != 0) {
    s.FailAtAny({"capacity_kib", "banks", "bank_width_bytes"},
                "capacity (" + std::to_string(c.capacity_kib) +
                    " KiB) must be a whole number of banks x bank_width_bytes stripes (" +
                    std::to_string(stripe_bytes) + " bytes)");
  }
}

std::string Cycles(int64_t v) { return std::to_string(v); }

// Relations every JEDEC device satisfies (JESD79-4 timing definitions;
// common practice for the bank-group pairs).
void CheckTiming(const Section& s, const DramTiming& t) {
  if (t.tRAS < t.tRCD) {
    s.FailAtAny({"tRAS", "tRCD"},
                "tRAS (" + Cycles(t.tRAS) + ") must be at least tRCD (" + Cycles(t.tRCD) + ")");
  }
  if (t.tRC < t.tRAS + t.tRP) {
    s.FailAtAny(
        {"tRC", "tRAS", "tRP"},
        "tRC (" + Cycles(t.tRC) + ") must be at least tRAS + tRP (" + Cycles(t.tRAS + t.tRP) + ")");
  }
  // Refresh may take at most half the time (JEDEC parts spend a few percent;
  // beyond half a channel does little but refresh and runs crawl).
  if (t.tREFI < 2 * t.tRFC) {
    s.FailAtAny({"tREFI", "tRFC"}, "tREFI (" + Cycles(t.tREFI) + ") must be at least twice tRFC (" +
                                       Cycles(t.tRFC) + ")");
  }
  if (t.tCCD_L < t.tCCD_S) {
    s.FailAtAny({"tCCD_L", "tCCD_S"}, "tCCD_L (" + Cycles(t.tCCD_L) +
                                          ") must be at least tCCD_S (" + Cycles(t.tCCD_S) + ")");
  }
  if (t.tRRD_L < t.tRRD_S) {
    s.FailAtAny({"tRRD_L", "tRRD_S"}, "tRRD_L (" + Cycles(t.tRRD_L) +
                                          ") must be at least tRRD_S (" + Cycles(t.tRRD_S) + ")");
  }
}

void CheckDram(const Section& s, const DramConfig& d) {
  CheckTiming(s.Child("timing"), d.timing);
  if (d.row_bytes < DramBurstBytes(d)) {
    s.FailAtAny({"row_bytes", "bus_width_bits"},
                "row_bytes (" + std::to_string(d.row_bytes) +
                    ") must be at least one burst, bus_width_bits / 8 * burst_length (" +
                    std::to_string(DramBurstBytes(d)) + ")");
  }
}

ArchConfig ReadArch(const Document& doc) {
  const Section top(doc, doc.root(), "");
  ArchConfig a;
  ApplyDramPreset(a.dram.preset, a.dram);  // the default preset, unless the file names one
  ReadFields(top, ArchFields(), a);
  CheckSram(top.Child("sram"), a.sram);
  CheckDram(top.Child("dram"), a.dram);
  return a;
}

// `flag_prefix` names the file kind as the command line's --set does.
Document Parse(const std::string& text, const std::string& source, const Schema& schema,
               const std::string& flag_prefix, const ConfigOverrides& overrides) {
  Document doc(text, source, schema, flag_prefix);
  doc.ApplyOverrides(overrides);
  return doc;
}

// ------------------------------------------------------------- workload

// Caps on a workload (docs/config-reference.md).
constexpr int64_t kMaxPrefillTokens = 1 << 20;  // 1,048,576
constexpr int64_t kMaxDecodeTokens = 1 << 20;   // 1,048,576
constexpr int64_t kMaxContextTokens = 1 << 24;  // 16,777,216
constexpr int64_t kMaxBatch = 4096;
// Largest operation count a run may need; 64-bit counters hold 1.8e19, so
// this leaves a factor of ten for sums and products of counters.
constexpr long double kMaxRunOps = 1e18L;

void CheckFlag(const char* flag, int64_t value, int64_t lo, int64_t hi) {
  if (value < lo || value > hi) {
    throw UsageError(std::string(flag) + ": must be an integer in [" + std::to_string(lo) + ", " +
                     std::to_string(hi) + "], got " + std::to_string(value));
  }
}

// Upper estimate of the operations of a run: two per weight per token plus
// attention over the whole final context (common practice: 2 ops per MAC).
long double EstimateRunOps(const WorkloadConfig& w, const ModelConfig& m) {
  const long double layer_weights =
      4.0L * m.width * m.heads * m.head_dim + 3.0L * m.width * m.ffn_width;
  const long double weights = layer_weights * m.layers + 2.0L * m.vocab * m.width;
  const long double tokens =
      static_cast<long double>(w.batch) * (w.prefill_tokens + w.decode_tokens);
  const long double context =
      static_cast<long double>(w.context_tokens) + w.prefill_tokens + w.decode_tokens;
  const long double attention = 4.0L * m.layers * m.heads * m.head_dim * context;
  return tokens * (2.0L * weights + attention);
}

}  // namespace

ModelConfig LoadModelText(const std::string& text, const std::string& source_name,
                          const ConfigOverrides& overrides) {
  return ReadModel(Parse(text, source_name, ModelSchema(), "model.", overrides));
}

ArchConfig LoadArchText(const std::string& text, const std::string& source_name,
                        const ConfigOverrides& overrides) {
  return ReadArch(Parse(text, source_name, ArchSchema(), "arch.", overrides));
}

ModelConfig LoadModelFile(const std::string& path, const ConfigOverrides& overrides) {
  return LoadModelText(config_internal::ReadConfigFile(path), path, overrides);
}

ArchConfig LoadArchFile(const std::string& path, const ConfigOverrides& overrides) {
  return LoadArchText(config_internal::ReadConfigFile(path), path, overrides);
}

ModelConfig DefaultModel(const ConfigOverrides& overrides) {
  return LoadModelText(kDefaultModelYaml, kDefaultModelName, overrides);
}

ArchConfig DefaultArch(const ConfigOverrides& overrides) {
  return LoadArchText(kDefaultArchYaml, kDefaultArchName, overrides);
}

void ValidateWorkload(const WorkloadConfig& workload, const ModelConfig& model) {
  CheckFlag("--prefill", workload.prefill_tokens, 0, kMaxPrefillTokens);
  CheckFlag("--decode", workload.decode_tokens, 0, kMaxDecodeTokens);
  CheckFlag("--context", workload.context_tokens, 0, kMaxContextTokens);
  CheckFlag("--batch", workload.batch, 1, kMaxBatch);
  if (workload.prefill_tokens == 0 && workload.decode_tokens == 0) {
    throw UsageError(
        "--prefill/--decode: nothing to simulate; give at least one token of "
        "prefill or decode");
  }
  const long double ops = EstimateRunOps(workload, model);
  if (ops > kMaxRunOps) {
    throw UsageError("--prefill/--decode/--context/--batch: this run needs about " +
                     fmt::format("{:.3g}", ops) + " operations on " + model.name +
                     ", beyond the 1e18 that the simulator's 64-bit counters allow; "
                     "use fewer tokens or a smaller batch");
  }
}

}  // namespace tritsim
