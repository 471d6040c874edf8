#include "report/workload_bounds.h"

#include <algorithm>
#include <limits>
#include <vector>

#include "hw/trit_decoder.h"
#include "hw/vector_op_cost.h"
#include "mapping/resource_bounds.h"
#include "mapping/sim_options.h"
#include "mapping/tiler.h"
#include "model/trace_builder.h"

namespace tritsim {
namespace {

uint64_t Accesses(uint64_t bytes, const ScratchpadConfig& sram) {
  const uint64_t width = uint64_t(sram.bank_width_bytes);
  return (bytes + width - 1) / width;
}

// A tile's demand, as the units would cost it. SRAM accesses count only the
// DMA's (a lower bound: the units' reads come on top).
ResourceDemand TileDemand(const WorkItem& item, const ArchConfig& arch) {
  ResourceDemand d;
  d.dram_bytes = double(item.load_bytes + item.store_bytes);
  d.sram_accesses =
      double(Accesses(item.load_bytes, arch.sram) + Accesses(item.store_bytes, arch.sram));
  const TileWork& w = item.work;
  if (!w.computes) return d;
  if (item.unit == Unit::kVectorUnit) {
    d.vector_cycles = double(VectorTileCycles(w, arch.vector));
    return d;
  }
  d.array_products = double(w.rows * w.k * w.n);
  const bool decoded = arch.array.kind == ArrayKind::kTernary &&
                       TritDecoder(arch.packing).Expands(w.ternary_weights);
  if (decoded) d.decoder_bytes = double(w.weight_bytes);
  return d;
}

// The tile's cycles on the compute timeline can be no fewer than this: the
// largest of its decoder, tree-array and vector-unit bounds.
double SerialComputeCycles(const ResourceDemand& tile, const ResourceRates& rates) {
  const ResourceBounds b = BoundsOf(tile, rates);
  return std::max({b.cycles[size_t(Resource::kTritDecoder)], b.cycles[size_t(Resource::kTreeArray)],
                   b.cycles[size_t(Resource::kVectorUnit)]});
}

void Finish(PhaseBounds& phase, const ResourceRates& rates, double core_hz) {
  if (!phase.present) return;
  const double serial_seconds = phase.serial_compute_cycles / core_hz;
  phase.serial_compute_tokens_per_second = serial_seconds > 0
                                               ? double(phase.tokens) / serial_seconds
                                               : std::numeric_limits<double>::infinity();
  const ResourceBounds bounds = BoundsOf(phase.demand, rates);
  double lowest = std::numeric_limits<double>::infinity();
  for (size_t r = 0; r < kResourceCount; ++r) {
    const double seconds = bounds.cycles[r] / core_hz;
    phase.tokens_per_second[r] =
        seconds > 0 ? double(phase.tokens) / seconds : std::numeric_limits<double>::infinity();
    if (phase.tokens_per_second[r] < lowest) {
      lowest = phase.tokens_per_second[r];
      phase.bound_by = Resource(r);
    }
  }
}

}  // namespace

WorkloadBounds BoundsOfWorkload(const ModelConfig& model, const ArchConfig& arch,
                                const WorkloadConfig& workload) {
  WorkloadBounds out;
  auto trace = BuildTrace(model, workload);
  Tiler tiler(arch, SimOptions{});
  const ResourceRates rates = RatesOf(arch);
  TraceRecord record;
  TraceStep step;
  std::vector<WorkItem> items;
  int64_t index = 0;
  while (trace->next(record)) {
    if (record.is_step) {
      step = record.step;
      PhaseBounds& phase = step.phase == Phase::kPrefill ? out.prefill : out.decode;
      phase.present = true;
      phase.tokens += uint64_t(step.new_tokens());
      continue;
    }
    items.clear();
    tiler.Plan(record.op, step, index++, items);
    PhaseBounds& phase = record.op.phase == Phase::kPrefill ? out.prefill : out.decode;
    for (const WorkItem& item : items) {
      const ResourceDemand tile = TileDemand(item, arch);
      phase.demand.Add(tile);
      phase.serial_compute_cycles += SerialComputeCycles(tile, rates);
    }
  }
  const double core_hz = 1e12 / double(tiler.rates().core_period_ps);
  Finish(out.prefill, rates, core_hz);
  Finish(out.decode, rates, core_hz);
  return out;
}

}  // namespace tritsim
