// Figures of a serving run: latency distributions, throughput, SLO
// attainment, and the time-average number of requests in the system (for
// Little's law, L = lambda W; Little 1961). Plain C++.
#pragma once

#include <vector>

#include "serve/batch_scheduler.h"

namespace tritsim {

struct Distribution {
  double mean = 0;
  double p50 = 0;
  double p90 = 0;
  double p99 = 0;
};

// Sample quantiles by linear interpolation between order statistics
// (Hyndman and Fan 1996, definition 7, the common default). Empty: zeros.
Distribution Summarize(std::vector<double> values);

struct ServeSummary {
  int64_t requests = 0;  // served (not refused)
  int64_t refused = 0;
  double throughput_requests_per_second = 0;  // served / end_seconds
  double throughput_tokens_per_second = 0;    // generated tokens / end_seconds
  Distribution ttft, tpot, e2e, queue;        // seconds; tpot over requests of >= 2 tokens
  double slo_attained_fraction = 1;           // of served requests meeting both targets
  double slo_goodput_requests_per_second = 0;
  double joules_per_request = 0;
  double watts = 0;
  double mean_in_system = 0;  // time average of requests arrived and not finished
};

// SLO targets in seconds; <= 0: no target.
ServeSummary Summarize(const ServeOutcome& outcome, double slo_ttft_seconds,
                       double slo_tpot_seconds);

}  // namespace tritsim
