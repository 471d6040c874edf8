// The DMA engine: the events a tile's transfers cost, and, behind the ideal
// memory (fixed latency, fixed bandwidth), the time a transfer takes. Each
// TEST elaborates once (its own ctest process).
#include "hw/dma_engine.h"

#include <gtest/gtest.h>

#include <cstdint>
#include <memory>

#include <systemc>

#include "config/arch_config.h"
#include "hw/ideal_memory.h"
#include "hw/scratchpad.h"

namespace tritsim {
namespace {

constexpr uint64_t kPeriodPs = 1000;  // 1 GHz core
constexpr uint64_t kBankWidth = 64;
constexpr int kSetupCycles = 16;
constexpr double kLatencyNs = 100.0;
constexpr double kBandwidthGbps = 10.0;  // 10 GB/s: 0.1 ns per byte
constexpr uint64_t kPsPerNs = 1000;

// Ideal-memory time of `bytes` (a whole number of 64-byte bursts) at 10 GB/s, ps.
constexpr uint64_t BusPs(uint64_t bytes) { return bytes * 100; }
constexpr uint64_t kLatencyPs = uint64_t(kLatencyNs) * kPsPerNs;
constexpr uint64_t kSetupPs = uint64_t(kSetupCycles) * kPeriodPs;

// Posts an optional store, then loads; records when the load started and ended.
class TransferDriver : public sc_core::sc_module {
 public:
  SC_HAS_PROCESS(TransferDriver);
  TransferDriver(sc_core::sc_module_name name, DmaEngine& dma, uint64_t store_bytes,
                 uint64_t load_bytes)
      : sc_core::sc_module(name), dma_(dma), store_bytes_(store_bytes), load_bytes_(load_bytes) {
    SC_THREAD(Run);
  }
  uint64_t load_start_ps = 0;
  uint64_t load_done_ps = 0;

 private:
  void Run() {
    if (store_bytes_) dma_.PostStore(1u << 20, store_bytes_);
    load_start_ps = dma_.Load(0, load_bytes_);
    load_done_ps = sc_core::sc_time_stamp().value();
  }
  DmaEngine& dma_;
  uint64_t store_bytes_, load_bytes_;
};

class DmaEngineTest : public ::testing::Test {
 protected:
  DmaEngineTest() {
    dram_.preset = "ideal";
    dram_.ideal_latency_ns = kLatencyNs;
    dram_.ideal_bandwidth_gbps = kBandwidthGbps;
    sram_config_.bank_width_bytes = int64_t(kBankWidth);
    dma_config_.setup_cycles = kSetupCycles;
    dma_config_.max_outstanding = 32;  // 32 x 6.4 ns bursts > 100 ns: the window never throttles
  }
  void Build() {
    memory_ = std::make_unique<IdealMemory>(dram_);
    sram_ = std::make_unique<Scratchpad>("scratchpad", sram_config_);
    dma_ = std::make_unique<DmaEngine>("dma", dma_config_, kPeriodPs, *memory_, *sram_, kBankWidth);
  }
  // Builds the engine and a driver, runs the simulation to the end.
  TransferDriver& Run(uint64_t store_bytes, uint64_t load_bytes) {
    Build();
    driver_ = std::make_unique<TransferDriver>("driver", *dma_, store_bytes, load_bytes);
    sc_core::sc_start();
    return *driver_;
  }

  DramConfig dram_;
  ScratchpadConfig sram_config_;
  DmaConfig dma_config_;
  std::unique_ptr<IdealMemory> memory_;
  std::unique_ptr<Scratchpad> sram_;
  std::unique_ptr<DmaEngine> dma_;

 private:
  std::unique_ptr<TransferDriver> driver_;
};

TEST_F(DmaEngineTest, TransferEventsCountBankAccessesAndDramBytes) {
  Build();
  EventCounts events;
  events.sram_writes = 5;  // the engine adds to what is there
  dma_->CountTransferEvents(1000, 130, events);
  EXPECT_EQ(events.sram_writes, 5u + 16) << "a load writes ceil(1000 / 64) bank accesses";
  EXPECT_EQ(events.sram_reads, 3u) << "a store reads ceil(130 / 64) bank accesses";
  EXPECT_EQ(events.dram_bytes_read, 1000u);
  EXPECT_EQ(events.dram_bytes_written, 130u);
}

// Arithmetic: setup (16 cycles = 16 ns) + 64 KiB at 10 GB/s (6553.6 ns) +
// latency (100 ns) = 6669.6 ns; the engine may round to the core clock.
TEST_F(DmaEngineTest, IdealMemoryLoadTakesSetupPlusLatencyPlusBytesOverBandwidth) {
  constexpr uint64_t kBytes = 64 * 1024;
  const TransferDriver& driver = Run(0, kBytes);
  const uint64_t expected = kSetupPs + kLatencyPs + BusPs(kBytes);
  EXPECT_EQ(driver.load_start_ps, 0u);
  EXPECT_NEAR(double(driver.load_done_ps), double(expected), double(kPeriodPs));
  EXPECT_EQ(dma_->bytes_loaded(), kBytes);
  EXPECT_EQ(sram_->writes(), kBytes / kBankWidth) << "the load writes the scratchpad";
}

// Stores have priority: a store posted before the load runs first, and the
// load starts when it ends; each transfer pays its own setup and latency.
TEST_F(DmaEngineTest, StorePostedBeforeALoadGoesFirst) {
  constexpr uint64_t kStore = 8 * 1024, kLoad = 16 * 1024;
  const TransferDriver& driver = Run(kStore, kLoad);
  const uint64_t store_done = kSetupPs + kLatencyPs + BusPs(kStore);
  EXPECT_NEAR(double(driver.load_start_ps), double(store_done), double(kPeriodPs));
  EXPECT_NEAR(double(driver.load_done_ps),
              double(store_done + kSetupPs + kLatencyPs + BusPs(kLoad)), double(kPeriodPs));
  EXPECT_EQ(dma_->bytes_stored(), kStore);
  EXPECT_EQ(dma_->pending_stores(), 0u);
}

}  // namespace
}  // namespace tritsim
