// The reports of one `tritsim run`: the JSON document (schema versioned),
// the per-layer CSV and the console summary. Reads a RunResult and its
// energy and area; computes nothing the units did not measure beyond
// ratios and unit conversions.
#pragma once

#include <ostream>
#include <string>

#include <nlohmann/json_fwd.hpp>

#include "config/arch_config.h"
#include "config/workload_config.h"
#include "energy/area_model.h"
#include "energy/energy_model.h"
#include "results/run_result.h"

namespace tritsim {

inline constexpr const char* kRunSchema = "tritsim.run/1";

struct RunReport {
  const ArchConfig& arch;
  const WorkloadConfig& workload;
  const RunResult& run;
  const EnergyBreakdown& energy;
  const AreaBreakdown& area;
  const EnergyTable& table;  // the resolved table `energy` was priced with
};

// Derived headline figures, shared by the JSON, the console and sweeps.
struct Headline {
  double seconds = 0;
  double tokens_per_second = 0;
  double time_to_first_token_seconds = 0;
  double time_per_output_token_seconds = 0;  // decode phase / decode tokens per sequence
  double joules_per_token = 0;
  double picojoules_per_op = 0;
  double dram_bandwidth_bytes_per_second = 0;
  double dram_bus_utilization = 0;
  double refresh_fraction = 0;
  double tree_utilization = 0;
  double vector_utilization = 0;
  double sram_port_utilization = 0;
  double memory_bound_cycle_share = 0;  // share of layer cycles in memory-bound layers
};
Headline ComputeHeadline(const RunReport& report);

// Per-phase headline figures. Joules: the phase's layers' own energy plus
// the energy no layer carries (leakage, DRAM activates and refreshes)
// shared out by the phase's share of the run's cycles, so the phases' joules
// add up to the run's.
struct PhaseFigures {
  double seconds = 0.0;
  double tokens_per_second = 0.0;
  double joules = 0.0;
  double joules_per_token = 0.0;
  double watts = 0.0;  // average power over the phase
  // `joules` by component: each component of the phase's layers plus the
  // phase's cycle share of that component's energy no layer carries (all of
  // leakage; DRAM activates and refreshes), so the components sum to
  // `joules` and each sums over the phases to the run's.
  EnergyBreakdown energy;
};
PhaseFigures ComputePhaseFigures(const RunReport& report, const PhaseResult& phase);

nlohmann::ordered_json RunJson(const RunReport& report);
std::string RunCsv(const RunReport& report);
void PrintRunSummary(const RunReport& report, std::ostream& out);

}  // namespace tritsim
