// The tiler: how trace ops are cut into tiles that fit the scratchpad
// (docs/engine.md, "Scratchpad use" and "Tiles and cycles"). Plain C++, no
// SystemC. Expected values are derived here from the documented policy and
// from arithmetic; base-3 packing holds 5 trits per byte (3^5 = 243 <= 256,
// docs/references.md), 2-bit packing 4 trits per byte.
#include "mapping/tiler.h"

#include <gtest/gtest.h>

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/arch_config.h"
#include "mapping/trace_ops.h"
#include "run/vector_trace.h"

namespace tritsim {
namespace {

using testing::Attention;
using testing::DecodeStep;
using testing::Elementwise;
using testing::Gemm;

constexpr uint64_t kKib = 1024;
constexpr uint64_t kTritsPerBase3Byte = 5;  // 3^5 = 243 <= 256 (docs/references.md)
constexpr uint64_t kTritsPerTwoBitByte = 4;

class TilerTest : public ::testing::Test {
 protected:
  void UseSramKib(int64_t kib) { arch_.sram.capacity_kib = kib; }
  uint64_t SlotBytes() const { return uint64_t(arch_.sram.capacity_kib) * kKib / 4; }
  uint64_t HalfBytes() const { return uint64_t(arch_.sram.capacity_kib) * kKib / 2; }
  uint64_t Trees() const { return uint64_t(arch_.array.trees); }
  uint64_t FanIn() const { return uint64_t(arch_.array.fan_in); }

  Tiler& tiler() {
    if (!tiler_) tiler_ = std::make_unique<Tiler>(arch_, options_);
    return *tiler_;
  }
  // Plans `op` as the next op of the trace (the tiler keeps the spill state).
  std::vector<WorkItem> Plan(const TraceOp& op, const TraceStep& step = DecodeStep()) {
    return testing::PlanOp(tiler(), op, step, next_index_++);
  }

  ArchConfig arch_;
  SimOptions options_;

 private:
  std::unique_ptr<Tiler> tiler_;
  int64_t next_index_ = 0;
};

uint64_t Sum(const std::vector<WorkItem>& items,
             const std::function<uint64_t(const WorkItem&)>& f) {
  uint64_t total = 0;
  for (const WorkItem& item : items) total += f(item);
  return total;
}
uint64_t WeightBytes(const std::vector<WorkItem>& items) {
  return Sum(items, [](const WorkItem& i) {
    return i.load_kind == LoadKind::kWeights ? i.load_bytes : 0;
  });
}
uint64_t ActivationLoadBytes(const std::vector<WorkItem>& items) {
  return Sum(items, [](const WorkItem& i) {
    return i.load_kind == LoadKind::kActivations ? i.load_bytes : 0;
  });
}
uint64_t StoreBytes(const std::vector<WorkItem>& items) {
  return Sum(items, [](const WorkItem& i) { return i.store_bytes; });
}
uint64_t Count(const std::vector<WorkItem>& items, const std::function<bool(const WorkItem&)>& f) {
  return Sum(items, [&f](const WorkItem& i) { return f(i) ? uint64_t{1} : uint64_t{0}; });
}
uint64_t ComputeElements(const std::vector<WorkItem>& items) {
  return Sum(items, [](const WorkItem& i) { return i.work.elements; });
}

// ---- GEMM weight tiles ----

constexpr uint64_t kKTile = 1280;  // K rows per tile in a 16 KiB slot with T = 64 (see below)

TEST_F(TilerTest, Base3GemmWeightTilesAddUpToThePackedMatrix) {
  constexpr uint64_t K = 4096, N = 2000;
  const auto items = Plan(Gemm("ffn.up", 1, N, K));
  // Arithmetic: K x N trits at 5 per byte = 1 638 400 bytes.
  EXPECT_EQ(WeightBytes(items), K * N / kTritsPerBase3Byte);
  // Streamed tiles are capped at 64 KiB on this DDR4 design (the transfer
  // cost floor, docs/engine.md): 327 680 trits = 64 columns of K = 4096 (a
  // multiple of T = 64), so N = 2000 takes ceil(2000 / 64) = 32 tiles.
  EXPECT_EQ(items.size(), 32u);
}

TEST_F(TilerTest, TwoBitGemmWeightTilesAddUpToThePackedMatrix) {
  arch_.packing.format = TritPacking::kTwoBit;
  constexpr uint64_t K = 3072, N = 1000;
  EXPECT_EQ(WeightBytes(Plan(Gemm("attn.o", 1, N, K))), K * N / kTritsPerTwoBitByte);
}

TEST_F(TilerTest, MacArrayStoresTernaryWeightsAtItsNativeWidth) {
  arch_.array.kind = ArrayKind::kFp16Mac;
  constexpr uint64_t K = 1024, N = 300, kFp16Bytes = 2;
  EXPECT_EQ(WeightBytes(Plan(Gemm("attn.o", 1, N, K))), K * N * kFp16Bytes);
}

// With a 64 KiB scratchpad (16 KiB slots = 81 920 trits) a tile holds
// kKTile x 64 trits (81 920 / 64 = 1280, a multiple of F = 64), so
// K = 3000, N = 200 is cut into 3 K chunks x 4 N chunks; every tile holds a
// multiple of 5 trits here, so the tiles tile the packed tensor exactly.
TEST_F(TilerTest, GemmWeightTilesAreContiguousFromTheTensorBase) {
  UseSramKib(64);
  constexpr uint64_t K = 3000, N = 200;
  const auto items = Plan(Gemm("ffn.down", 1, N, K));
  ASSERT_EQ(items.size(), 12u);
  EXPECT_EQ(items.front().load_address, 0u) << "the first weight tensor starts at address 0";
  for (size_t i = 1; i < items.size(); ++i) {
    EXPECT_EQ(items[i].load_address, items[i - 1].load_address + items[i - 1].load_bytes)
        << "tile " << i << " must start where tile " << i - 1 << " ended";
  }
  EXPECT_EQ(WeightBytes(items), K * N / kTritsPerBase3Byte);
}

// When a tile boundary falls inside a base-3 byte, each tile rounds its own
// bytes up: the loads stay contiguous but may run past the packed tensor by
// at most one byte per tile (3001 x 203 trits: 121 841 bytes packed).
TEST_F(TilerTest, MisalignedBase3TilesOverfetchAtMostOneBytePerTile) {
  UseSramKib(64);
  constexpr uint64_t K = 3001, N = 203;
  const auto items = Plan(Gemm("ffn.down", 1, N, K));
  const uint64_t packed = (K * N + kTritsPerBase3Byte - 1) / kTritsPerBase3Byte;
  EXPECT_GE(WeightBytes(items), packed);
  EXPECT_LE(WeightBytes(items), packed + items.size());
  for (size_t i = 1; i < items.size(); ++i) {
    EXPECT_EQ(items[i].load_address, items[i - 1].load_address + items[i - 1].load_bytes);
  }
}

TEST_F(TilerTest, GemmTilesFitOneSlotAndHoldWholePasses) {
  UseSramKib(64);
  constexpr uint64_t K = 3000, N = 200;
  for (const WorkItem& item : Plan(Gemm("ffn.down", 7, N, K))) {
    EXPECT_LE(item.load_bytes, SlotBytes()) << "a slot is a quarter of the scratchpad";
    // docs/engine.md: k_tile a multiple of F, n_tile a multiple of T; only
    // the last chunk of K or N may be short.
    EXPECT_TRUE(item.work.k % FanIn() == 0 || item.work.k == K % kKTile) << item.work.k;
    EXPECT_TRUE(item.work.n % Trees() == 0 || item.work.n == N % Trees()) << item.work.n;
  }
}

TEST_F(TilerTest, OnlyTheLastTileOfAGemmDrains) {
  UseSramKib(64);
  const auto items = Plan(Gemm("ffn.down", 3, 200, 3000));
  ASSERT_GT(items.size(), 1u);
  EXPECT_EQ(Count(items, [](const WorkItem& i) { return i.work.drain; }), 1u);
  EXPECT_TRUE(items.back().work.drain);
  EXPECT_TRUE(items.front().first_of_op);
  EXPECT_TRUE(items.back().last_of_op);
  EXPECT_EQ(Count(items, [](const WorkItem& i) { return i.last_of_op; }), 1u);
}

TEST_F(TilerTest, ResidentWeightsGiveNoWeightLoads) {
  options_.weights_resident = true;
  UseSramKib(64);
  const auto items = Plan(Gemm("ffn.down", 3, 200, 3000));
  EXPECT_EQ(items.size(), 12u) << "the same tiles, only without their loads";
  EXPECT_EQ(Count(items, [](const WorkItem& i) { return i.load_kind != LoadKind::kNone; }), 0u);
  EXPECT_EQ(Sum(items, [](const WorkItem& i) { return i.load_bytes; }), 0u);
}

// ---- activations: on chip up to half the scratchpad, else spilled ----

// K = N = 2048 at 8 bits: 4096 bytes per row; the 1 MiB activation half of
// the default 2 MiB scratchpad holds exactly 256 rows.
constexpr int64_t kWide = 2048;
constexpr int64_t kRowsThatFit = 256;

TEST_F(TilerTest, ActivationsThatFillHalfTheScratchpadStayOnChip) {
  ASSERT_EQ(uint64_t(kRowsThatFit) * 2 * kWide, HalfBytes());
  const auto items = Plan(Gemm("attn.o", kRowsThatFit, kWide, kWide));
  EXPECT_EQ(StoreBytes(items), 0u);
  EXPECT_EQ(ActivationLoadBytes(items), 0u);
}

TEST_F(TilerTest, ActivationsOneRowOverHalfTheScratchpadSpillTheOutput) {
  constexpr int64_t M = kRowsThatFit + 1;
  const auto items = Plan(Gemm("attn.o", M, kWide, kWide));
  EXPECT_EQ(StoreBytes(items), uint64_t(M * kWide)) << "every output byte is stored once";
  EXPECT_EQ(ActivationLoadBytes(items), 0u) << "the input was produced on chip";
  for (const WorkItem& item : items) EXPECT_LE(item.work.rows, uint64_t(kRowsThatFit));
}

TEST_F(TilerTest, OpAfterASpillReloadsItsInputAfterTheStores) {
  constexpr int64_t M = kRowsThatFit + 1, kNarrow = 64;
  Plan(Gemm("attn.o", M, kWide, kWide));
  const auto next = Plan(Gemm("ffn.gate", M, kNarrow, kWide));
  ASSERT_FALSE(next.empty());
  EXPECT_EQ(next.front().load_kind, LoadKind::kActivations);
  EXPECT_TRUE(next.front().load_after_stores) << "it reads what the previous op stored";
  EXPECT_EQ(ActivationLoadBytes(next), uint64_t(M * kWide));
  EXPECT_EQ(Count(next, [](const WorkItem& i) { return i.load_after_stores; }), 1u);
  EXPECT_EQ(StoreBytes(next), 0u) << "M x (2048 + 64) bytes fit: the output stays on chip";
  const auto third = Plan(Elementwise(OpKind::kResidual, "ffn.residual", M, kNarrow));
  EXPECT_EQ(ActivationLoadBytes(third), 0u) << "the input of the third op never left the chip";
}

// ---- attention ----

// Causal prefill with 100 cached keys: rows = 3 see 100 + 1, 100 + 2 and
// 100 + 3 keys, 306 in all; 8 heads x 64 dims = 156 672 MACs over 206 key
// vectors (2 KV heads x 103 positions), 64 vectors per 4 KiB slot.
TEST_F(TilerTest, AttentionTilesSplitTheMacsExactly) {
  UseSramKib(16);
  constexpr uint64_t kRows = 3, kCached = 100;
  TraceOp op = Attention(OpKind::kAttnScores, "attn.scores", kRows, kCached + kRows, true);
  const auto items = Plan(op);
  constexpr uint64_t kKeys = kRows * kCached + kRows * (kRows + 1) / 2;
  constexpr uint64_t kMacs = 8 * 64 * kKeys;
  ASSERT_EQ(items.size(), 4u) << "206 vectors in tiles of 64";
  EXPECT_EQ(ComputeElements(items), kMacs);
  const double per_vector = double(kMacs) / double(2 * (kCached + kRows));
  for (const WorkItem& item : items) {
    const double vectors = double(item.load_bytes) / 64.0;
    EXPECT_NEAR(double(item.work.elements), per_vector * vectors, 1.0) << "proportional share";
  }
}

// The step's own keys and values are still on chip when attention starts,
// so streaming the cached context does not wait for their store.
TEST_F(TilerTest, AttentionStreamsTheWholeCacheWithoutWaitingForThisStepsAppend) {
  UseSramKib(16);
  constexpr uint64_t kContext = 1000, kKvHeads = 2, kVectorBytes = 64;
  const auto items = Plan(Attention(OpKind::kAttnValues, "attn.values", 1, kContext, false));
  EXPECT_EQ(Sum(items, [](const WorkItem& i) { return i.load_bytes; }),
            kKvHeads * kContext * kVectorBytes);
  EXPECT_EQ(Count(items, [](const WorkItem& i) { return i.load_after_stores; }), 0u);
  EXPECT_EQ(Count(items, [](const WorkItem& i) { return i.work.drain; }), 1u);
}

// Arithmetic: a causal prefill of r rows with no cache attends
// 1 + 2 + ... + r = r (r + 1) / 2 keys per head.
TEST_F(TilerTest, CausalPrefillAttendsTheTriangleOfKeys) {
  constexpr int64_t kRows = 16;
  constexpr uint64_t kTriangle = kRows * (kRows + 1) / 2;  // 136
  const TraceOp op = Attention(OpKind::kAttnScores, "attn.scores", kRows, kRows, true);
  EXPECT_EQ(Tiler::OpOps(op, DecodeStep()), 2u * 8 * 64 * kTriangle);
}

TEST_F(TilerTest, CausalPrefillAfterCachedKeysAddsTheCacheToEveryRow) {
  constexpr int64_t kRows = 16, kCached = 100;
  constexpr uint64_t kKeys = kRows * kCached + kRows * (kRows + 1) / 2;
  const TraceOp op = Attention(OpKind::kAttnScores, "attn.scores", kRows, kCached + kRows, true);
  EXPECT_EQ(Tiler::OpOps(op, DecodeStep()), 2u * 8 * 64 * kKeys);
}

TEST_F(TilerTest, CausalPrefillOfABatchCountsEachSequencesTriangle) {
  constexpr int64_t kBatch = 2, kRows = 16;
  constexpr uint64_t kTriangle = kRows * (kRows + 1) / 2;
  const TraceOp op = Attention(OpKind::kAttnScores, "attn.scores", kBatch * kRows, kRows, true);
  EXPECT_EQ(Tiler::OpOps(op, DecodeStep(kBatch)), 2u * 8 * 64 * kBatch * kTriangle);
}

TEST_F(TilerTest, SoftmaxWorksOncePerScore) {
  constexpr int64_t kRows = 16;
  const TraceOp op = Attention(OpKind::kSoftmax, "attn.softmax", kRows, kRows, true);
  const auto items = Plan(op);
  EXPECT_EQ(ComputeElements(items), 8u * kRows * (kRows + 1) / 2);
}

// ---- which unit runs a GEMM ----

TraceOp Int8Gemm() {
  TraceOp op = Gemm("head", 1, 512, 256);
  op.weights = WeightFormat::kInt8;
  return op;
}

TEST_F(TilerTest, TernaryArrayRunsTernaryGemmsItself) {
  EXPECT_EQ(tiler().UnitFor(Gemm("ffn.up", 1, 64, 64)), Unit::kTreeArray);
}

TEST_F(TilerTest, TernaryArrayHandsInt8GemmsToTheVectorUnit) {
  EXPECT_EQ(tiler().UnitFor(Int8Gemm()), Unit::kVectorUnit);
  for (const WorkItem& item : Plan(Int8Gemm())) EXPECT_EQ(item.unit, Unit::kVectorUnit);
}

TEST_F(TilerTest, MacArrayRunsInt8GemmsItself) {
  arch_.array.kind = ArrayKind::kInt8Mac;
  EXPECT_EQ(tiler().UnitFor(Int8Gemm()), Unit::kTreeArray);
  EXPECT_EQ(tiler().UnitFor(Gemm("ffn.up", 1, 64, 64)), Unit::kTreeArray);
}

TEST_F(TilerTest, ElementwiseOpsRunOnTheVectorUnit) {
  EXPECT_EQ(tiler().UnitFor(Elementwise(OpKind::kNorm, "attn.norm", 1, 64)), Unit::kVectorUnit);
}

// ---- tiles that cannot fit ----

std::string PlanMessage(const std::function<void()>& plan) {
  try {
    plan();
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kSimFailed) << "docs/engine.md: the run fails with exit 4";
    return e.what();
  }
  ADD_FAILURE() << "planning did not throw";
  return "";
}

// A 16 KiB scratchpad has 4 KiB slots; one pass of a 256 x 128 array holds
// 32 768 trits = 6554 bytes base-3 (6.4 KiB).
TEST_F(TilerTest, WeightPassLargerThanASlotNamesTheOpAndTheSizes) {
  UseSramKib(16);
  arch_.array.trees = 256;
  arch_.array.fan_in = 128;
  TraceOp op = Gemm("ffn.up", 1, 512, 512);
  op.layer = 3;
  const std::string message = PlanMessage([&] { Plan(op); });
  EXPECT_NE(message.find("layer 3 (ffn.up)"), std::string::npos) << message;
  EXPECT_NE(message.find("6.4 KiB"), std::string::npos) << message;
  EXPECT_NE(message.find("holds 4 KiB"), std::string::npos) << message;
  EXPECT_NE(message.find("sram.capacity_kib = 16"), std::string::npos) << message;
}

// One key vector of head_dim 8192 at 8 bits is 8 KiB, over a 4 KiB slot.
TEST_F(TilerTest, KeyVectorLargerThanASlotNamesTheOpAndTheSizes) {
  UseSramKib(16);
  TraceOp op = Attention(OpKind::kAttnScores, "attn.scores", 1, 4, false);
  op.head_dim = 8192;
  const std::string message = PlanMessage([&] { Plan(op); });
  EXPECT_NE(message.find("op attn.scores"), std::string::npos) << message;
  EXPECT_NE(message.find("KV-cache"), std::string::npos) << message;
  EXPECT_NE(message.find("8 KiB"), std::string::npos) << message;
}

}  // namespace
}  // namespace tritsim
