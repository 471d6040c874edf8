// The units' cost models against the closed forms of docs/engine.md ("Tiles
// and cycles" and the vector-unit table): TreeArray::Cost, VectorUnit::Cost
// and the trit decoder. The tree array and vector unit are SystemC modules:
// each TEST builds its own (one elaboration per ctest process) and only asks
// for costs, without starting the simulation. Expected cycles are computed
// here from the documented formulas with arithmetic, never from the code.
#include <gtest/gtest.h>

#include <cstdint>
#include <memory>

#include "common/int_math.h"
#include "config/arch_config.h"
#include "hw/scratchpad.h"
#include "hw/tree_array.h"
#include "hw/trit_decoder.h"
#include "hw/vector_unit.h"
#include "mapping/tiler.h"
#include "mapping/trace_ops.h"
#include "run/vector_trace.h"

namespace tritsim {
namespace {

using testing::Attention;
using testing::Elementwise;
using testing::Gemm;

constexpr uint64_t kPeriodPs = 1000;
constexpr double kBase3Bits = 1.6;  // 5 trits per byte (docs/references.md)
constexpr double kTwoBitBits = 2.0;

uint64_t Ceil(uint64_t a, uint64_t b) { return (a + b - 1) / b; }

// ---- trit decoder (plain C++) ----

TEST(TritDecoder, ExpandsOnlyBase3TernaryWeights) {
  PackingConfig base3;
  base3.format = TritPacking::kBase3;
  PackingConfig two_bit;
  two_bit.format = TritPacking::kTwoBit;
  EXPECT_TRUE(TritDecoder(base3).Expands(true));
  EXPECT_FALSE(TritDecoder(base3).Expands(false)) << "int8/int16 weights are not trits";
  EXPECT_FALSE(TritDecoder(two_bit).Expands(true)) << "2-bit trits need no decoding";
}

TEST(TritDecoder, TakesCeilOfBytesOverItsRate) {
  PackingConfig packing;
  packing.decoder_bytes_per_cycle = 64;
  const TritDecoder decoder(packing);
  EXPECT_EQ(decoder.CyclesFor(0), 0u);
  EXPECT_EQ(decoder.CyclesFor(64), 1u);
  EXPECT_EQ(decoder.CyclesFor(65), 2u);
  EXPECT_EQ(decoder.CyclesFor(820), 13u);  // one 64 x 64 pass, base-3: ceil(4096 / 5) bytes
}

// ---- tree array ----

class TreeArrayCost : public ::testing::Test {
 protected:
  TreeArray& array() {
    if (!array_) {
      sram_ = std::make_unique<Scratchpad>("scratchpad", arch_.sram);
      array_ =
          std::make_unique<TreeArray>("tree_array", arch_.array, arch_.packing, kPeriodPs, *sram_);
    }
    return *array_;
  }
  // A GEMM tile as the tiler cuts it: `rows` x `k` activations against k x n
  // weights of `bits` bits each.
  static TileWork Tile(uint64_t rows, uint64_t k, uint64_t n, double bits = kBase3Bits,
                       bool drain = false) {
    TileWork work;
    work.computes = true;
    work.kind = OpKind::kGemm;
    work.rows = rows;
    work.k = k;
    work.n = n;
    work.weight_bits = bits;
    work.weight_bytes = BitsToBytes(k * n, bits);
    work.ternary_weights = true;
    work.drain = drain;
    return work;
  }
  uint64_t Passes(uint64_t k, uint64_t n) const {
    return Ceil(n, uint64_t(arch_.array.trees)) * Ceil(k, uint64_t(arch_.array.fan_in));
  }
  uint64_t Cycles(const TileWork& work) { return array().Cost(work).cycles; }

  ArchConfig arch_;  // defaults: T = F = 64, base-3, decoder 64 B/cycle, 16 banks x 64 B

 private:
  std::unique_ptr<Scratchpad> sram_;
  std::unique_ptr<TreeArray> array_;
};

// 100 rows outlast the fetch (ceil(820 / 1024) = 1) and the decoder
// (ceil(820 / 64) = 13): each pass takes M cycles.
TEST_F(TreeArrayCost, RowBoundPassTakesOneCyclePerRow) {
  constexpr uint64_t M = 100, K = 128, N = 192;
  EXPECT_EQ(Cycles(Tile(M, K, N)), Passes(K, N) * M);
}

// One row: the decoder, 820 base-3 bytes at 64 bytes per cycle, sets the pass.
TEST_F(TreeArrayCost, DecoderBoundPassTakesTheDecodeTime) {
  constexpr uint64_t K = 128, N = 192, kPassBytes = 820, kDecodeRate = 64;
  EXPECT_EQ(Cycles(Tile(1, K, N)), Passes(K, N) * Ceil(kPassBytes, kDecodeRate));
}

// One bank of 64 B: a 2-bit pass of 64 x 64 trits (1024 bytes) takes 16
// reads, more than 4 rows; no decoder with 2-bit packing.
TEST_F(TreeArrayCost, FetchBoundPassTakesTheScratchpadReadTime) {
  arch_.sram.banks = 1;
  arch_.packing.format = TritPacking::kTwoBit;
  constexpr uint64_t K = 64, N = 128, kPassBytes = 1024, kBankWidth = 64;
  const TileCost cost = array().Cost(Tile(4, K, N, kTwoBitBits));
  EXPECT_EQ(cost.cycles, Passes(K, N) * Ceil(kPassBytes, kBankWidth));
  EXPECT_EQ(cost.events.decoder_bytes, 0u) << "2-bit trits bypass the decoder";
}

TEST_F(TreeArrayCost, TwoBitPackingIsNotLimitedByTheDecoder) {
  arch_.packing.format = TritPacking::kTwoBit;
  arch_.packing.decoder_bytes_per_cycle = 1;  // would make a decoded pass take 1024 cycles
  constexpr uint64_t K = 64, N = 64;
  EXPECT_EQ(Cycles(Tile(1, K, N, kTwoBitBits)), 1u) << "fetch: ceil(1024 / (16 x 64)) = 1";
}

// docs/engine.md: the adder pipeline is ceil(log2 F) + array.register_cut,
// added once, on the op's last tile: log2(128) + 2 = 9.
TEST_F(TreeArrayCost, DrainingTileAddsTheAdderPipelineDepth) {
  arch_.array.fan_in = 128;
  arch_.array.register_cut = 2;
  constexpr uint64_t kDepth = 9, M = 100, K = 256, N = 64;
  EXPECT_EQ(array().pipeline_depth(), kDepth);
  EXPECT_EQ(Cycles(Tile(M, K, N, kBase3Bits, true)), Cycles(Tile(M, K, N)) + kDepth);
}

// A MAC baseline stores weights at 8 bits and never decodes: a 64 x 64 pass
// is 4096 bytes, 4 cycles of 16 x 64 B reads.
TEST_F(TreeArrayCost, MacArrayNeverEngagesTheDecoder) {
  arch_.array.kind = ArrayKind::kInt8Mac;
  arch_.packing.decoder_bytes_per_cycle = 1;
  constexpr uint64_t K = 64, N = 64, kInt8Bits = 8;
  const TileCost cost = array().Cost(Tile(1, K, N, kInt8Bits));
  EXPECT_EQ(cost.cycles, 4u);
  EXPECT_EQ(cost.events.decoder_bytes, 0u);
}

// Events: one weight use per product (M K N), zero trits at the given share
// (rounded), one accumulator update per tree output per K chunk of F.
TEST_F(TreeArrayCost, CountsProductsZeroTritsAndAccumulatorUpdates) {
  constexpr uint64_t M = 3, K = 200, N = 70;
  TileWork work = Tile(M, K, N);
  work.zero_fraction = 0.25;
  const TileCost cost = array().Cost(work);
  EXPECT_EQ(cost.events.weight_uses, M * K * N);
  EXPECT_EQ(cost.events.weight_uses_zero, M * K * N / 4);
  EXPECT_EQ(cost.events.accumulator_adds, M * N * Ceil(K, 64));
  EXPECT_EQ(cost.events.decoder_bytes, work.weight_bytes) << "base-3 tiles are all decoded";
  // The weight tile once (2800 B = 44 accesses of 64 B), the activation
  // rows (600 B = 10 accesses) once per group of T = 64 columns (2 groups).
  EXPECT_EQ(cost.sram_read_accesses, 44u + 10u * 2);
}

// ---- vector unit: one test per row of the docs/engine.md table ----

// L = 100 lanes and S = 3 special results per cycle make every ceiling in
// the table bite for m = 7 rows of n = 999 elements.
constexpr uint64_t kLanes = 100, kSpecial = 3, kPipeline = 4;
constexpr int64_t kRows = 7, kWidth = 999;
constexpr uint64_t kMn = uint64_t(kRows) * uint64_t(kWidth);

class VectorUnitCost : public ::testing::Test {
 protected:
  VectorUnitCost() {
    arch_.vector.lanes = int64_t(kLanes);
    arch_.vector.special_per_cycle = int64_t(kSpecial);
    arch_.vector.pipeline_cycles = int(kPipeline);
  }
  VectorUnit& unit() {
    if (!unit_) {
      sram_ = std::make_unique<Scratchpad>("scratchpad", arch_.sram);
      unit_ = std::make_unique<VectorUnit>("vector_unit", arch_.vector, kPeriodPs, *sram_);
    }
    return *unit_;
  }
  // Cycles of all compute tiles the tiler cuts `op` into.
  uint64_t OpCycles(const TraceOp& op) { return OpCost(op).cycles; }
  TileCost OpCost(const TraceOp& op) {
    Tiler tiler(arch_, SimOptions{});
    TileCost sum;
    for (const WorkItem& item : testing::PlanOp(tiler, op)) {
      if (!item.work.computes) continue;
      EXPECT_EQ(item.unit, Unit::kVectorUnit);
      const TileCost cost = unit().Cost(item.work);
      sum.cycles += cost.cycles;
      AddEvents(cost.events, sum.events);
    }
    return sum;
  }
  uint64_t Cycles(OpKind kind) { return OpCycles(Elementwise(kind, "op", kRows, kWidth)); }

  ArchConfig arch_;

 private:
  std::unique_ptr<Scratchpad> sram_;
  std::unique_ptr<VectorUnit> unit_;
};

TEST_F(VectorUnitCost, NormTakesTwoPassesPerElementAndOneRsqrtPerRow) {
  EXPECT_EQ(Cycles(OpKind::kNorm), Ceil(2 * kMn, kLanes) + Ceil(kRows, kSpecial) + kPipeline);
}

TEST_F(VectorUnitCost, QuantizeTakesTwoPassesPerElementAndOneReciprocalPerRow) {
  EXPECT_EQ(Cycles(OpKind::kQuantize), Ceil(2 * kMn, kLanes) + Ceil(kRows, kSpecial) + kPipeline);
}

TEST_F(VectorUnitCost, RopeTakesTwoPassesPerElement) {
  EXPECT_EQ(Cycles(OpKind::kRope), Ceil(2 * kMn, kLanes) + kPipeline);
}

TEST_F(VectorUnitCost, KvAppendTakesOnePassPerElement) {
  EXPECT_EQ(Cycles(OpKind::kKvAppend), Ceil(kMn, kLanes) + kPipeline);
}

TEST_F(VectorUnitCost, ResidualTakesOnePassPerElement) {
  EXPECT_EQ(Cycles(OpKind::kResidual), Ceil(kMn, kLanes) + kPipeline);
}

TEST_F(VectorUnitCost, EmbedTakesOnePassPerElement) {
  EXPECT_EQ(Cycles(OpKind::kEmbed), Ceil(kMn, kLanes) + kPipeline);
}

TEST_F(VectorUnitCost, ActivationTakesOneSpecialResultAndOnePassPerElement) {
  EXPECT_EQ(Cycles(OpKind::kActivation), Ceil(kMn, kSpecial) + Ceil(kMn, kLanes) + kPipeline);
}

// Softmax over 8 heads x 7 rows x 999 keys (not causal) = 55 944 scores.
TEST_F(VectorUnitCost, SoftmaxTakesOneExpAndOnePassPerScore) {
  constexpr uint64_t kScores = 8 * uint64_t(kRows) * uint64_t(kWidth);
  const TileCost cost = OpCost(Attention(OpKind::kSoftmax, "attn.softmax", kRows, kWidth, false));
  EXPECT_EQ(cost.cycles, Ceil(kScores, kSpecial) + Ceil(kScores, kLanes) + kPipeline);
  EXPECT_EQ(cost.events.vector_special, kScores);
}

// Attention: ceil(MACs / L) per KV tile. A 16 KiB scratchpad holds 64 key
// vectors per tile: 2 KV heads x 999 positions = 1998 vectors, 32 tiles
// (31 of 64, one of 14); MACs per vector = 8 x 64 / 2 = 256.
TEST_F(VectorUnitCost, AttentionTakesCeilMacsOverLanesPerKvTile) {
  arch_.sram.capacity_kib = 16;
  constexpr uint64_t kPerVector = 256, kFullTiles = 31, kTileVectors = 64, kLastVectors = 14;
  const uint64_t expected = kFullTiles * Ceil(kTileVectors * kPerVector, kLanes) +
                            Ceil(kLastVectors * kPerVector, kLanes) + kPipeline;
  const TileCost cost = OpCost(Attention(OpKind::kAttnScores, "attn.scores", 1, kWidth, false));
  EXPECT_EQ(cost.cycles, expected);
  EXPECT_EQ(cost.events.vector_macs, 8u * 64 * uint64_t(kWidth));
}

// An int8 GEMM on a ternary array: ceil(uses / L), uses = M K N (one tile:
// 64 KiB of int8 weights, within this design's streamed-tile cap).
TEST_F(VectorUnitCost, Int8GemmOnATernaryArrayTakesCeilUsesOverLanes) {
  constexpr uint64_t M = 3, K = 256, N = 256;
  TraceOp op = Gemm("head", M, N, K);
  op.weights = WeightFormat::kInt8;
  const TileCost cost = OpCost(op);
  EXPECT_EQ(cost.cycles, Ceil(M * K * N, kLanes) + kPipeline);
  EXPECT_EQ(cost.events.vector_macs, M * K * N);
}

TEST_F(VectorUnitCost, OnlyTheDrainingTileAddsTheInstructionLatency) {
  TileWork work;
  work.computes = true;
  work.kind = OpKind::kResidual;
  work.elements = kMn;
  const uint64_t plain = unit().Cost(work).cycles;
  work.drain = true;
  EXPECT_EQ(unit().Cost(work).cycles, plain + kPipeline);
}

}  // namespace
}  // namespace tritsim
