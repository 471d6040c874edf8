// What `tritsim serve` reports: the JSON (docs/serving.md), the per-request
// CSV, the console summary and the plots.
#pragma once

#include <iosfwd>
#include <nlohmann/json_fwd.hpp>
#include <string>
#include <vector>

#include "serve/batch_scheduler.h"
#include "serve/request_stream.h"
#include "serve/serve_stats.h"
#include "serving/engine_step_cost.h"

namespace tritsim {

// One rate of a load sweep (--rates), or a probe of --find-max-rate.
struct LoadPoint {
  double rate = 0;  // offered requests per second
  ServeSummary summary;
  double kv_peak_bytes = 0;
};

struct ServeReport {
  std::string model_name, arch_name;
  std::string requests_file;  // empty: generated from `generator`
  RequestGenerator generator;
  ServePolicy policy;
  double slo_ttft_ms = 0, slo_tpot_ms = 0;  // 0: no target
  ServeOutcome outcome;
  ServeSummary summary;
  int64_t calibration_shapes = 0, child_runs = 0;
  StepTimeCheck check;
  std::vector<LoadPoint> load;  // --rates
  bool searched_max_rate = false;
  bool found_max_rate = false;
  LoadPoint max_rate;  // the highest rate meeting the SLO (--find-max-rate)
};

// The JSON body (schema tritsim.serve/1), without provenance and resolved.
nlohmann::ordered_json ServeJson(const ServeReport& report);

// One row per request: id, arrival, admitted, first token, finish, TTFT,
// TPOT, end-to-end, prompt and output tokens (seconds); refused requests
// have empty times.
std::string ServeCsv(const ServeOutcome& outcome);

void PrintServe(const ServeReport& report, std::ostream& out);

// DIR/occupancy.svg (batch and KV cache over time), DIR/latency.svg
// (distributions of TTFT, TPOT and end-to-end latency) and, with a load
// sweep, DIR/load.svg (p99 latency against throughput).
void WriteServePlots(const std::string& dir, const ServeReport& report);

}  // namespace tritsim
