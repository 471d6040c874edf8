// Model and architecture files -> config structs, strictly. See
// config_loader.h for the contract and docs/config-reference.md for every
// key, its unit, default and range. The caps below keep every derived
// counter (parameters, bytes, operations, cycles) far inside 64 bits.
#include "config/config_loader.h"

#include <algorithm>
#include <cstdio>
#include <iterator>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/dram_presets.h"
#include "config/embedded_defaults.h"
#include "config/energy_table.h"
#include "config/yaml_reader.h"

namespace tritsim {
namespace {

using config_internal::Document;
using config_internal::IntRule;
using config_internal::RealRule;
using config_internal::Schema;
using config_internal::Section;

// ------------------------------------------------------------ model schema

const Schema& ModelSchema() {
  static const Schema kSchema = {
      {"name", "layers", "width", "heads", "kv_heads", "head_dim", "ffn.width", "ffn.kind",
       "ffn.activation", "vocab", "tied_embeddings", "precision.attention", "precision.ffn",
       "precision.embedding", "precision.head", "precision.norm_bits", "precision.activation_bits",
       "precision.kv_bits", "weight_zero_fraction"},
      {}};
  return kSchema;
}

// Size caps of a model (documented in docs/config-reference.md). The largest
// published decoders are far inside them; together they bound parameters to
// about 1e15, so bit and byte counts fit in 64 bits.
constexpr IntRule kLayers{1, 1024};
constexpr IntRule kWidth{1, 65536};
constexpr IntRule kHeads{1, 1024};
constexpr IntRule kHeadDim{1, 4096};
constexpr IntRule kFfnWidth{1, 1000000};
constexpr IntRule kVocab{1, 4000000};
constexpr int64_t kMaxHeadWidthRatio = 4;  // heads * head_dim <= 4 * width
const std::vector<int64_t> kBitChoices = {8, 16};

template <typename Enum>
void ReadEnum(const Section& s, const std::string& key, const std::vector<std::string>& names,
              const std::vector<Enum>& values, Enum& field) {
  const int index = s.ReadChoice(key, names);
  if (index >= 0) field = values[static_cast<size_t>(index)];
}

void ReadFfn(const Section& ffn, ModelConfig& m) {
  ffn.ReadInt("width", kFfnWidth, m.ffn_width);
  ReadEnum(ffn, "kind", {"plain", "gated"}, {FfnKind::kPlain, FfnKind::kGated}, m.ffn_kind);
  ReadEnum(ffn, "activation", {"relu", "gelu", "silu", "relu2"},
           {Activation::kRelu, Activation::kGelu, Activation::kSilu, Activation::kRelu2},
           m.activation);
}

void ReadPrecision(const Section& p, ModelConfig& m) {
  const std::vector<std::string> any = {"ternary", "int8", "int16"};
  const std::vector<WeightFormat> any_values = {WeightFormat::kTernary, WeightFormat::kInt8,
                                                WeightFormat::kInt16};
  // Embedding lookups and the output head are not ternary (Ma et al. 2024
  // keep them in higher precision), so only 8 or 16 bits are allowed.
  const std::vector<std::string> dense = {"int8", "int16"};
  const std::vector<WeightFormat> dense_values = {WeightFormat::kInt8, WeightFormat::kInt16};
  ReadEnum(p, "attention", any, any_values, m.attention_weights);
  ReadEnum(p, "ffn", any, any_values, m.ffn_weights);
  ReadEnum(p, "embedding", dense, dense_values, m.embedding_weights);
  ReadEnum(p, "head", dense, dense_values, m.head_weights);
  p.ReadIntChoice("norm_bits", kBitChoices, m.norm_bits);
  p.ReadIntChoice("activation_bits", kBitChoices, m.activation_bits);
  p.ReadIntChoice("kv_bits", kBitChoices, m.kv_bits);
}

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
  top.ReadString("name", m.name);
  top.ReadInt("layers", kLayers, m.layers);
  top.ReadInt("width", kWidth, m.width);
  top.ReadInt("heads", kHeads, m.heads);
  top.ReadInt("kv_heads", kHeads, m.kv_heads);
  top.ReadInt("head_dim", kHeadDim, m.head_dim);
  ReadFfn(top.Child("ffn"), m);
  top.ReadInt("vocab", kVocab, m.vocab);
  top.ReadBool("tied_embeddings", m.tied_embeddings);
  ReadPrecision(top.Child("precision"), m);
  top.ReadReal("weight_zero_fraction", RealRule{0.0, 1.0, false, true}, m.weight_zero_fraction);
  CheckModelShape(top, m);
  return m;
}

// ------------------------------------------------------------- arch schema

const std::vector<std::string>& TimingKeys() {
  static const std::vector<std::string> kKeys = {
      "tCK_ns", "CL",     "CWL",    "tRCD",   "tRP",         "tRAS", "tRC",
      "tCCD_S", "tCCD_L", "tRRD_S", "tRRD_L", "tFAW",        "tWR",  "tWTR_S",
      "tWTR_L", "tRTP",   "tRFC",   "tREFI",  "burst_length"};
  return kKeys;
}

const Schema& ArchSchema() {
  static const Schema kSchema = [] {
    Schema s;
    s.leaves = {"name",
                "clock.core_mhz",
                "array.kind",
                "array.trees",
                "array.fan_in",
                "array.accumulator_bits",
                "array.register_cut",
                "array.zero_gating",
                "packing.format",
                "packing.decoder_bytes_per_cycle",
                "vector.lanes",
                "vector.special_per_cycle",
                "vector.pipeline_cycles",
                "sram.capacity_kib",
                "sram.banks",
                "sram.bank_width_bytes",
                "sram.ports",
                "dma.max_outstanding",
                "dma.setup_cycles",
                "dram.preset",
                "dram.channels",
                "dram.bus_width_bits",
                "dram.bank_groups",
                "dram.banks_per_group",
                "dram.row_bytes",
                "dram.queue_depth",
                "dram.page_policy",
                "dram.address_map",
                "dram.ideal_latency_ns",
                "dram.ideal_bandwidth_gbps",
                "energy.node",
                "energy.dram_pj_per_bit"};
    for (const std::string& t : TimingKeys()) s.leaves.push_back("dram.timing." + t);
    s.open_maps = {"energy.overrides"};
    return s;
  }();
  return kSchema;
}

// Ranges from the field comments in config/arch_config.h.
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

void ReadArray(const Section& s, TreeArrayConfig& a) {
  ReadEnum(s, "kind", {"ternary", "int8_mac", "fp16_mac"},
           {ArrayKind::kTernary, ArrayKind::kInt8Mac, ArrayKind::kFp16Mac}, a.kind);
  s.ReadInt("trees", kCount64k, a.trees);
  s.ReadInt("fan_in", kFanIn, a.fan_in);
  s.ReadInt("accumulator_bits", kAccumulatorBits, a.accumulator_bits);
  s.ReadInt("register_cut", kRegisterCut, a.register_cut);
  s.ReadBool("zero_gating", a.zero_gating);
}

void ReadPacking(const Section& s, PackingConfig& p) {
  ReadEnum(s, "format", {"base3", "two_bit"}, {TritPacking::kBase3, TritPacking::kTwoBit},
           p.format);
  s.ReadInt("decoder_bytes_per_cycle", kCount64k, p.decoder_bytes_per_cycle);
}

void ReadVector(const Section& s, VectorUnitConfig& v) {
  s.ReadInt("lanes", kCount64k, v.lanes);
  s.ReadInt("special_per_cycle", kCount64k, v.special_per_cycle);
  s.ReadInt("pipeline_cycles", kPipelineCycles, v.pipeline_cycles);
}

void ReadSram(const Section& s, ScratchpadConfig& c) {
  s.ReadInt("capacity_kib", kCapacityKib, c.capacity_kib);
  s.ReadInt("banks", kSramBanks, c.banks);
  s.ReadInt("bank_width_bytes", kBankWidthBytes, c.bank_width_bytes);
  s.ReadInt("ports", kPorts, c.ports);
  const int64_t stripe_bytes = c.banks * c.bank_width_bytes;
  if ((c.capacity_kib * 1024) % stripe_bytes != 0) {
    s.FailAtAny({"capacity_kib", "banks", "bank_width_bytes"},
                "capacity (" + std::to_string(c.capacity_kib) +
                    " KiB) must be a whole number of banks x bank_width_bytes stripes (" +
                    std::to_string(stripe_bytes) + " bytes)");
  }
}

void ReadDma(const Section& s, DmaConfig& d) {
  s.ReadInt("max_outstanding", kOutstanding, d.max_outstanding);
  s.ReadInt("setup_cycles", kSetupCycles, d.setup_cycles);
}

void ReadTiming(const Section& s, DramTiming& t) {
  s.ReadReal("tCK_ns", kTckNs, t.tCK_ns);
  int64_t* const fields[] = {&t.CL,     &t.CWL,    &t.tRCD,   &t.tRP,    &t.tRAS, &t.tRC,
                             &t.tCCD_S, &t.tCCD_L, &t.tRRD_S, &t.tRRD_L, &t.tFAW, &t.tWR,
                             &t.tWTR_S, &t.tWTR_L, &t.tRTP,   &t.tRFC,   &t.tREFI};
  for (size_t i = 0; i < std::size(fields); ++i) {
    s.ReadInt(TimingKeys()[i + 1], kDramCycles, *fields[i]);  // TimingKeys()[0] is tCK_ns
  }
  s.ReadIntChoice("burst_length", kBurstLengths, t.burst_length);
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

void ReadAddressMap(const Section& s, std::vector<AddressField>& map) {
  const std::vector<std::string> names = {"row", "bank", "bank_group", "column", "channel"};
  std::vector<int> indices;
  if (!s.ReadNameList("address_map", names, indices)) return;
  const std::string rule = "must list each of row, bank, bank_group, column, channel exactly once";
  for (size_t i = 0; i < names.size(); ++i) {
    const auto n = std::count(indices.begin(), indices.end(), static_cast<int>(i));
    if (n != 1) {
      s.FailAt("address_map",
               rule + "; '" + names[i] + "' appears " + std::to_string(n) + " times");
    }
  }
  map.clear();
  for (int i : indices) map.push_back(static_cast<AddressField>(i));
}

void ReadDramOrganisation(const Section& s, DramConfig& d) {
  s.ReadInt("channels", kChannels, d.channels);
  s.ReadIntChoice("bus_width_bits", kBusWidths, d.bus_width_bits);
  s.ReadInt("bank_groups", kBankGroups, d.bank_groups);
  s.ReadInt("banks_per_group", kBanksPerGroup, d.banks_per_group);
  s.ReadInt("row_bytes", kRowBytes, d.row_bytes);
  s.ReadInt("queue_depth", kQueueDepth, d.queue_depth);
  ReadEnum(s, "page_policy", {"open", "closed"}, {PagePolicy::kOpen, PagePolicy::kClosed},
           d.page_policy);
  ReadAddressMap(s, d.address_map);
  s.ReadReal("ideal_latency_ns", kIdealLatencyNs, d.ideal_latency_ns);
  s.ReadReal("ideal_bandwidth_gbps", kIdealBandwidthGbps, d.ideal_bandwidth_gbps);
}

// The preset first, then every explicit key over it.
void ReadDram(const Section& s, DramConfig& d) {
  const int preset = s.ReadChoice("preset", DramPresetNames());
  ApplyDramPreset(preset >= 0 ? DramPresetNames()[static_cast<size_t>(preset)] : d.preset, d);
  ReadDramOrganisation(s, d);
  const Section timing = s.Child("timing");
  ReadTiming(timing, d.timing);
  CheckTiming(timing, d.timing);
  if (d.row_bytes < DramBurstBytes(d)) {
    s.FailAtAny({"row_bytes", "bus_width_bits"},
                "row_bytes (" + std::to_string(d.row_bytes) +
                    ") must be at least one burst, bus_width_bits / 8 * burst_length (" +
                    std::to_string(DramBurstBytes(d)) + ")");
  }
}

void ReadEnergy(const Section& s, EnergyConfig& e) {
  const int node = s.ReadChoice("node", {"7nm", "45nm"});
  if (node >= 0) e.node = node == 0 ? "7nm" : "45nm";
  // Override names are the entries of the node's built-in table (owned by
  // the energy model) plus "dram_pj_per_bit".
  std::vector<std::string> known;
  for (const auto& entry : BuiltinEnergyTable(e.node).entries) known.push_back(entry.first);
  known.push_back(kDramPjPerBitEntry);
  std::vector<std::pair<std::string, double>> entries;
  s.ReadNumberMap("overrides", kEnergyPj, known, entries);
  for (const auto& [name, value] : entries) e.overrides_pj[name] = value;
  s.ReadReal("dram_pj_per_bit", kDramPjPerBit, e.dram_pj_per_bit);
}

ArchConfig ReadArch(const Document& doc) {
  const Section top(doc, doc.root(), "");
  ArchConfig a;
  top.ReadString("name", a.name);
  top.Child("clock").ReadReal("core_mhz", kCoreMhz, a.clock.core_mhz);
  ReadArray(top.Child("array"), a.array);
  ReadPacking(top.Child("packing"), a.packing);
  ReadVector(top.Child("vector"), a.vector);
  ReadSram(top.Child("sram"), a.sram);
  ReadDma(top.Child("dma"), a.dma);
  ReadDram(top.Child("dram"), a.dram);
  ReadEnergy(top.Child("energy"), a.energy);
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
    char text[64];
    std::snprintf(text, sizeof text, "%.3Lg", ops);
    throw UsageError(std::string("--prefill/--decode/--context/--batch: this run needs about ") +
                     text + " operations on " + model.name +
                     ", beyond the 1e18 that the simulator's 64-bit counters allow; "
                     "use fewer tokens or a smaller batch");
  }
}

}  // namespace tritsim
