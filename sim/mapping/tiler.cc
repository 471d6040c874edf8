#include "mapping/tiler.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "common/error.h"
#include "config/dram_presets.h"
#include "model/model_stats.h"

namespace tritsim {
namespace {

// DRAM layout: weights from address 0; KV cache and activation spills far
// above any weight set the schema allows (a fixed layout, not a real
// allocator; only row locality matters to the timing).
constexpr uint64_t kKvBase = 1ull << 40;
constexpr uint64_t kKvLayerStride = 1ull << 34;
constexpr uint64_t kSpillBase = 1ull << 41;
constexpr uint64_t kSpillStride = 1ull << 36;  // input and output spill areas

uint64_t CeilDiv(uint64_t a, uint64_t b) { return (a + b - 1) / b; }
uint64_t RoundDown(uint64_t a, uint64_t b) { return a / b * b; }
uint64_t RoundUp(uint64_t a, uint64_t b) { return CeilDiv(a, b) * b; }

uint64_t Log2Ceil(uint64_t x) {
  uint64_t levels = 0;
  while ((uint64_t(1) << levels) < x) ++levels;
  return levels;
}

uint64_t BitsToBytes(uint64_t elements, double bits) {
  return uint64_t(std::ceil(double(elements) * bits / 8.0 - 1e-9));
}

std::string OpLabel(const TraceOp& op) {
  std::ostringstream s;
  if (op.layer >= 0) {
    s << "layer " << op.layer << " (" << op.name << ")";
  } else {
    s << "op " << op.name;
  }
  return s.str();
}

std::string KibText(uint64_t bytes) {
  std::ostringstream s;
  s.precision(4);
  s << double(bytes) / 1024.0 << " KiB";
  return s.str();
}

// Keys attended summed over the rows of one sequence: causal prefill rows
// see the cached keys plus the new ones up to themselves.
uint64_t RowKeys(const TraceOp& op, uint64_t rows) {
  const uint64_t context = uint64_t(op.context);
  if (!op.causal) return rows * context;
  const uint64_t before = context - std::min(context, rows);
  return rows * before + rows * (rows + 1) / 2;
}

uint64_t AllRowKeys(const TraceOp& op, const TraceStep& step) {
  const uint64_t batch = uint64_t(std::max<int64_t>(1, step.batch));
  const uint64_t rows = uint64_t(op.m) / batch;
  return batch * RowKeys(op, rows);
}

// Splits `total` over `parts` chunks of sizes `chunk_i` summing to `whole`,
// so that the pieces add up exactly: piece i = floor(total*cum_i/whole) - prev.
uint64_t ShareOf(uint64_t total, uint64_t cum_before, uint64_t cum_after, uint64_t whole) {
  const long double t = static_cast<long double>(total);
  const uint64_t hi = uint64_t(t * cum_after / whole);
  const uint64_t lo = uint64_t(t * cum_before / whole);
  return hi - lo;
}

}  // namespace

HardwareRates ComputeRates(const ArchConfig& arch) {
  HardwareRates r;
  r.core_period_ps = std::max<uint64_t>(1, uint64_t(std::llround(1e6 / arch.clock.core_mhz)));
  const uint64_t capacity = uint64_t(arch.sram.capacity_kib) * 1024;
  r.activation_bytes = capacity / 2;
  r.slot_bytes = capacity / 4;
  r.pipeline_depth = Log2Ceil(uint64_t(arch.array.fan_in)) + uint64_t(arch.array.register_cut);
  r.array_ops_per_cycle = 2.0 * double(arch.array.trees) * double(arch.array.fan_in);
  r.vector_ops_per_cycle = 2.0 * double(arch.vector.lanes);
  r.dram_bytes_per_cycle = DramPeakBytesPerSecond(arch.dram) * double(r.core_period_ps) * 1e-12;
  return r;
}

Tiler::Tiler(const ArchConfig& arch, const SimOptions& options)
    : arch_(arch), options_(options), rates_(ComputeRates(arch)) {}

uint64_t Tiler::OpOps(const TraceOp& op, const TraceStep& step) {
  const uint64_t m = uint64_t(op.m), n = uint64_t(op.n), k = uint64_t(op.k);
  switch (op.kind) {
    case OpKind::kGemm:
      return 2 * m * n * k;
    case OpKind::kAttnScores:
    case OpKind::kAttnValues:
      return 2 * uint64_t(op.heads) * uint64_t(op.head_dim) * AllRowKeys(op, step);
    case OpKind::kSoftmax:
      return 2 * uint64_t(op.heads) * AllRowKeys(op, step);
    case OpKind::kNorm:
      return 3 * m * n;
    case OpKind::kQuantize:
      return 2 * m * n;
    case OpKind::kRope:
      return 4 * m * n;
    case OpKind::kActivation:
      return 2 * m * n;
    case OpKind::kResidual:
    case OpKind::kKvAppend:
      return m * n;
    case OpKind::kEmbed:
      return 0;
  }
  return 0;
}

Unit Tiler::UnitFor(const TraceOp& op) const {
  if (op.kind != OpKind::kGemm) return Unit::kVectorUnit;
  // The adder trees only take trits; a baseline MAC array takes any weights.
  if (arch_.array.kind == ArrayKind::kTernary && op.weights != WeightFormat::kTernary) {
    return Unit::kVectorUnit;
  }
  return Unit::kTreeArray;
}

void Tiler::CheckTileFits(const TraceOp& op, uint64_t needed_bytes, uint64_t capacity_bytes,
                          const char* what) const {
  if (needed_bytes <= capacity_bytes) return;
  throw SimError("in " + OpLabel(op) + ": smallest " + what + " tile needs " +
                 KibText(needed_bytes) + ", the scratchpad holds " + KibText(capacity_bytes) +
                 " for it (sram.capacity_kib = " + std::to_string(arch_.sram.capacity_kib) + ")");
}

Tiler::ActivationPlan Tiler::PlanActivations(const TraceOp& op, uint64_t in_bytes_per_row,
                                             uint64_t out_bytes_per_row) {
  ActivationPlan plan;
  const uint64_t rows = uint64_t(std::max<int64_t>(1, op.m));
  const uint64_t per_row = in_bytes_per_row + out_bytes_per_row;
  CheckTileFits(op, per_row, rates_.activation_bytes, "activation");
  const bool fits = rows * per_row <= rates_.activation_bytes;
  plan.rows_per_tile = fits ? rows : rates_.activation_bytes / per_row;
  plan.input_from_dram = activations_in_dram_;
  plan.output_to_dram = !fits;
  activations_in_dram_ = plan.output_to_dram;
  return plan;
}

uint64_t Tiler::WeightAddress(const TraceOp& op, uint64_t bytes) {
  const auto key = std::make_tuple(op.layer, op.name);
  auto it = weight_base_.find(key);
  if (it != weight_base_.end()) return it->second;
  const uint64_t base = next_weight_address_;
  next_weight_address_ = RoundUp(next_weight_address_ + bytes, 4096);
  weight_base_.emplace(key, base);
  return base;
}

uint64_t Tiler::KvAddress(const TraceOp& op) const {
  return kKvBase + uint64_t(std::max<int64_t>(0, op.layer)) * kKvLayerStride;
}

void Tiler::Plan(const TraceOp& op, const TraceStep& step, int64_t op_index,
                 std::vector<WorkItem>& out) {
  const size_t first = out.size();
  switch (op.kind) {
    case OpKind::kGemm:
      PlanGemm(op, op_index, out);
      break;
    case OpKind::kAttnScores:
    case OpKind::kAttnValues:
      PlanAttention(op, step, op_index, out);
      break;
    default:
      PlanElementwise(op, step, op_index, out);
      break;
  }
  if (out.size() == first) {
    WorkItem empty;
    empty.op_index = op_index;
    empty.unit = UnitFor(op);
    out.push_back(empty);
  }
  out[first].first_of_op = true;
  out.back().last_of_op = true;
}

void Tiler::PlanGemm(const TraceOp& op, int64_t op_index, std::vector<WorkItem>& out) {
  const Unit unit = UnitFor(op);
  const bool on_array = unit == Unit::kTreeArray;
  const uint64_t m = uint64_t(op.m), n = uint64_t(op.n), k = uint64_t(op.k);
  const double weight_bits = WeightBits(op.weights, arch_.array.kind, arch_.packing.format);
  const bool decoded = on_array && op.weights == WeightFormat::kTernary &&
                       arch_.array.kind == ArrayKind::kTernary &&
                       arch_.packing.format == TritPacking::kBase3;
  // Array tiles are whole passes: F rows of K by T columns of N. The vector
  // unit takes any shape, one weight column at a time.
  const uint64_t fan = on_array ? uint64_t(arch_.array.fan_in) : 1;
  const uint64_t trees = on_array ? uint64_t(arch_.array.trees) : 1;
  const uint64_t pass_bytes = BitsToBytes(fan * trees, weight_bits);
  CheckTileFits(op, pass_bytes, rates_.slot_bytes, "weight");
  const uint64_t k_tile =
      std::min(RoundUp(k, fan), std::max(fan, RoundDown(uint64_t(double(rates_.slot_bytes) * 8.0 /
                                                                 (weight_bits * double(trees))),
                                                        fan)));
  const uint64_t n_tile = std::min(
      RoundUp(n, trees), std::max(trees, RoundDown(uint64_t(double(rates_.slot_bytes) * 8.0 /
                                                            (weight_bits * double(k_tile))),
                                                   trees)));
  const uint64_t act_bytes = uint64_t(op.act_bits) / 8;
  const ActivationPlan acts = PlanActivations(op, k * act_bytes, n * act_bytes);
  const uint64_t weight_total = BitsToBytes(k * n, weight_bits);
  const uint64_t weight_base = WeightAddress(op, weight_total);
  const uint64_t sram_bytes_per_cycle =
      uint64_t(arch_.sram.banks) * uint64_t(arch_.sram.bank_width_bytes);
  const uint64_t bank_width = uint64_t(arch_.sram.bank_width_bytes);

  for (uint64_t m0 = 0; m0 < m; m0 += acts.rows_per_tile) {
    const uint64_t mt = std::min(acts.rows_per_tile, m - m0);
    if (acts.input_from_dram) {
      WorkItem load;
      load.op_index = op_index;
      load.unit = unit;
      load.load_kind = LoadKind::kActivations;
      load.load_address = kSpillBase + m0 * k * act_bytes;
      load.load_bytes = mt * k * act_bytes;
      load.load_after_stores = true;
      out.push_back(load);
    }
    for (uint64_t n0 = 0; n0 < n; n0 += n_tile) {
      const uint64_t nn = std::min(n_tile, n - n0);
      for (uint64_t k0 = 0; k0 < k; k0 += k_tile) {
        const uint64_t kk = std::min(k_tile, k - k0);
        WorkItem item;
        item.op_index = op_index;
        item.unit = unit;
        const uint64_t tile_bytes = BitsToBytes(kk * nn, weight_bits);
        if (!options_.weights_resident) {
          item.load_kind = LoadKind::kWeights;
          item.load_bytes = tile_bytes;
          item.load_address = weight_base + BitsToBytes(n0 * k + k0 * nn, weight_bits);
        }
        const uint64_t passes = CeilDiv(nn, trees) * CeilDiv(kk, fan);
        const uint64_t uses = mt * kk * nn;  // activation x weight products
        if (on_array) {
          item.events.weight_uses = uses;
          // One pass streams the mt rows through trees holding F x T weights;
          // the next pass's weights are fetched (and decoded) meanwhile.
          uint64_t pass_cycles = std::max<uint64_t>(mt, CeilDiv(pass_bytes, sram_bytes_per_cycle));
          if (decoded) {
            pass_cycles = std::max<uint64_t>(
                pass_cycles, CeilDiv(pass_bytes, uint64_t(arch_.packing.decoder_bytes_per_cycle)));
            item.events.decoder_bytes = tile_bytes;
          }
          item.compute_cycles = passes * pass_cycles;
          item.events.weight_uses_zero =
              op.weights == WeightFormat::kTernary
                  ? uint64_t(std::llround(double(item.events.weight_uses) * op.zero_fraction))
                  : 0;
          item.events.accumulator_adds = mt * nn * CeilDiv(kk, fan);
        } else {
          // The vector unit's products are MACs, not array weight uses.
          item.compute_cycles = CeilDiv(uses, uint64_t(arch_.vector.lanes));
          item.events.vector_macs = uses;
        }
        item.sram_read_accesses = CeilDiv(tile_bytes, bank_width) +
                                  CeilDiv(mt * kk * act_bytes, bank_width) * CeilDiv(nn, trees);
        if (acts.output_to_dram && k0 + kk >= k) {
          item.store_address = kSpillBase + kSpillStride + (m0 * n + n0 * mt) * act_bytes;
          item.store_bytes = mt * nn * act_bytes;
        }
        out.push_back(item);
      }
    }
  }
  // The last pass drains through the adder pipeline (or the vector pipeline).
  out.back().compute_cycles +=
      on_array ? rates_.pipeline_depth : uint64_t(arch_.vector.pipeline_cycles);
}

void Tiler::PlanAttention(const TraceOp& op, const TraceStep& step, int64_t op_index,
                          std::vector<WorkItem>& out) {
  // Fused attention: scores and probabilities stay on chip (the online-softmax
  // formulation of Dao et al. 2022); K (for scores) or V (for values) of the
  // whole context streams through the slots once per step. The stream is cut
  // into tiles of whole key vectors (one head, one position, one sequence).
  const uint64_t batch = uint64_t(std::max<int64_t>(1, step.batch));
  const uint64_t context = uint64_t(std::max<int64_t>(1, op.context));
  const uint64_t vector_bytes = BitsToBytes(uint64_t(op.head_dim), double(op.kv_bits));
  CheckTileFits(op, vector_bytes, rates_.slot_bytes, "KV-cache");
  const uint64_t vectors = batch * uint64_t(op.kv_heads) * context;
  const uint64_t vectors_per_tile = std::min(vectors, rates_.slot_bytes / vector_bytes);
  const uint64_t macs = uint64_t(op.heads) * uint64_t(op.head_dim) * AllRowKeys(op, step);
  const uint64_t lanes = uint64_t(arch_.vector.lanes);
  const uint64_t bank_width = uint64_t(arch_.sram.bank_width_bytes);
  const uint64_t half = op.kind == OpKind::kAttnValues ? kKvLayerStride / 2 : 0;
  for (uint64_t v0 = 0; v0 < vectors; v0 += vectors_per_tile) {
    const uint64_t count = std::min(vectors_per_tile, vectors - v0);
    WorkItem item;
    item.op_index = op_index;
    item.unit = Unit::kVectorUnit;
    item.load_kind = LoadKind::kKvCache;
    item.load_address = KvAddress(op) + half + v0 * vector_bytes;
    item.load_bytes = count * vector_bytes;
    item.load_after_stores = v0 == 0;  // the cache holds this step's appended keys
    item.events.vector_macs = ShareOf(macs, v0, v0 + count, vectors);
    item.compute_cycles = CeilDiv(item.events.vector_macs, lanes);
    item.sram_read_accesses = CeilDiv(item.load_bytes, bank_width);
    out.push_back(item);
  }
  out.back().compute_cycles += uint64_t(arch_.vector.pipeline_cycles);
}

void Tiler::PlanElementwise(const TraceOp& op, const TraceStep& step, int64_t op_index,
                            std::vector<WorkItem>& out) {
  const uint64_t m = uint64_t(op.m), n = uint64_t(op.n);
  const uint64_t elements = m * n;
  const uint64_t lanes = uint64_t(arch_.vector.lanes);
  const uint64_t special = uint64_t(arch_.vector.special_per_cycle);
  const uint64_t act_bytes = uint64_t(op.act_bits) / 8;
  const uint64_t bank_width = uint64_t(arch_.sram.bank_width_bytes);
  WorkItem item;
  item.op_index = op_index;
  item.unit = Unit::kVectorUnit;
  switch (op.kind) {
    case OpKind::kEmbed:
      // One table row per token; rows laid out in token order (token ids are
      // not in the trace), converted to activations at one element per lane.
      item.load_kind = LoadKind::kWeights;
      item.load_bytes =
          BitsToBytes(elements, WeightBits(op.weights, ArrayKind::kInt8Mac, arch_.packing.format));
      item.load_address = WeightAddress(op, item.load_bytes);
      item.events.vector_elementwise = elements;
      item.compute_cycles = CeilDiv(elements, lanes);
      break;
    case OpKind::kNorm:
      // RMSNorm: sum of squares (MACs), one rsqrt per row, scale by the gains.
      item.load_kind = LoadKind::kWeights;
      item.load_bytes = n * 2;
      item.load_address = WeightAddress(op, item.load_bytes);
      item.events.vector_macs = elements;
      item.events.vector_elementwise = elements;
      item.events.vector_special = m;
      item.compute_cycles = CeilDiv(2 * elements, lanes) + CeilDiv(m, special);
      break;
    case OpKind::kQuantize:
      // Absmax per row, one reciprocal per row, scale and round each element.
      item.events.vector_elementwise = 2 * elements;
      item.events.vector_special = m;
      item.compute_cycles = CeilDiv(2 * elements, lanes) + CeilDiv(m, special);
      break;
    case OpKind::kRope:
      item.events.vector_macs = 2 * elements;
      item.compute_cycles = CeilDiv(2 * elements, lanes);
      break;
    case OpKind::kKvAppend:
      item.events.vector_elementwise = elements;
      item.compute_cycles = CeilDiv(elements, lanes);
      item.store_address =
          KvAddress(op) +
          uint64_t(std::max<int64_t>(0, step.context)) *
              BitsToBytes(uint64_t(op.n) / 2 * uint64_t(std::max<int64_t>(1, step.batch)),
                          double(op.kv_bits));
      item.store_bytes = BitsToBytes(elements, double(op.kv_bits));
      break;
    case OpKind::kSoftmax: {
      const uint64_t scores = uint64_t(op.heads) * AllRowKeys(op, step);
      item.events.vector_special = scores;
      item.events.vector_elementwise = scores;
      item.compute_cycles = CeilDiv(scores, special) + CeilDiv(scores, lanes);
      break;
    }
    case OpKind::kActivation:
      item.events.vector_special = elements;
      item.events.vector_elementwise = elements;
      item.compute_cycles = CeilDiv(elements, special) + CeilDiv(elements, lanes);
      break;
    case OpKind::kResidual:
      item.events.vector_elementwise = elements;
      item.compute_cycles = CeilDiv(elements, lanes);
      break;
    default:
      break;
  }
  item.compute_cycles += uint64_t(arch_.vector.pipeline_cycles);
  item.sram_read_accesses = CeilDiv(elements * act_bytes, bank_width);
  if (op.kind != OpKind::kEmbed && op.kind != OpKind::kKvAppend && op.kind != OpKind::kSoftmax) {
    // Elementwise ops keep the shape; spilled activations stream through.
    const bool from_dram = activations_in_dram_;
    const ActivationPlan acts = PlanActivations(op, n * act_bytes, n * act_bytes);
    if (from_dram || acts.output_to_dram) {
      WorkItem load;
      load.op_index = op_index;
      load.unit = Unit::kVectorUnit;
      load.load_kind = LoadKind::kActivations;
      load.load_address = kSpillBase;
      load.load_bytes = from_dram ? elements * act_bytes : 0;
      load.load_after_stores = true;
      out.push_back(load);
      if (acts.output_to_dram) {
        item.store_address = kSpillBase + kSpillStride;
        item.store_bytes = elements * act_bytes;
      }
    }
  }
  out.push_back(item);
}

}  // namespace tritsim
