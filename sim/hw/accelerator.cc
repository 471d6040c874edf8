#include "hw/accelerator.h"

#include "mapping/resource_bounds.h"

namespace tritsim {

Accelerator::Accelerator(sc_core::sc_module_name name, const ArchConfig& arch,
                         const SimOptions& options, TraceSource& trace)
    : sc_core::sc_module(name),
      arch_(arch),
      memory_(MakeMemorySystem(arch.dram)),
      period_ps_(ComputeRates(arch).core_period_ps),
      sram_("scratchpad", arch.sram),
      dma_("dma", arch.dma, period_ps_, *memory_, sram_, uint64_t(arch.sram.bank_width_bytes)),
      tree_array_("tree_array", arch.array, arch.packing, period_ps_, sram_),
      vector_unit_("vector_unit", arch.vector, period_ps_, sram_),
      sequencer_("sequencer", arch, options, trace, dma_, tree_array_, vector_unit_) {
  if (options.dram_log != nullptr) memory_->SetCommandLog(options.dram_log);
  if (options.vcd_path.empty()) return;
  activity_ = std::make_unique<ActivityLog>();
  tree_array_.TraceActivity(activity_.get(), activity_->AddSignal("tree_array_busy"));
  vector_unit_.TraceActivity(activity_.get(), activity_->AddSignal("vector_unit_busy"));
  const int load = activity_->AddSignal("dma_load");
  dma_.TraceActivity(activity_.get(), load, activity_->AddSignal("dma_store"));
}

void Accelerator::CountEvents(RunResult& result) const {
  result.dram = memory_->stats();
  tree_array_.AddEventsTo(result.events);
  vector_unit_.AddEventsTo(result.events);
  result.events.sram_reads = sram_.reads();
  result.events.sram_writes = sram_.writes();
  result.events.dram_bytes_read = dma_.bytes_loaded();
  result.events.dram_bytes_written = dma_.bytes_stored();
  result.events.dram_activates = result.dram.activates;
  result.events.dram_refreshes = result.dram.refreshes;
  result.vector_busy_cycles = vector_unit_.busy_cycles();
  result.sram_port_busy_cycles = sram_.reads() + sram_.writes() + sram_.conflict_cycles();
}

void Accelerator::Snapshot(RunResult& result) const {
  result.stalls = sequencer_.stalls();
  result.cycles = result.stalls.total();
  result.sim_ps = result.cycles * period_ps_;
  result.events = EventCounts();
  CountEvents(result);
}

void Accelerator::Collect(RunResult& result) {
  sequencer_.Collect(result);
  memory_->Finish(sequencer_.end_ps());
  const HardwareRates& rates = sequencer_.rates();
  result.core_mhz = 1e6 / double(period_ps_);
  CountEvents(result);
  result.peak_ops_per_second = rates.array_ops_per_cycle / (double(period_ps_) * 1e-12);
  result.dram_peak_bytes_per_second = rates.dram_bytes_per_cycle / (double(period_ps_) * 1e-12);
  const double hz = 1.0 / (double(period_ps_) * 1e-12);
  const ResourceRates ceilings = RatesOf(arch_);
  result.vector_peak_ops_per_second = rates.vector_ops_per_cycle * hz;
  result.concurrency_bytes_per_second = ceilings.concurrent_bytes * hz;
  const bool decodes =
      arch_.array.kind == ArrayKind::kTernary && arch_.packing.format == TritPacking::kBase3;
  result.decoder_bytes_per_second = decodes ? ceilings.decoder_bytes * hz : 0.0;
}

}  // namespace tritsim
