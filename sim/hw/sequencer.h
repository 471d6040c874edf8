// Sequencer: takes trace ops in order and drives the hardware.
//
// Two SC_THREADs share a bounded queue of work items (the tiler's tiles):
//  - IssueThread pulls records from the trace, plans each op with the
//    Tiler, and for every item that streams weights or KV entries in waits
//    for room in the scratchpad's stream region (half the capacity, at least
//    two tiles: double buffering and deeper prefetch), then loads them
//    through the DMA engine. Items that stream nothing (vector work on
//    on-chip activations, spilled activations, which live in the activation
//    half) take no room, so the next op's weights stream in while the
//    current op computes. A load of data an earlier op stored (spilled activations, the
//    KV cache just appended) waits until those ops have retired.
//  - ComputeThread takes loaded items in order and runs them on the tree
//    array or the vector unit, posts their stores, and retires an op when
//    its last item has run and its stores have reached DRAM.
// The compute thread's timeline is the tree array's: every core cycle of the
// run is charged to exactly one StallBreakdown cause.
#pragma once

#include <algorithm>
#include <cstdint>
#include <deque>
#include <exception>
#include <map>
#include <string>
#include <tuple>
#include <vector>

#include <systemc>

#include "hw/compute_unit.h"
#include "hw/dma_engine.h"
#include "mapping/resource_bounds.h"
#include "mapping/tiler.h"
#include "results/run_result.h"
#include "trace/trace_source.h"

namespace tritsim {

class Sequencer : public sc_core::sc_module {
 public:
  SC_HAS_PROCESS(Sequencer);
  Sequencer(sc_core::sc_module_name name, const ArchConfig& arch, const SimOptions& options,
            TraceSource& trace, DmaEngine& dma, ComputeUnitIf& tree_array,
            ComputeUnitIf& vector_unit);

  bool finished() const { return finished_; }
  // Rethrows an error raised inside a thread (bad trace record, tile too big).
  void RethrowIfFailed() const;
  // For the watchdog: what each thread is waiting for.
  std::string WaitState() const;

  // Fills the timing fields of `result` (cycles, phases, layers, stalls).
  void Collect(RunResult& result) const;
  // While running: the stalls charged so far (they sum to the cycles up to
  // the last charge) and the per-op results of the ops retired so far.
  const StallBreakdown& stalls() const { return stalls_; }
  const std::vector<OpResult>& op_results() const { return layers_; }
  const HardwareRates& rates() const { return tiler_.rates(); }
  uint64_t end_ps() const { return end_ps_; }

 private:
  struct OpInFlight {
    int64_t index = 0;
    size_t result_index = 0;  // into layers_
    uint64_t span_start_ps = UINT64_MAX;
    uint64_t ops = 0;
    uint64_t dram_bytes = 0;
    Unit unit = Unit::kTreeArray;
    Phase phase = Phase::kDecode;
    int64_t step = 0;
    EventCounts events;
    ResourceDemand demand;
  };

  void IssueThread();
  void ComputeThread();
  void IssueOp(const TraceOp& op, const TraceStep& step);
  void RunItem(const WorkItem& item);
  // Bytes of the stream region an item occupies from its load until it has
  // run; a load larger than the region (a whole embedding gather) waits for
  // the region to empty and takes all of it.
  uint64_t StreamedBytes(const WorkItem& item) const {
    const bool streamed =
        item.load_kind == LoadKind::kWeights || item.load_kind == LoadKind::kKvCache;
    return streamed ? std::min(item.load_bytes, tiler_.rates().stream_bytes) : 0;
  }
  void RetireOp(OpInFlight& op);
  void AddDemand(const WorkItem& item, const TileRun& run, const EventCounts& transfers,
                 ResourceDemand& demand) const;
  void RecordBounds(const OpInFlight& op, OpResult& result);
  PhaseResult MakePhase(Phase phase, uint64_t cycles, uint64_t tokens,
                        const StallBreakdown& stalls) const;
  void Charge(uint64_t& bucket);
  void AlignToCycle();
  size_t ResultIndex(const TraceOp& op);
  void Fail(std::exception_ptr error);

  ArchConfig arch_;
  std::function<void(int64_t)> on_op_retired_;
  TraceSource& trace_;
  DmaEngine& dma_;
  ComputeUnitIf& tree_array_;
  ComputeUnitIf& vector_unit_;
  Tiler tiler_;
  uint64_t period_ps_;

  uint64_t free_stream_bytes_;  // room left in the stream region
  ResourceRates resource_rates_;
  std::deque<WorkItem> loaded_;           // issue -> compute
  std::deque<OpInFlight> ops_in_flight_;  // planned, not yet retired
  int64_t ops_issued_ = 0;
  int64_t ops_retired_ = 0;
  bool trace_done_ = false;
  bool finished_ = false;
  std::exception_ptr error_;
  sc_core::sc_event slot_freed_;
  sc_core::sc_event item_loaded_;
  sc_core::sc_event op_retired_;
  std::string issue_state_ = "not started";
  std::string compute_state_ = "not started";

  // Accounting on the compute timeline.
  uint64_t mark_ps_ = 0;
  StallBreakdown stalls_;
  StallBreakdown prefill_stalls_;  // stalls_ when the last prefill op retired
  uint64_t end_ps_ = 0;
  bool saw_prefill_ = false;
  uint64_t prefill_end_ps_ = 0;
  uint64_t first_decode_end_ps_ = 0;
  int64_t decode_steps_ = 0;
  uint64_t prefill_tokens_ = 0;
  uint64_t decode_tokens_ = 0;
  uint64_t total_ops_ = 0;
  std::vector<OpResult> layers_;
  ResourceDemand phase_demand_[2];  // indexed by Phase
  std::map<std::tuple<int, int64_t, std::string>, size_t> layer_index_;
};

}  // namespace tritsim
