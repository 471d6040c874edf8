// The sequencer (docs/engine.md, "Processes" and "Stalls"): ops run and
// retire in trace order, at most two tiles hold scratchpad slots (double
// buffering), and every core cycle is charged to exactly one cause. Most
// tests wire the real sequencer and DMA engine to stub compute units with
// fixed costs and a stub memory with a fixed latency, so expected numbers
// are plain arithmetic; the last runs the whole accelerator. Each TEST
// elaborates once (its own ctest process).
#include "hw/sequencer.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include <systemc>

#include "config/config_loader.h"
#include "hw/dma_engine.h"
#include "hw/memory_system.h"
#include "hw/scratchpad.h"
#include "mapping/trace_ops.h"
#include "run/simulation.h"
#include "run/vector_trace.h"

namespace tritsim {
namespace {

using testing::Elementwise;
using testing::Gemm;
using testing::VectorTrace;

constexpr uint64_t kPeriodPs = 1000;           // the default 1 GHz core
constexpr uint64_t kMemoryPs = 2 * kPeriodPs;  // stub DRAM: every transfer takes 2 cycles
constexpr uint64_t kTreeCycles = 50, kTreeConflicts = 3;
constexpr uint64_t kVectorCycles = 20, kVectorConflicts = 2;

// What the stubs saw, in order.
struct Observed {
  struct Run {
    WorkItem item;
    uint64_t start_ps = 0;
  };
  std::vector<Run> runs;
  uint64_t loads_started = 0;
  uint64_t items_done = 0;
  uint64_t most_slots_held = 0;  // loads started minus items finished, at most
};

// DRAM that finishes every transfer kMemoryPs after it starts.
class StubMemory final : public MemorySystem {
 public:
  explicit StubMemory(Observed& seen) : seen_(seen) {}
  uint64_t Transfer(uint64_t, uint64_t, bool is_write, uint64_t start_ps, int64_t) override {
    if (!is_write) {
      ++seen_.loads_started;
      seen_.most_slots_held =
          std::max(seen_.most_slots_held, seen_.loads_started - seen_.items_done);
    }
    return start_ps + kMemoryPs;
  }
  void Finish(uint64_t) override {}
  const DramStats& stats() const override { return stats_; }
  uint64_t burst_bytes() const override { return 64; }
  double peak_bytes_per_second() const override { return 1e10; }

 private:
  Observed& seen_;
  DramStats stats_;
};

// A compute unit whose every tile costs `cycles` plus `conflicts`.
class StubUnit final : public sc_core::sc_module, public ComputeUnitIf {
 public:
  StubUnit(sc_core::sc_module_name name, Observed& seen, uint64_t cycles, uint64_t conflicts)
      : sc_core::sc_module(name), seen_(seen), cycles_(cycles), conflicts_(conflicts) {}
  TileRun Execute(const WorkItem& item) override {
    seen_.runs.push_back({item, sc_core::sc_time_stamp().value()});
    sc_core::wait(sc_core::sc_time::from_value((cycles_ + conflicts_) * kPeriodPs));
    ++seen_.items_done;
    TileRun run;
    run.cost.cycles = cycles_;
    run.conflict_cycles = conflicts_;
    return run;
  }

 private:
  Observed& seen_;
  uint64_t cycles_, conflicts_;
};

// A small decoder block: a GEMM of several tiles (64 KiB scratchpad, see
// tests/mapping/tiler_test.cc), vector ops, a KV append (a store) and a
// second GEMM. Names are unique so per-op results can be matched.
std::vector<TraceOp> SmallBlock() {
  return {Elementwise(OpKind::kNorm, "attn.norm", 4, 512),
          Gemm("attn.qkv", 4, 384, 512),
          Elementwise(OpKind::kKvAppend, "attn.kv_append", 4, 256),
          Elementwise(OpKind::kResidual, "attn.residual", 4, 512),
          Gemm("ffn.up", 4, 256, 512),
          Elementwise(OpKind::kActivation, "ffn.act", 4, 256)};
}

class SequencerTest : public ::testing::Test {
 protected:
  SequencerTest() { arch_.sram.capacity_kib = 64; }

  // Elaborates the sequencer over `ops` with stub units and memory, runs it
  // to the end and collects its result.
  void Run(const std::vector<TraceOp>& ops) {
    trace_ = std::make_unique<VectorTrace>(VectorTrace::OneStep(ops));
    memory_ = std::make_unique<StubMemory>(seen_);
    sram_ = std::make_unique<Scratchpad>("scratchpad", arch_.sram);
    dma_ = std::make_unique<DmaEngine>("dma", arch_.dma, kPeriodPs, *memory_, *sram_,
                                       uint64_t(arch_.sram.bank_width_bytes));
    tree_ = std::make_unique<StubUnit>("tree_array", seen_, kTreeCycles, kTreeConflicts);
    vector_ = std::make_unique<StubUnit>("vector_unit", seen_, kVectorCycles, kVectorConflicts);
    sequencer_ = std::make_unique<Sequencer>("sequencer", arch_, SimOptions{}, *trace_, *dma_,
                                             *tree_, *vector_);
    sc_core::sc_start();
    sequencer_->RethrowIfFailed();
    ASSERT_TRUE(sequencer_->finished()) << sequencer_->WaitState();
    sequencer_->Collect(result_);
  }
  // The items a fresh tiler cuts `ops` into, in trace order.
  std::vector<WorkItem> Planned(const std::vector<TraceOp>& ops) const {
    Tiler tiler(arch_, SimOptions{});
    std::vector<WorkItem> items;
    for (size_t i = 0; i < ops.size(); ++i)
      tiler.Plan(ops[i], testing::DecodeStep(), int64_t(i), items);
    return items;
  }
  uint64_t CountOn(Unit unit) const {
    return uint64_t(std::count_if(seen_.runs.begin(), seen_.runs.end(),
                                  [unit](const Observed::Run& r) { return r.item.unit == unit; }));
  }

  ArchConfig arch_;
  Observed seen_;
  RunResult result_;

 private:
  std::unique_ptr<VectorTrace> trace_;
  std::unique_ptr<StubMemory> memory_;
  std::unique_ptr<Scratchpad> sram_;
  std::unique_ptr<DmaEngine> dma_;
  std::unique_ptr<StubUnit> tree_, vector_;
  std::unique_ptr<Sequencer> sequencer_;
};

TEST_F(SequencerTest, RunsEveryPlannedTileOnceInTraceOrder) {
  const std::vector<TraceOp> ops = SmallBlock();
  Run(ops);
  const std::vector<WorkItem> planned = Planned(ops);
  ASSERT_GT(planned.size(), ops.size()) << "the GEMMs must take several tiles";
  ASSERT_EQ(seen_.runs.size(), planned.size());
  for (size_t i = 0; i < planned.size(); ++i) {
    EXPECT_EQ(seen_.runs[i].item.op_index, planned[i].op_index) << "tile " << i;
    EXPECT_EQ(seen_.runs[i].item.unit, planned[i].unit) << "tile " << i;
    EXPECT_EQ(seen_.runs[i].item.load_address, planned[i].load_address) << "tile " << i;
  }
}

TEST_F(SequencerTest, ReportsOneResultPerOpInTraceOrder) {
  const std::vector<TraceOp> ops = SmallBlock();
  Run(ops);
  ASSERT_EQ(result_.layers.size(), ops.size());
  for (size_t i = 0; i < ops.size(); ++i) EXPECT_EQ(result_.layers[i].op.name, ops[i].name);
}

// An op retires (its span ends) before the first tile of the next op starts
// computing, so retirements follow trace order.
TEST_F(SequencerTest, RetiresEachOpBeforeTheNextOpComputes) {
  const std::vector<TraceOp> ops = SmallBlock();
  Run(ops);
  ASSERT_EQ(result_.layers.size(), ops.size());
  uint64_t previous_end = 0;
  for (size_t i = 0; i < ops.size(); ++i) {
    const OpResult& layer = result_.layers[i];
    const uint64_t end = layer.start_cycle + layer.cycles;
    EXPECT_GE(end, previous_end) << ops[i].name;
    previous_end = end;
    const auto next =
        std::find_if(seen_.runs.begin(), seen_.runs.end(),
                     [i](const Observed::Run& r) { return r.item.op_index == int64_t(i) + 1; });
    if (next != seen_.runs.end()) {
      EXPECT_LE(end * kPeriodPs, next->start_ps) << ops[i].name;
    }
  }
}

// Fast memory, slow units: the issue thread runs ahead until both slots are
// taken, and never further (docs/engine.md: two slots, double buffering).
TEST_F(SequencerTest, NeverHoldsMoreThanTwoTilesInTheScratchpad) {
  Run({Gemm("ffn.down", 4, 1024, 1024)});
  ASSERT_GT(seen_.loads_started, 3u) << "the GEMM must stream several weight tiles";
  EXPECT_EQ(seen_.most_slots_held, 2u);
}

// With fixed unit costs the causes are known: the array's cycles are busy,
// its conflicts sram_conflict; the vector unit's cycles and conflicts are
// vector_wait; DRAM and the end make up the rest (docs/engine.md, "Stalls").
TEST_F(SequencerTest, ChargesEveryCycleToExactlyOneCause) {
  Run(SmallBlock());
  const StallBreakdown& s = result_.stalls;
  const uint64_t tree_tiles = CountOn(Unit::kTreeArray), vector_tiles = CountOn(Unit::kVectorUnit);
  ASSERT_GT(tree_tiles, 0u);
  ASSERT_GT(vector_tiles, 0u);
  EXPECT_EQ(s.busy, tree_tiles * kTreeCycles);
  EXPECT_EQ(s.sram_conflict, tree_tiles * kTreeConflicts);
  EXPECT_EQ(s.vector_wait, vector_tiles * (kVectorCycles + kVectorConflicts));
  EXPECT_GT(s.dram_wait, 0u) << "the first tile waits for its load";
  EXPECT_EQ(s.total(), result_.cycles);
}

// The whole accelerator on a vector-only trace with two ports (no
// conflicts): the array never computes; the vector unit's busy cycles are
// exactly the vector_wait charge.
TEST(SequencerOnAccelerator, VectorOnlyTraceChargesVectorWaitNotBusy) {
  const ArchConfig arch = DefaultArch({{"sram.ports", "2"}});
  VectorTrace trace = VectorTrace::OneStep({Elementwise(OpKind::kNorm, "norm", 8, 2048),
                                            Elementwise(OpKind::kQuantize, "quant", 8, 2048),
                                            Elementwise(OpKind::kResidual, "residual", 8, 2048)});
  const RunResult run = RunSimulation(arch, trace, SimOptions{});
  EXPECT_EQ(run.stalls.busy, 0u);
  EXPECT_EQ(run.stalls.sram_conflict, 0u);
  EXPECT_GT(run.vector_busy_cycles, 0u);
  EXPECT_EQ(run.stalls.vector_wait, run.vector_busy_cycles);
  EXPECT_EQ(run.stalls.total(), run.cycles);
}

}  // namespace
}  // namespace tritsim
