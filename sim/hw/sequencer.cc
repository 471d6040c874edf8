#include "hw/sequencer.h"

#include <algorithm>
#include <cmath>

#include "common/error.h"
#include "common/interrupt.h"

namespace tritsim {

using sc_core::sc_time;
using sc_core::sc_time_stamp;
using sc_core::wait;

namespace {
uint64_t NowPs() { return sc_time_stamp().value(); }
}  // namespace

Sequencer::Sequencer(sc_core::sc_module_name name, const ArchConfig& arch,
                     const SimOptions& options, TraceSource& trace, DmaEngine& dma,
                     ComputeUnitIf& tree_array, ComputeUnitIf& vector_unit)
    : sc_core::sc_module(name),
      arch_(arch),
      on_op_retired_(options.on_op_retired),
      trace_(trace),
      dma_(dma),
      tree_array_(tree_array),
      vector_unit_(vector_unit),
      tiler_(arch, options),
      period_ps_(tiler_.rates().core_period_ps),
      free_stream_bytes_(tiler_.rates().stream_bytes),
      resource_rates_(RatesOf(arch)) {
  SC_THREAD(IssueThread);
  SC_THREAD(ComputeThread);
}

void Sequencer::Fail(std::exception_ptr error) {
  if (!error_) error_ = error;
  sc_core::sc_stop();
}

void Sequencer::RethrowIfFailed() const {
  if (error_) std::rethrow_exception(error_);
}

std::string Sequencer::WaitState() const {
  return "sequencer issue thread: " + issue_state_ + "; compute thread: " + compute_state_ +
         "; DMA engine: " + dma_.state();
}

size_t Sequencer::ResultIndex(const TraceOp& op) {
  const auto key = std::make_tuple(int(op.phase), op.layer, op.name);
  auto it = layer_index_.find(key);
  if (it != layer_index_.end()) return it->second;
  OpResult fresh;
  fresh.op = op;
  layers_.push_back(fresh);
  layer_index_.emplace(key, layers_.size() - 1);
  return layers_.size() - 1;
}

void Sequencer::IssueThread() {
  try {
    TraceRecord record;
    TraceStep step;
    for (;;) {
      issue_state_ = "the next trace record";
      if (!trace_.next(record)) break;
      if (record.is_step) {
        step = record.step;
        const uint64_t tokens = uint64_t(step.new_tokens());
        if (step.phase == Phase::kPrefill) {
          prefill_tokens_ += tokens;
          saw_prefill_ = true;
        } else {
          decode_tokens_ += tokens;
          ++decode_steps_;
        }
        continue;
      }
      IssueOp(record.op, step);
    }
    trace_done_ = true;
    issue_state_ = "done";
    item_loaded_.notify(sc_core::SC_ZERO_TIME);
  } catch (...) {
    Fail(std::current_exception());
  }
}

void Sequencer::IssueOp(const TraceOp& op, const TraceStep& step) {
  if (InterruptRequested()) {
    ThrowInterrupted("while simulating op " + std::to_string(ops_issued_) + " (" + op.name + ")");
  }
  std::vector<WorkItem> items;
  tiler_.Plan(op, step, ops_issued_, items);
  OpInFlight meta;
  meta.index = ops_issued_++;
  meta.result_index = ResultIndex(op);
  meta.ops = Tiler::OpOps(op, step);
  meta.unit = tiler_.UnitFor(op);
  meta.phase = op.phase;
  meta.step = op.step;
  for (const WorkItem& item : items) meta.dram_bytes += item.load_bytes + item.store_bytes;
  ops_in_flight_.push_back(meta);
  OpInFlight& live = ops_in_flight_.back();
  for (const WorkItem& item : items) {
    if (StreamedBytes(item) > 0) {
      issue_state_ = "room in the scratchpad's stream region for " + op.name;
      while (free_stream_bytes_ < StreamedBytes(item)) wait(slot_freed_);
      free_stream_bytes_ -= StreamedBytes(item);
    }
    if (item.load_after_stores) {
      issue_state_ = "earlier ops to retire before loading " + op.name;
      while (ops_retired_ < live.index) wait(op_retired_);
    }
    if (item.load_bytes > 0) {
      issue_state_ = "the DMA engine to load " + op.name;
      const uint64_t start_ps = dma_.Load(item.load_address, item.load_bytes);
      live.span_start_ps = std::min(live.span_start_ps, start_ps);
    }
    loaded_.push_back(item);
    item_loaded_.notify(sc_core::SC_ZERO_TIME);
  }
}

void Sequencer::AlignToCycle() {
  const uint64_t rem = NowPs() % period_ps_;
  if (rem) wait(sc_time::from_value(period_ps_ - rem));
}

void Sequencer::Charge(uint64_t& bucket) {
  const uint64_t now = NowPs();
  bucket += (now - mark_ps_) / period_ps_;
  mark_ps_ = now;
}

void Sequencer::ComputeThread() {
  try {
    for (;;) {
      compute_state_ = "the next tile to arrive from DRAM";
      while (loaded_.empty() && !trace_done_) wait(item_loaded_);
      if (loaded_.empty()) break;
      AlignToCycle();
      Charge(stalls_.dram_wait);
      const WorkItem item = loaded_.front();
      loaded_.pop_front();
      RunItem(item);
    }
    compute_state_ = "outstanding stores";
    dma_.WaitStoresDone();
    AlignToCycle();
    Charge(stalls_.idle);
    end_ps_ = NowPs();
    finished_ = true;
    compute_state_ = "done";
  } catch (...) {
    Fail(std::current_exception());
  }
}

void Sequencer::RunItem(const WorkItem& item) {
  OpInFlight& op = ops_in_flight_.front();
  if (op.index != item.op_index) throw Error(ExitCode::kInternal, "sequencer: items out of order");
  op.span_start_ps = std::min(op.span_start_ps, NowPs());
  const bool on_array = item.unit == Unit::kTreeArray;
  compute_state_ = on_array ? "the tree array" : "the vector unit";
  const TileRun run = on_array ? tree_array_.Execute(item) : vector_unit_.Execute(item);
  const uint64_t now = NowPs();
  if (on_array) {
    stalls_.busy += run.cost.cycles;
    stalls_.sram_conflict += run.conflict_cycles;
  } else {
    stalls_.vector_wait += run.cost.cycles + run.conflict_cycles;
  }
  mark_ps_ = now;
  if (StreamedBytes(item) > 0) {
    free_stream_bytes_ += StreamedBytes(item);
    slot_freed_.notify(sc_core::SC_ZERO_TIME);
  }
  if (item.store_bytes > 0) dma_.PostStore(item.store_address, item.store_bytes);
  AddEvents(run.cost.events, op.events);
  op.events.sram_reads += run.cost.sram_read_accesses;
  EventCounts transfers;
  dma_.CountTransferEvents(item.load_bytes, item.store_bytes, transfers);
  AddEvents(transfers, op.events);
  AddDemand(item, run, transfers, op.demand);
  if (item.last_of_op) RetireOp(op);
}

void Sequencer::AddDemand(const WorkItem& item, const TileRun& run, const EventCounts& transfers,
                          ResourceDemand& d) const {
  d.dram_bytes += double(item.load_bytes + item.store_bytes);
  d.decoder_bytes += double(run.cost.events.decoder_bytes);
  d.array_products += double(run.cost.events.weight_uses);
  if (item.unit == Unit::kVectorUnit) d.vector_cycles += double(run.cost.cycles);
  d.sram_accesses +=
      double(run.cost.sram_read_accesses + transfers.sram_reads + transfers.sram_writes);
}

// Adds one op instance's demand and bound to its result; the result's
// binding resource is that of all its instances together.
void Sequencer::RecordBounds(const OpInFlight& op, OpResult& result) {
  const ResourceBounds own = BoundsOf(op.demand, resource_rates_);
  result.bound_cycles += uint64_t(std::ceil(own.max_cycles() - 1e-9));
  result.demand.Add(op.demand);
  result.bound_by = BoundsOf(result.demand, resource_rates_).binding;
  result.regime = RegimeOf(result.bound_by);
  phase_demand_[int(op.phase)].Add(op.demand);
}

void Sequencer::RetireOp(OpInFlight& op) {
  compute_state_ = "stores of the retiring op";
  dma_.WaitStoresDone();
  AlignToCycle();
  Charge(stalls_.dram_wait);
  const uint64_t now = NowPs();
  OpResult& result = layers_[op.result_index];
  const uint64_t span_cycles = (now - op.span_start_ps + period_ps_ - 1) / period_ps_;
  if (result.cycles == 0 && result.ops == 0) result.start_cycle = op.span_start_ps / period_ps_;
  result.cycles += span_cycles;
  result.ops += op.ops;
  result.dram_bytes += op.dram_bytes;
  AddEvents(op.events, result.events);
  RecordBounds(op, result);
  total_ops_ += op.ops;
  if (op.phase == Phase::kPrefill) {
    // Every cycle up to `now` is charged (Charge above), so this snapshot
    // sums to the prefill phase's cycles.
    prefill_end_ps_ = now;
    prefill_stalls_ = stalls_;
  }
  if (op.phase == Phase::kDecode && op.step == 0) first_decode_end_ps_ = now;
  const int64_t retired_index = op.index;
  ops_in_flight_.pop_front();
  ++ops_retired_;
  op_retired_.notify(sc_core::SC_ZERO_TIME);
  if (on_op_retired_) on_op_retired_(retired_index);
}

PhaseResult Sequencer::MakePhase(Phase phase, uint64_t cycles, uint64_t tokens,
                                 const StallBreakdown& stalls) const {
  PhaseResult p;
  p.stalls = stalls;
  p.phase = phase;
  p.cycles = cycles;
  p.tokens = tokens;
  p.demand = phase_demand_[int(phase)];
  const ResourceBounds bounds = BoundsOf(p.demand, resource_rates_);
  p.bound_by = bounds.binding;
  p.bound_cycles = uint64_t(std::ceil(bounds.max_cycles() - 1e-9));
  return p;
}

void Sequencer::Collect(RunResult& result) const {
  result.cycles = end_ps_ / period_ps_;
  result.sim_ps = end_ps_;
  result.ops = total_ops_;
  result.stalls = stalls_;
  result.layers = layers_;
  const uint64_t prefill_cycles = saw_prefill_ ? prefill_end_ps_ / period_ps_ : 0;
  const StallBreakdown before_decode = saw_prefill_ ? prefill_stalls_ : StallBreakdown{};
  if (saw_prefill_) {
    result.phases.push_back(
        MakePhase(Phase::kPrefill, prefill_cycles, prefill_tokens_, prefill_stalls_));
  }
  if (decode_steps_ > 0) {
    result.phases.push_back(MakePhase(Phase::kDecode, result.cycles - prefill_cycles,
                                      decode_tokens_, StallsAfter(stalls_, before_decode)));
  }
  result.tokens = decode_tokens_ > 0 ? decode_tokens_ : prefill_tokens_;
  const uint64_t first_ps = saw_prefill_ ? prefill_end_ps_ : first_decode_end_ps_;
  result.first_token_cycles = first_ps / period_ps_;
}

}  // namespace tritsim
