// The field tables of architecture and model files. See config_fields.h.
// Ranges follow the field comments of arch_config.h and model_config.h; the
// caps keep every derived counter (parameters, bytes, operations, cycles)
// far inside 64 bits.
#include "config/config_fields.h"

#include <fmt/core.h>
#include <cstdio>
#include <type_traits>

#include "config/config_loader.h"
#include "config/dram_presets.h"
#include "config/energy_table.h"

namespace tritsim {
namespace {

// ------------------------------------------------------------ builders
// Each but Field takes `access`, a lambda giving a reference to the struct
// member, and derives the field's setter and its default text from it.

template <typename Config>
ConfigField<Config> Field(std::string key, FieldKind kind, std::string unit) {
  ConfigField<Config> f;
  f.key = std::move(key);
  f.kind = kind;
  f.unit = std::move(unit);
  return f;
}

template <typename Config, typename Access>
ConfigField<Config> Int(std::string key, std::string unit, IntRule rule, Access access) {
  auto f = Field<Config>(std::move(key), FieldKind::kInt, std::move(unit));
  f.int_rule = rule;
  f.set = [access](Config& c, const FieldValue& v) {
    access(c) = static_cast<std::remove_reference_t<decltype(access(c))>>(v.integer);
  };
  f.show = [access](const Config& c) {
    Config copy = c;
    return std::to_string(access(copy));
  };
  return f;
}

template <typename Config, typename Access>
ConfigField<Config> IntChoice(std::string key, std::string unit, std::vector<int64_t> choices,
                              Access access) {
  auto f = Int<Config>(std::move(key), std::move(unit), IntRule{0, 0}, access);
  f.kind = FieldKind::kIntChoice;
  f.int_choices = std::move(choices);
  return f;
}

template <typename Config, typename Access>
ConfigField<Config> Real(std::string key, std::string unit, RealRule rule, Access access) {
  auto f = Field<Config>(std::move(key), FieldKind::kReal, std::move(unit));
  f.real_rule = rule;
  f.set = [access](Config& c, const FieldValue& v) { access(c) = v.real; };
  f.show = [access](const Config& c) {
    Config copy = c;
    return FormatReal(access(copy));
  };
  return f;
}

template <typename Config, typename Access>
ConfigField<Config> Bool(std::string key, Access access) {
  auto f = Field<Config>(std::move(key), FieldKind::kBool, "");
  f.set = [access](Config& c, const FieldValue& v) { access(c) = v.boolean; };
  f.show = [access](const Config& c) {
    Config copy = c;
    return std::string(access(copy) ? "true" : "false");
  };
  return f;
}

template <typename Config, typename Access>
ConfigField<Config> Text(std::string key, FieldKind kind, std::string unit,
                         std::vector<std::string> names, Access access) {
  auto f = Field<Config>(std::move(key), kind, std::move(unit));
  f.names = std::move(names);
  f.set = [access](Config& c, const FieldValue& v) { access(c) = v.text; };
  f.show = [access](const Config& c) {
    Config copy = c;
    return access(copy);
  };
  return f;
}

// One of `names`, stored as the matching entry of `values`.
template <typename Config, typename Enum, typename Access>
ConfigField<Config> Choice(std::string key, std::vector<std::string> names,
                           std::vector<Enum> values, Access access) {
  auto f = Field<Config>(std::move(key), FieldKind::kChoice, "");
  f.names = names;
  f.set = [access, values](Config& c, const FieldValue& v) {
    access(c) = values[static_cast<size_t>(v.index)];
  };
  f.show = [access, names, values](const Config& c) {
    Config copy = c;
    for (size_t i = 0; i < values.size(); ++i) {
      if (values[i] == access(copy)) return names[i];
    }
    return std::string("?");
  };
  return f;
}

std::string JoinWith(const std::vector<std::string>& items, const std::string& last_separator) {
  std::string out;
  for (size_t i = 0; i < items.size(); ++i) {
    if (i > 0) out += i + 1 == items.size() ? last_separator : ", ";
    out += items[i];
  }
  return out;
}

std::vector<std::string> Quoted(const std::vector<std::string>& names) {
  std::vector<std::string> out;
  for (const std::string& n : names) out.push_back("`" + n + "`");
  return out;
}

std::string IntervalText(const RealRule& r) {
  return std::string(r.lo_open ? "(" : "[") + FormatReal(r.lo) + ", " + FormatReal(r.hi) +
         (r.hi_open ? ")" : "]");
}

// ------------------------------------------------------------ model table

using M = ModelConfig;

// Size caps of a model (docs/config-reference.md). The largest published
// decoders are far inside them; together they bound parameters to about
// 1e15, so bit and byte counts fit in 64 bits.
constexpr IntRule kLayers{1, 1024};
constexpr IntRule kWidth{1, 65536};
constexpr IntRule kHeads{1, 1024};
constexpr IntRule kHeadDim{1, 4096};
constexpr IntRule kFfnWidth{1, 1000000};
constexpr IntRule kVocab{1, 4000000};
constexpr RealRule kZeroFraction{0.0, 1.0, false, true};
const std::vector<int64_t> kBitChoices = {8, 16};
const std::vector<std::string> kFormatNames = {"ternary", "int8", "int16", "fp16"};
const std::vector<WeightFormat> kFormats = {WeightFormat::kTernary, WeightFormat::kInt8,
                                            WeightFormat::kInt16, WeightFormat::kFp16};
// Embedding lookups and the output head are not ternary (Ma et al. 2024
// keep them in higher precision), so only 8 or 16 bits are allowed.
const std::vector<std::string> kDenseNames = {"int8", "int16", "fp16"};
const std::vector<WeightFormat> kDense = {WeightFormat::kInt8, WeightFormat::kInt16,
                                          WeightFormat::kFp16};

std::vector<ModelField> ShapeFields() {
  return {
      Text<M>(
          "name", FieldKind::kString, "text", {}, [](M & m) -> auto& { return m.name; }),
      Int<M>(
          "layers", "count", kLayers, [](M & m) -> auto& { return m.layers; }),
      Int<M>(
          "width", "elements", kWidth, [](M & m) -> auto& { return m.width; }),
      Int<M>(
          "heads", "count", kHeads, [](M & m) -> auto& { return m.heads; }),
      Int<M>(
          "kv_heads", "count", kHeads, [](M & m) -> auto& { return m.kv_heads; }),
      Int<M>(
          "head_dim", "elements", kHeadDim, [](M & m) -> auto& { return m.head_dim; }),
      Int<M>(
          "ffn.width", "elements", kFfnWidth, [](M & m) -> auto& { return m.ffn_width; }),
      Choice<M, FfnKind>(
          "ffn.kind", {"plain", "gated"}, {FfnKind::kPlain, FfnKind::kGated},
          [](M & m) -> auto& { return m.ffn_kind; }),
      Choice<M, Activation>(
          "ffn.activation", {"relu", "gelu", "silu", "relu2"},
          {Activation::kRelu, Activation::kGelu, Activation::kSilu, Activation::kRelu2},
          [](M & m) -> auto& { return m.activation; }),
      Int<M>(
          "vocab", "tokens", kVocab, [](M & m) -> auto& { return m.vocab; }),
      Bool<M>(
          "tied_embeddings", [](M & m) -> auto& { return m.tied_embeddings; }),
  };
}

std::vector<ModelField> PrecisionFields() {
  return {
      Choice<M, WeightFormat>(
          "precision.attention", kFormatNames, kFormats,
          [](M & m) -> auto& { return m.attention_weights; }),
      Choice<M, WeightFormat>(
          "precision.ffn", kFormatNames, kFormats, [](M & m) -> auto& { return m.ffn_weights; }),
      Choice<M, WeightFormat>(
          "precision.embedding", kDenseNames, kDense,
          [](M & m) -> auto& { return m.embedding_weights; }),
      Choice<M, WeightFormat>(
          "precision.head", kDenseNames, kDense, [](M & m) -> auto& { return m.head_weights; }),
      IntChoice<M>(
          "precision.norm_bits", "bits", kBitChoices, [](M & m) -> auto& { return m.norm_bits; }),
      IntChoice<M>(
          "precision.activation_bits", "bits", kBitChoices,
          [](M & m) -> auto& { return m.activation_bits; }),
      IntChoice<M>(
          "precision.kv_bits", "bits", kBitChoices, [](M & m) -> auto& { return m.kv_bits; }),
      Real<M>(
          "weight_zero_fraction", "fraction", kZeroFraction,
          [](M & m) -> auto& { return m.weight_zero_fraction; }),
  };
}

// ------------------------------------------------------------- arch table

using A = ArchConfig;

// At least 1 MHz: the period is kept in whole ps and run times in 64-bit ps.
constexpr RealRule kCoreMhz{1.0, 10000.0, false, false};
constexpr IntRule kCount64k{1, 65536};
constexpr IntRule kFanIn{2, 4096, true};
constexpr IntRule kAccumulatorBits{8, 64};
constexpr IntRule kRegisterCut{0, 16};
constexpr IntRule kPipelineCycles{0, 1024};
constexpr IntRule kCapacityKib{16, 1048576};
constexpr IntRule kSramBanks{1, 1024, true};
constexpr IntRule kBankWidthBytes{4, 1024, true};
constexpr IntRule kPorts{1, 4};
constexpr IntRule kOutstanding{1, 4096};
constexpr IntRule kSetupCycles{0, 100000};
constexpr IntRule kChannels{1, 64};
constexpr IntRule kBankGroups{1, 16};
constexpr IntRule kBanksPerGroup{1, 64};
constexpr IntRule kRowBytes{16, 65536, true};
constexpr IntRule kQueueDepth{1, 1024};
// Up to 1 PiB: far beyond any design point, and bytes stay exact in a double.
constexpr RealRule kDramCapacityGib{0.0, 1048576.0, true, false};
// A DRAM timing in nCK. 1e6 cycles is a millisecond even at 1 GHz, beyond
// any JEDEC parameter, including tREFI.
constexpr IntRule kDramCycles{1, 1000000, false, "a positive integer number of DRAM cycles",
                              "DRAM cycles"};
// At least 50 ps, so rounding tCK to whole ps errs by at most 1%.
constexpr RealRule kTckNs{0.05, 100.0, false, false};
constexpr RealRule kIdealLatencyNs{0.0, 1e6, true, false};
// At least 10 MB/s, so the longest allowed run cannot overflow 64-bit ps.
constexpr RealRule kIdealBandwidthGbps{0.01, 1e6, false, false};
constexpr RealRule kEnergyPj{0.0, 1e9, false, false};
constexpr RealRule kDramPjPerBit{0.0, 1000.0, false, false};
const std::vector<int64_t> kBusWidths = {16, 32, 64, 128};
const std::vector<int64_t> kBurstLengths = {2, 4, 8, 16, 32};

std::vector<ArchField> ComputeFields() {
  return {
      Text<A>(
          "name", FieldKind::kString, "text", {}, [](A & a) -> auto& { return a.name; }),
      Real<A>(
          "clock.core_mhz", "MHz", kCoreMhz, [](A & a) -> auto& { return a.clock.core_mhz; }),
      Choice<A, ArrayKind>(
          "array.kind", {"ternary", "int8_mac", "fp16_mac"},
          {ArrayKind::kTernary, ArrayKind::kInt8Mac, ArrayKind::kFp16Mac},
          [](A & a) -> auto& { return a.array.kind; }),
      Int<A>(
          "array.trees", "count", kCount64k, [](A & a) -> auto& { return a.array.trees; }),
      Int<A>(
          "array.fan_in", "inputs", kFanIn, [](A & a) -> auto& { return a.array.fan_in; }),
      Int<A>(
          "array.accumulator_bits", "bits", kAccumulatorBits,
          [](A & a) -> auto& { return a.array.accumulator_bits; }),
      Int<A>(
          "array.register_cut", "stages", kRegisterCut,
          [](A & a) -> auto& { return a.array.register_cut; }),
      Bool<A>(
          "array.zero_gating", [](A & a) -> auto& { return a.array.zero_gating; }),
      Choice<A, TritPacking>(
          "packing.format", {"base3", "two_bit"}, {TritPacking::kBase3, TritPacking::kTwoBit},
          [](A & a) -> auto& { return a.packing.format; }),
      Int<A>(
          "packing.decoder_bytes_per_cycle", "bytes/cycle", kCount64k,
          [](A & a) -> auto& { return a.packing.decoder_bytes_per_cycle; }),
      Int<A>(
          "vector.lanes", "lanes", kCount64k, [](A & a) -> auto& { return a.vector.lanes; }),
      Int<A>(
          "vector.special_per_cycle", "results/cycle", kCount64k,
          [](A & a) -> auto& { return a.vector.special_per_cycle; }),
      Int<A>(
          "vector.pipeline_cycles", "core cycles", kPipelineCycles,
          [](A & a) -> auto& { return a.vector.pipeline_cycles; }),
  };
}

std::vector<ArchField> MemoryFields() {
  return {
      Int<A>(
          "sram.capacity_kib", "KiB", kCapacityKib,
          [](A & a) -> auto& { return a.sram.capacity_kib; }),
      Int<A>(
          "sram.banks", "count", kSramBanks, [](A & a) -> auto& { return a.sram.banks; }),
      Int<A>(
          "sram.bank_width_bytes", "bytes", kBankWidthBytes,
          [](A & a) -> auto& { return a.sram.bank_width_bytes; }),
      Int<A>(
          "sram.ports", "count", kPorts, [](A & a) -> auto& { return a.sram.ports; }),
      Int<A>(
          "dma.max_outstanding", "requests", kOutstanding,
          [](A & a) -> auto& { return a.dma.max_outstanding; }),
      Int<A>(
          "dma.setup_cycles", "core cycles", kSetupCycles,
          [](A & a) -> auto& { return a.dma.setup_cycles; }),
  };
}

// dram.preset: applying it fills every field the preset owns, so it is read
// before them (they then override it).
ArchField PresetField() {
  auto f = Text<A>(
      "dram.preset", FieldKind::kChoice, "", DramPresetNames(),
      [](A & a) -> auto& { return a.dram.preset; });
  f.set = [](A& a, const FieldValue& v) { ApplyDramPreset(v.text, a.dram); };
  return f;
}

ArchField AddressMapField() {
  const std::vector<std::string> names = {"row", "bank", "bank_group", "column", "channel"};
  auto f = Field<A>("dram.address_map", FieldKind::kPermutation, "list");
  f.names = names;
  f.set = [](A& a, const FieldValue& v) {
    a.dram.address_map.clear();
    for (int i : v.indices) a.dram.address_map.push_back(static_cast<AddressField>(i));
  };
  f.show = [names](const A& a) {
    std::vector<std::string> fields;
    for (AddressField field : a.dram.address_map) fields.push_back(names[size_t(field)]);
    return "[" + JoinWith(fields, ", ") + "]";
  };
  return f;
}

ArchField FromPreset(ArchField f) {
  f.from_preset = true;
  return f;
}

std::vector<ArchField> DramFields() {
  return {
      PresetField(),
      Int<A>(
          "dram.channels", "count", kChannels, [](A & a) -> auto& { return a.dram.channels; }),
      FromPreset(Real<A>(
          "dram.capacity_gib", "GiB (2^30 bytes)", kDramCapacityGib,
          [](A & a) -> auto& { return a.dram.capacity_gib; })),
      FromPreset(IntChoice<A>(
          "dram.bus_width_bits", "bits", kBusWidths,
          [](A & a) -> auto& { return a.dram.bus_width_bits; })),
      FromPreset(Int<A>(
          "dram.bank_groups", "count", kBankGroups,
          [](A & a) -> auto& { return a.dram.bank_groups; })),
      FromPreset(Int<A>(
          "dram.banks_per_group", "count", kBanksPerGroup,
          [](A & a) -> auto& { return a.dram.banks_per_group; })),
      FromPreset(Int<A>(
          "dram.row_bytes", "bytes", kRowBytes, [](A & a) -> auto& { return a.dram.row_bytes; })),
      Int<A>(
          "dram.queue_depth", "entries", kQueueDepth,
          [](A & a) -> auto& { return a.dram.queue_depth; }),
      Choice<A, PagePolicy>(
          "dram.page_policy", {"open", "closed"}, {PagePolicy::kOpen, PagePolicy::kClosed},
          [](A & a) -> auto& { return a.dram.page_policy; }),
      AddressMapField(),
      FromPreset(Real<A>(
          "dram.ideal_latency_ns", "ns", kIdealLatencyNs,
          [](A & a) -> auto& { return a.dram.ideal_latency_ns; })),
      FromPreset(Real<A>(
          "dram.ideal_bandwidth_gbps", "GB/s (1e9 B/s)", kIdealBandwidthGbps,
          [](A & a) -> auto& { return a.dram.ideal_bandwidth_gbps; })),
  };
}

// The integer timings, in file order after tCK_ns (docs/config-reference.md).
struct TimingKey {
  const char* name;            // key under dram.timing
  int64_t DramTiming::*field;  // the member it fills, nCK
};
constexpr TimingKey kTimingKeys[] = {
    {"CL", &DramTiming::CL},         {"CWL", &DramTiming::CWL},
    {"tRCD", &DramTiming::tRCD},     {"tRP", &DramTiming::tRP},
    {"tRAS", &DramTiming::tRAS},     {"tRC", &DramTiming::tRC},
    {"tCCD_S", &DramTiming::tCCD_S}, {"tCCD_L", &DramTiming::tCCD_L},
    {"tRRD_S", &DramTiming::tRRD_S}, {"tRRD_L", &DramTiming::tRRD_L},
    {"tFAW", &DramTiming::tFAW},     {"tWR", &DramTiming::tWR},
    {"tWTR_S", &DramTiming::tWTR_S}, {"tWTR_L", &DramTiming::tWTR_L},
    {"tRTP", &DramTiming::tRTP},     {"tRFC", &DramTiming::tRFC},
    {"tREFI", &DramTiming::tREFI},
};

std::vector<ArchField> TimingFields() {
  std::vector<ArchField> fields = {FromPreset(Real<A>(
      "dram.timing.tCK_ns", "ns", kTckNs, [](A & a) -> auto& { return a.dram.timing.tCK_ns; }))};
  for (const TimingKey& t : kTimingKeys) {
    const auto member = t.field;
    fields.push_back(FromPreset(Int<A>(
        std::string("dram.timing.") + t.name, "nCK",
        kDramCycles, [member](A & a) -> auto& { return a.dram.timing.*member; })));
  }
  fields.push_back(FromPreset(IntChoice<A>(
      "dram.timing.burst_length", "transfers", kBurstLengths,
      [](A & a) -> auto& { return a.dram.timing.burst_length; })));
  return fields;
}

// energy.overrides: names are the entries of the node's built-in table
// (owned by the energy model) plus the two resolved from the DRAM preset.
ArchField EnergyOverridesField() {
  auto f = Field<A>("energy.overrides", FieldKind::kNumberMap, "pJ per event");
  f.real_rule = kEnergyPj;
  f.known_names = [](const A& a) {
    std::vector<std::string> known;
    for (const auto& entry : BuiltinEnergyTable(a.energy.node).entries) {
      known.push_back(entry.first);
    }
    known.push_back(kDramPjPerBitEntry);
    known.push_back(kDramRefreshEntry);
    return known;
  };
  f.set = [](A& a, const FieldValue& v) {
    for (const auto& [name, value] : v.entries) a.energy.overrides_pj[name] = value;
  };
  f.show = [](const A&) { return std::string("none"); };
  return f;
}

std::vector<ArchField> EnergyFields() {
  auto per_bit = Real<A>(
      "energy.dram_pj_per_bit", "pJ/bit", kDramPjPerBit,
      [](A & a) -> auto& { return a.energy.dram_pj_per_bit; });
  per_bit.show = [](const A& a) {
    return a.energy.dram_pj_per_bit < 0 ? "preset's" : FormatReal(a.energy.dram_pj_per_bit);
  };
  return {Text<A>(
              "energy.node", FieldKind::kChoice, "", {"7nm", "45nm"},
              [](A & a) -> auto& { return a.energy.node; }),
          EnergyOverridesField(), per_bit};
}

template <typename Field>
void Append(std::vector<Field>& to, const std::vector<Field>& from) {
  to.insert(to.end(), from.begin(), from.end());
}

}  // namespace

const std::vector<ModelField>& ModelFields() {
  static const std::vector<ModelField> kFields = [] {
    std::vector<ModelField> fields = ShapeFields();
    Append(fields, PrecisionFields());
    return fields;
  }();
  return kFields;
}

const std::vector<ArchField>& ArchFields() {
  static const std::vector<ArchField> kFields = [] {
    std::vector<ArchField> fields = ComputeFields();
    for (const auto& part : {MemoryFields(), DramFields(), TimingFields(), EnergyFields()}) {
      Append(fields, part);
    }
    return fields;
  }();
  return kFields;
}

std::string FormatReal(double v) { return fmt::format("{:.10g}", v); }

std::string AllowedText(FieldKind kind, const IntRule& int_rule, const RealRule& real_rule,
                        const std::vector<int64_t>& int_choices,
                        const std::vector<std::string>& names) {
  const std::string range =
      "[" + std::to_string(int_rule.lo) + ", " + std::to_string(int_rule.hi) + "]";
  std::vector<std::string> choices;
  for (int64_t c : int_choices) choices.push_back(std::to_string(c));
  switch (kind) {
    case FieldKind::kInt:
      return (int_rule.power_of_two ? "power of two in " : "integer in ") + range;
    case FieldKind::kIntChoice:
      return JoinWith(choices, " or ");
    case FieldKind::kReal:
      return "real in " + IntervalText(real_rule);
    case FieldKind::kBool:
      return "`true`, `false`";
    case FieldKind::kString:
      return "1 to " + std::to_string(kMaxConfigStringChars) + " characters";
    case FieldKind::kChoice:
      return JoinWith(Quoted(names), ", ");
    case FieldKind::kPermutation:
      return "each of " + JoinWith(Quoted(names), ", ") + " exactly once";
    case FieldKind::kNumberMap:
      return "entry names below; real in " + IntervalText(real_rule);
  }
  return "";
}

}  // namespace tritsim
