#include "serve/serve_stats.h"

#include <algorithm>
#include <cmath>

namespace tritsim {
namespace {

double Quantile(const std::vector<double>& sorted, double p) {
  const double h = (double(sorted.size()) - 1) * p;
  const size_t lo = size_t(std::floor(h));
  const size_t hi = std::min(lo + 1, sorted.size() - 1);
  return sorted[lo] + (h - double(lo)) * (sorted[hi] - sorted[lo]);
}

bool Meets(double value, double target) { return target <= 0 || value <= target; }

}  // namespace

Distribution Summarize(std::vector<double> values) {
  Distribution d;
  if (values.empty()) return d;
  std::sort(values.begin(), values.end());
  double sum = 0;
  for (double v : values) sum += v;
  d.mean = sum / double(values.size());
  d.p50 = Quantile(values, 0.50);
  d.p90 = Quantile(values, 0.90);
  d.p99 = Quantile(values, 0.99);
  return d;
}

ServeSummary Summarize(const ServeOutcome& outcome, double slo_ttft_seconds,
                       double slo_tpot_seconds) {
  ServeSummary s;
  std::vector<double> ttft, tpot, e2e, queue;
  int64_t met = 0;
  double in_system_seconds = 0;  // integral of the number in system over time
  for (const RequestRecord& r : outcome.records) {
    if (r.refused) continue;
    ++s.requests;
    ttft.push_back(r.ttft());
    if (r.request.output_tokens > 1) tpot.push_back(r.tpot());
    e2e.push_back(r.e2e());
    queue.push_back(r.queue());
    in_system_seconds += r.e2e();
    if (Meets(r.ttft(), slo_ttft_seconds) && Meets(r.tpot(), slo_tpot_seconds)) ++met;
  }
  s.refused = outcome.refused;
  s.ttft = Summarize(ttft);
  s.tpot = Summarize(tpot);
  s.e2e = Summarize(e2e);
  s.queue = Summarize(queue);
  const double span = outcome.end_seconds;
  if (span > 0) {
    s.throughput_requests_per_second = double(s.requests) / span;
    s.throughput_tokens_per_second = double(outcome.generated_tokens) / span;
    s.slo_goodput_requests_per_second = double(met) / span;
    s.watts = outcome.joules / span;
    s.mean_in_system = in_system_seconds / span;
  }
  if (s.requests > 0) {
    s.slo_attained_fraction = double(met) / double(s.requests);
    s.joules_per_request = outcome.joules / double(s.requests);
  }
  return s;
}

}  // namespace tritsim
