#include "mapping/tiler.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "common/error.h"
#include "common/int_math.h"
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
constexpr uint64_t kNormGainBytes = 2;         // RMSNorm gains are stored as 16-bit values

uint64_t RoundDown(uint64_t a, uint64_t b) { return a / b * b; }
uint64_t RoundUp(uint64_t a, uint64_t b) { return CeilDiv(a, b) * b; }

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

// Sequences an attention or KV-append op runs for: its group of a mixed
// step, or the whole batch of a uniform step.
uint64_t SequencesOf(const TraceOp& op, const TraceStep& step) {
  return uint64_t(std::max<int64_t>(1, op.sequences > 0 ? op.sequences : step.batch));
}

uint64_t AllRowKeys(const TraceOp& op, const TraceStep& step) {
  const uint64_t batch = SequencesOf(op, step);
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

// Streamed tiles are cut no larger than needed to hide a transfer's fixed
// cost (the DMA setup plus the first access's row-miss latency) behind its
// data: that cost is at most 1/kTransferAmortization of the tile's transfer
// at peak bandwidth; never below kMinTileBytes. A larger scratchpad then buys
// a deeper prefetch, not coarser tiles (docs/engine.md).
constexpr double kTransferAmortization = 16.0;
constexpr uint64_t kMinTileBytes = 64 * 1024;
constexpr uint64_t kTileGrainBytes = 4096;

uint64_t TileCapBytes(const ArchConfig& arch, double dram_bytes_per_cycle, uint64_t period_ps) {
  const double latency_cycles = DramRowMissLatencyNs(arch.dram) * 1000.0 / double(period_ps);
  const double fixed_cycles = double(arch.dma.setup_cycles) + latency_cycles;
  const double amortized = kTransferAmortization * fixed_cycles * dram_bytes_per_cycle;
  return std::max(kMinTileBytes, RoundUp(uint64_t(std::ceil(amortized)), kTileGrainBytes));
}

}  // namespace

HardwareRates ComputeRates(const ArchConfig& arch) {
  HardwareRates r;
  r.core_period_ps = std::max<uint64_t>(1, uint64_t(std::llround(1e6 / arch.clock.core_mhz)));
  const uint64_t capacity = uint64_t(arch.sram.capacity_kib) * 1024;
  r.activation_bytes = capacity / 2;
  r.stream_bytes = capacity - r.activation_bytes;
  r.array_ops_per_cycle = 2.0 * double(arch.array.trees) * double(arch.array.fan_in);
  r.vector_ops_per_cycle = 2.0 * double(arch.vector.lanes);
  r.dram_bytes_per_cycle = DramPeakBytesPerSecond(arch.dram) * double(r.core_period_ps) * 1e-12;
  r.slot_bytes =
      std::min(r.stream_bytes / 2, TileCapBytes(arch, r.dram_bytes_per_cycle, r.core_period_ps));
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
    case OpKind::kEmbed:
    case OpKind::kNorm:
    case OpKind::kQuantize:
    case OpKind::kRope:
    case OpKind::kKvAppend:
    case OpKind::kSoftmax:
    case OpKind::kActivation:
    case OpKind::kResidual:
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
  const uint64_t weight_base = WeightAddress(op, BitsToBytes(k * n, weight_bits));

  TileWork work;
  work.computes = true;
  work.kind = op.kind;
  work.weight_bits = weight_bits;
  work.ternary_weights = op.weights == WeightFormat::kTernary;
  work.zero_fraction = op.zero_fraction;
  work.act_bytes = act_bytes;
  for (uint64_t m0 = 0; m0 < m; m0 += acts.rows_per_tile) {
    work.rows = std::min(acts.rows_per_tile, m - m0);
    if (acts.input_from_dram) {
      WorkItem load;
      load.op_index = op_index;
      load.unit = unit;
      load.load_kind = LoadKind::kActivations;
      load.load_address = kSpillBase + m0 * k * act_bytes;
      load.load_bytes = work.rows * k * act_bytes;
      load.load_after_stores = true;
      out.push_back(load);
    }
    for (uint64_t n0 = 0; n0 < n; n0 += n_tile) {
      work.n = std::min(n_tile, n - n0);
      for (uint64_t k0 = 0; k0 < k; k0 += k_tile) {
        work.k = std::min(k_tile, k - k0);
        // Trits [start, start + k x n) of the packed tensor; whole bytes
        // from the one holding trit `start`, so tiles partition the tensor.
        const uint64_t start = n0 * k + k0 * work.n;
        const uint64_t first_byte = BitsToBytes(start, weight_bits);
        work.weight_bytes = BitsToBytes(start + work.k * work.n, weight_bits) - first_byte;
        WorkItem item;
        item.op_index = op_index;
        item.unit = unit;
        item.work = work;
        if (!options_.weights_resident) {
          item.load_kind = LoadKind::kWeights;
          item.load_bytes = work.weight_bytes;
          item.load_address = weight_base + first_byte;
        }
        if (acts.output_to_dram && k0 + work.k >= k) {
          item.store_address = kSpillBase + kSpillStride + (m0 * n + n0 * work.rows) * act_bytes;
          item.store_bytes = work.rows * work.n * act_bytes;
        }
        out.push_back(item);
      }
    }
  }
  out.back().work.drain = true;  // the last pass drains through the unit's pipeline
}

void Tiler::PlanAttention(const TraceOp& op, const TraceStep& step, int64_t op_index,
                          std::vector<WorkItem>& out) {
  // Fused attention: scores and probabilities stay on chip (the online-softmax
  // formulation of Dao et al. 2022); K (for scores) or V (for values) of the
  // whole context streams through the slots once per step. The stream is cut
  // into tiles of whole key vectors (one head, one position, one sequence).
  const uint64_t batch = SequencesOf(op, step);
  const uint64_t context = uint64_t(std::max<int64_t>(1, op.context));
  const uint64_t vector_bytes = BitsToBytes(uint64_t(op.head_dim), double(op.kv_bits));
  CheckTileFits(op, vector_bytes, rates_.slot_bytes, "KV-cache");
  const uint64_t vectors = batch * uint64_t(op.kv_heads) * context;
  const uint64_t vectors_per_tile = std::min(vectors, rates_.slot_bytes / vector_bytes);
  const uint64_t macs = uint64_t(op.heads) * uint64_t(op.head_dim) * AllRowKeys(op, step);
  const uint64_t half = op.kind == OpKind::kAttnValues ? kKvLayerStride / 2 : 0;
  for (uint64_t v0 = 0; v0 < vectors; v0 += vectors_per_tile) {
    const uint64_t count = std::min(vectors_per_tile, vectors - v0);
    WorkItem item;
    item.op_index = op_index;
    item.unit = Unit::kVectorUnit;
    item.load_kind = LoadKind::kKvCache;
    item.load_address = KvAddress(op) + half + v0 * vector_bytes;
    item.load_bytes = count * vector_bytes;
    // No wait for this step's KV append: the new keys and values are still
    // on chip (the projections just produced them), so the stream of the
    // cached context may start while they are stored.
    item.work.computes = true;
    item.work.kind = op.kind;
    item.work.elements = ShareOf(macs, v0, v0 + count, vectors);
    item.work.read_bytes = item.load_bytes;
    out.push_back(item);
  }
  out.back().work.drain = true;
}

// Vector work of an elementwise op: one per element, but one per attention
// score for softmax.
uint64_t Tiler::ElementwiseCount(const TraceOp& op, const TraceStep& step) {
  if (op.kind == OpKind::kSoftmax) return uint64_t(op.heads) * AllRowKeys(op, step);
  return uint64_t(op.m) * uint64_t(op.n);
}

// Operands an elementwise op loads or stores beside its activations: the
// embedding rows, the norm gains, the appended KV entries.
void Tiler::PlanElementwiseTransfers(const TraceOp& op, const TraceStep& step, WorkItem& item) {
  const uint64_t elements = uint64_t(op.m) * uint64_t(op.n);
  if (op.kind == OpKind::kEmbed) {
    // One table row per token; rows laid out in token order (token ids are
    // not in the trace).
    item.load_kind = LoadKind::kWeights;
    item.load_bytes =
        BitsToBytes(elements, WeightBits(op.weights, ArrayKind::kInt8Mac, arch_.packing.format));
    item.load_address = WeightAddress(op, item.load_bytes);
  } else if (op.kind == OpKind::kNorm) {
    item.load_kind = LoadKind::kWeights;
    item.load_bytes = uint64_t(op.n) * kNormGainBytes;
    item.load_address = WeightAddress(op, item.load_bytes);
  } else if (op.kind == OpKind::kKvAppend) {
    // Where the caches end: a mixed step's group gives its own context.
    const int64_t context = op.sequences > 0 ? op.context : step.context;
    item.store_address = KvAddress(op) + uint64_t(std::max<int64_t>(0, context)) *
                                             BitsToBytes(uint64_t(op.n) / 2 * SequencesOf(op, step),
                                                         double(op.kv_bits));
    item.store_bytes = BitsToBytes(elements, double(op.kv_bits));
  }
}

void Tiler::PlanElementwise(const TraceOp& op, const TraceStep& step, int64_t op_index,
                            std::vector<WorkItem>& out) {
  const uint64_t elements = uint64_t(op.m) * uint64_t(op.n);
  const uint64_t act_bytes = uint64_t(op.act_bits) / 8;
  WorkItem item;
  item.op_index = op_index;
  item.unit = Unit::kVectorUnit;
  item.work.computes = true;
  item.work.kind = op.kind;
  item.work.rows = uint64_t(op.m);
  item.work.elements = ElementwiseCount(op, step);
  item.work.read_bytes = elements * act_bytes;
  item.work.drain = true;
  PlanElementwiseTransfers(op, step, item);
  if (op.kind != OpKind::kEmbed && op.kind != OpKind::kKvAppend && op.kind != OpKind::kSoftmax) {
    // Elementwise ops keep the shape; spilled activations stream through.
    const bool from_dram = activations_in_dram_;
    const ActivationPlan acts =
        PlanActivations(op, uint64_t(op.n) * act_bytes, uint64_t(op.n) * act_bytes);
    if (from_dram) {
      WorkItem load;
      load.op_index = op_index;
      load.unit = Unit::kVectorUnit;
      load.load_kind = LoadKind::kActivations;
      load.load_address = kSpillBase;
      load.load_bytes = elements * act_bytes;
      load.load_after_stores = true;
      out.push_back(load);
    }
    if (acts.output_to_dram) {
      item.store_address = kSpillBase + kSpillStride;
      item.store_bytes = elements * act_bytes;
    }
  }
  out.push_back(item);
}

}  // namespace tritsim
