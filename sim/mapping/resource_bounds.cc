#include "mapping/resource_bounds.h"

#include <algorithm>

#include "common/int_math.h"
#include "config/dram_presets.h"
#include "mapping/tiler.h"

namespace tritsim {
namespace {

// Bytes one DRAM request moves: a burst; the ideal memory's fixed 64-byte
// requests (sim/hw/ideal_memory.h).
constexpr double kIdealRequestBytes = 64.0;

double RequestBytes(const DramConfig& dram) {
  return dram.is_ideal() ? kIdealRequestBytes : double(DramBurstBytes(dram));
}

double Per(double amount, double rate) { return rate > 0.0 ? amount / rate : 0.0; }

}  // namespace

ResourceRates RatesOf(const ArchConfig& arch) {
  const HardwareRates hw = ComputeRates(arch);
  const double period_ns = double(hw.core_period_ps) / 1000.0;
  ResourceRates r;
  r.dram_bytes = hw.dram_bytes_per_cycle;
  const double latency_cycles = DramShortestLatencyNs(arch.dram) / period_ns;
  r.concurrent_bytes =
      double(arch.dma.max_outstanding) * RequestBytes(arch.dram) / std::max(1.0, latency_cycles);
  r.decoder_bytes = double(arch.packing.decoder_bytes_per_cycle);
  r.array_products = double(arch.array.trees) * double(arch.array.fan_in);
  r.sram_accesses = double(arch.sram.banks) * double(arch.sram.ports);
  return r;
}

ResourceBounds BoundsOf(const ResourceDemand& d, const ResourceRates& r) {
  ResourceBounds b;
  b.cycles[size_t(Resource::kDramBandwidth)] = Per(d.dram_bytes, r.dram_bytes);
  b.cycles[size_t(Resource::kRequestConcurrency)] = Per(d.dram_bytes, r.concurrent_bytes);
  b.cycles[size_t(Resource::kTritDecoder)] = Per(d.decoder_bytes, r.decoder_bytes);
  b.cycles[size_t(Resource::kTreeArray)] = Per(d.array_products, r.array_products);
  b.cycles[size_t(Resource::kVectorUnit)] = d.vector_cycles;
  b.cycles[size_t(Resource::kSramPorts)] = Per(d.sram_accesses, r.sram_accesses);
  const auto most = std::max_element(b.cycles.begin(), b.cycles.end());
  b.binding = Resource(most - b.cycles.begin());
  return b;
}

}  // namespace tritsim
