#include "serving/serve_report.h"

#include <fmt/format.h>

#include <algorithm>
#include <nlohmann/json.hpp>
#include <ostream>
#include <sstream>

#include "common/csv.h"
#include "report/gnuplot.h"
#include "report/plot_style.h"

namespace tritsim {
namespace {

using Json = nlohmann::ordered_json;

Json DistributionJson(const Distribution& d) {
  return {{"mean", d.mean}, {"p50", d.p50}, {"p90", d.p90}, {"p99", d.p99}};
}

std::string SpecText(const LengthSpec& s) {
  return s.low == s.high ? std::to_string(s.low)
                         : "uniform:" + std::to_string(s.low) + ":" + std::to_string(s.high);
}

Json LatencyJson(const ServeSummary& s) {
  return {{"ttft_seconds", DistributionJson(s.ttft)},
          {"tpot_seconds", DistributionJson(s.tpot)},
          {"e2e_seconds", DistributionJson(s.e2e)},
          {"queue_seconds", DistributionJson(s.queue)}};
}

Json LoadPointJson(const LoadPoint& p) {
  return {{"rate_per_second", p.rate},
          {"throughput_requests_per_second", p.summary.throughput_requests_per_second},
          {"throughput_tokens_per_second", p.summary.throughput_tokens_per_second},
          {"ttft_p99_seconds", p.summary.ttft.p99},
          {"tpot_p99_seconds", p.summary.tpot.p99},
          {"e2e_p99_seconds", p.summary.e2e.p99},
          {"slo_attained_fraction", p.summary.slo_attained_fraction},
          {"joules_per_request", p.summary.joules_per_request},
          {"kv_peak_bytes", p.kv_peak_bytes}};
}

std::string Ms(double seconds) { return fmt::format("{:.2f} ms", seconds * 1e3); }

std::string Time(double seconds) {
  return seconds < 1 ? Ms(seconds) : fmt::format("{:.3f} s", seconds);
}

void PrintDistribution(const char* name, const Distribution& d, std::ostream& out) {
  out << fmt::format("  {:<15} mean {:>10}  p50 {:>10}  p90 {:>10}  p99 {:>10}\n", name,
                     Time(d.mean), Time(d.p50), Time(d.p90), Time(d.p99));
}

// The shared script header (terminal, output file), a key to the right and
// a grid. Series colours are written as placeholders and replaced by the
// shared palette (SeriesStyle) in Render.
std::string Header(const std::string& name, const std::string& what) {
  return GnuplotHeader(name, what, "tritsim serve", 900, 520) +
         "set key outside right top\nset grid\n";
}

void Render(const std::string& dir, const std::string& name, const std::string& data,
            std::string script) {
  const char* placeholders[] = {"#1b6ca8", "#c8553d", "#3f7d20"};
  for (size_t i = 0; i < 3; ++i) {
    const std::string colour = SeriesStyle(i).colour;
    for (size_t at = script.find(placeholders[i]); at != std::string::npos;
         at = script.find(placeholders[i], at + colour.size())) {
      script.replace(at, 7, colour);
    }
  }
  RenderGnuplot(dir, name, data, script);
}

void OccupancyPlot(const std::string& dir, const ServeReport& r) {
  std::ostringstream data;
  data << "# seconds running_sequences kv_cache_mib\n";
  const double mib = 1024.0 * 1024.0;
  // At most ~4000 points: every k-th step.
  const size_t every = std::max<size_t>(1, r.outcome.steps.size() / 4000);
  for (size_t i = 0; i < r.outcome.steps.size(); i += every) {
    const StepSample& s = r.outcome.steps[i];
    data << fmt::format("{:.6g} {} {:.6g}\n", s.start + s.seconds, s.running, s.kv_bytes / mib);
  }
  const std::string script =
      Header("occupancy", "running sequences and KV cache over time") +
      fmt::format(
          "set title \"{} / {}: batch and KV cache over time\"\n"
          "set xlabel \"time since the first arrival (s)\"\n"
          "set ylabel \"running sequences\"\nset y2label \"KV cache held (MiB)\"\n"
          "set ytics nomirror\nset y2tics\nset yrange [0:{}]\nset y2range [0:{:.6g}]\n"
          "plot \"occupancy.dat\" using 1:2 with steps lw 2 lc rgb \"#1b6ca8\" title \"running "
          "sequences (max {})\", \\\n"
          "     \"occupancy.dat\" using 1:3 axes x1y2 with lines lw 2 lc rgb \"#c8553d\" title "
          "\"KV "
          "cache (capacity {:.0f} MiB)\"\n",
          r.arch_name, r.model_name, r.policy.max_batch + 1,
          std::max(std::min(r.policy.kv_capacity_bytes, 1.25 * r.outcome.kv_peak_bytes) / mib,
                   1e-9),
          r.policy.max_batch, r.policy.kv_capacity_bytes / mib);
  Render(dir, "occupancy", data.str(), script);
}

// Empirical distribution functions of the three latencies, in milliseconds.
void LatencyPlot(const std::string& dir, const ServeReport& r) {
  std::vector<double> ttft, tpot, e2e;
  for (const RequestRecord& rec : r.outcome.records) {
    if (rec.refused) continue;
    ttft.push_back(rec.ttft() * 1e3);
    if (rec.request.output_tokens > 1) tpot.push_back(rec.tpot() * 1e3);
    e2e.push_back(rec.e2e() * 1e3);
  }
  std::ostringstream data;
  int block = 0;
  for (auto* v : {&ttft, &tpot, &e2e}) {
    std::sort(v->begin(), v->end());
    data << "# block " << block++ << ": latency_ms cumulative_fraction\n";
    for (size_t i = 0; i < v->size(); ++i) {
      data << fmt::format("{:.6g} {:.6g}\n", (*v)[i], double(i + 1) / double(v->size()));
    }
    data << "\n\n";
  }
  const std::string script =
      Header("latency",
             "distributions of time to first token, time per output token and "
             "end-to-end latency") +
      fmt::format(
          "set title \"{} / {}: latency distributions\"\n"
          "set xlabel \"latency (ms, log scale)\"\nset ylabel \"fraction of requests\"\n"
          "set logscale x\nset yrange [0:1]\n"
          "plot \"latency.dat\" index 0 using 1:2 with steps lw 2 lc rgb \"#1b6ca8\" title "
          "\"time to first token\", \\\n"
          "     \"latency.dat\" index 1 using 1:2 with steps lw 2 lc rgb \"#c8553d\" title \"time "
          "per output token\", \\\n"
          "     \"latency.dat\" index 2 using 1:2 with steps lw 2 lc rgb \"#3f7d20\" title "
          "\"end-to-end\"\n",
          r.arch_name, r.model_name);
  Render(dir, "latency", data.str(), script);
}

void LoadPlot(const std::string& dir, const ServeReport& r) {
  std::ostringstream data;
  data << "# offered_rate throughput_requests_per_second ttft_p99_ms tpot_p99_ms\n";
  for (const LoadPoint& p : r.load) {
    data << fmt::format("{:.6g} {:.6g} {:.6g} {:.6g}\n", p.rate,
                        p.summary.throughput_requests_per_second, p.summary.ttft.p99 * 1e3,
                        p.summary.tpot.p99 * 1e3);
  }
  std::string slo;
  if (r.slo_ttft_ms > 0) {
    slo += fmt::format(
        "set arrow from graph 0, first {0} to graph 1, first {0} nohead dt 2 lc "
        "rgb \"#1b6ca8\"\n",
        r.slo_ttft_ms);
  }
  if (r.slo_tpot_ms > 0) {
    slo += fmt::format(
        "set arrow from graph 0, first {0} to graph 1, first {0} nohead dt 2 lc "
        "rgb \"#c8553d\"\n",
        r.slo_tpot_ms);
  }
  const std::string script =
      Header("load", "p99 latency against served throughput over a load sweep") +
      fmt::format(
          "set title \"{} / {}: latency against load (dashed: SLO targets)\"\n"
          "set xlabel \"served requests per second\"\n"
          "set ylabel \"p99 latency (ms, log scale)\"\nset logscale y\n{}"
          "plot \"load.dat\" using 2:3 with linespoints lw 2 pt 7 lc rgb \"#1b6ca8\" "
          "title \"p99 time to first token\", \\\n"
          "     \"load.dat\" using 2:4 with linespoints lw 2 pt 5 lc rgb \"#c8553d\" "
          "title \"p99 time per output token\"\n",
          r.arch_name, r.model_name, slo);
  Render(dir, "load", data.str(), script);
}

}  // namespace

Json ServeJson(const ServeReport& r) {
  const ServeSummary& s = r.summary;
  Json requests = {{"source", r.requests_file.empty() ? "generated" : "file"},
                   {"file", r.requests_file.empty() ? Json(nullptr) : Json(r.requests_file)},
                   {"count", int64_t(r.outcome.records.size())}};
  if (r.requests_file.empty()) {
    requests["rate_per_second"] = r.generator.rate_per_second;
    requests["prompt_tokens"] = SpecText(r.generator.prompt);
    requests["output_tokens"] = SpecText(r.generator.output);
    requests["seed"] = r.generator.seed;
  }
  Json j = {{"schema", "tritsim.serve/1"},
            {"design", {{"arch", r.arch_name}, {"model", r.model_name}}},
            {"requests", requests},
            {"policy",
             {{"max_batch", r.policy.max_batch},
              {"schedule", ScheduleName(r.policy.schedule)},
              {"chunk_tokens", r.policy.schedule == Schedule::kChunked ? Json(r.policy.chunk_tokens)
                                                                       : Json(nullptr)},
              {"prefill_tokens", r.policy.schedule == Schedule::kPrefillFirst
                                     ? Json(r.policy.prefill_tokens)
                                     : Json(nullptr)}}},
            {"serve",
             {{"requests", s.requests},
              {"refused", s.refused},
              {"steps", int64_t(r.outcome.steps.size())},
              {"seconds", r.outcome.end_seconds},
              {"busy_seconds", r.outcome.busy_seconds},
              {"generated_tokens", r.outcome.generated_tokens},
              {"throughput_requests_per_second", s.throughput_requests_per_second},
              {"throughput_tokens_per_second", s.throughput_tokens_per_second},
              {"mean_requests_in_system", s.mean_in_system}}},
            {"latency", LatencyJson(s)},
            {"slo",
             {{"ttft_ms", r.slo_ttft_ms > 0 ? Json(r.slo_ttft_ms) : Json(nullptr)},
              {"tpot_ms", r.slo_tpot_ms > 0 ? Json(r.slo_tpot_ms) : Json(nullptr)},
              {"attained_fraction", s.slo_attained_fraction},
              {"goodput_requests_per_second", s.slo_goodput_requests_per_second}}},
            {"energy",
             {{"joules", r.outcome.joules},
              {"joules_per_request", s.joules_per_request},
              {"watts", s.watts}}},
            {"capacity",
             {{"kv_capacity_bytes", r.policy.kv_capacity_bytes},
              {"kv_bytes_per_token", r.policy.kv_bytes_per_token},
              {"kv_peak_bytes", r.outcome.kv_peak_bytes},
              {"kv_reserved_peak_bytes", r.outcome.kv_reserved_peak_bytes}}},
            {"step_time",
             {{"method",
               "engine runs of representative steps at 2 and 3 blocks, extrapolated to "
               "all blocks, and a weighted regression over step shapes"},
              {"calibration_shapes", r.calibration_shapes},
              {"child_runs", r.child_runs},
              {"validated_steps", r.check.steps},
              {"mean_abs_relative_error", r.check.mean_abs_relative_error},
              {"max_abs_relative_error", r.check.max_abs_relative_error},
              {"busy_relative_error", r.check.busy_relative_error},
              {"energy_relative_error", r.check.energy_relative_error}}}};
  if (!r.load.empty()) {
    Json load = Json::array();
    for (const LoadPoint& p : r.load) load.push_back(LoadPointJson(p));
    j["load_sweep"] = load;
  }
  if (r.searched_max_rate) {
    j["max_rate"] = r.found_max_rate ? LoadPointJson(r.max_rate) : Json(nullptr);
  }
  return j;
}

std::string ServeCsv(const ServeOutcome& outcome) {
  std::string text =
      CsvLine({"id", "arrival_seconds", "admitted_seconds", "first_token_seconds", "finish_seconds",
               "ttft_seconds", "tpot_seconds", "e2e_seconds", "prompt_tokens", "output_tokens"});
  auto num = [](double v) { return fmt::format("{:.9g}", v); };
  for (const RequestRecord& r : outcome.records) {
    const Request& q = r.request;
    if (r.refused) {
      text += CsvLine({std::to_string(q.id), num(q.arrival_seconds), "", "", "", "", "", "",
                       std::to_string(q.prompt_tokens), std::to_string(q.output_tokens)});
      continue;
    }
    text += CsvLine({std::to_string(q.id), num(q.arrival_seconds), num(r.admitted),
                     num(r.first_token), num(r.finish), num(r.ttft()), num(r.tpot()), num(r.e2e()),
                     std::to_string(q.prompt_tokens), std::to_string(q.output_tokens)});
  }
  return text;
}

void PrintServe(const ServeReport& r, std::ostream& out) {
  const ServeSummary& s = r.summary;
  out << "tritsim serve: model " << r.model_name << ", design " << r.arch_name << "\n";
  out << fmt::format("  requests        {} served, {} refused; {} steps ({}, max batch {})\n",
                     s.requests, s.refused, r.outcome.steps.size(), ScheduleName(r.policy.schedule),
                     r.policy.max_batch);
  out << fmt::format("  throughput      {:.4g} requests/s, {:.4g} tokens/s over {}\n",
                     s.throughput_requests_per_second, s.throughput_tokens_per_second,
                     Time(r.outcome.end_seconds));
  PrintDistribution("TTFT", s.ttft, out);
  PrintDistribution("TPOT", s.tpot, out);
  PrintDistribution("end-to-end", s.e2e, out);
  PrintDistribution("queueing", s.queue, out);
  if (r.slo_ttft_ms > 0 || r.slo_tpot_ms > 0) {
    out << fmt::format("  SLO             {:.1f}% of requests meet it; goodput {:.3f} requests/s\n",
                       100 * s.slo_attained_fraction, s.slo_goodput_requests_per_second);
  }
  out << fmt::format("  energy          {:.4g} J per request, {:.2f} W average\n",
                     s.joules_per_request, s.watts);
  out << fmt::format("  KV cache        peak {:.1f} MiB of {:.1f} MiB\n",
                     r.outcome.kv_peak_bytes / 1048576.0, r.policy.kv_capacity_bytes / 1048576.0);
  out << fmt::format(
      "  step times      from {} engine runs; {} steps simulated in detail: mean error {:.1f}%, "
      "max {:.1f}%, busy time {:+.1f}%\n",
      r.child_runs, r.check.steps, 100 * r.check.mean_abs_relative_error,
      100 * r.check.max_abs_relative_error, 100 * r.check.busy_relative_error);
  for (const LoadPoint& p : r.load) {
    out << fmt::format(
        "  load {:>9.4g}/s served {:.4g}/s, p99 TTFT {}, p99 TPOT {}, SLO met {:.1f}%\n", p.rate,
        p.summary.throughput_requests_per_second, Time(p.summary.ttft.p99),
        Time(p.summary.tpot.p99), 100 * p.summary.slo_attained_fraction);
  }
  if (r.searched_max_rate) {
    if (r.found_max_rate) {
      out << fmt::format(
          "  serving capacity {:.4g} requests/s offered ({:.4g} served) with p99 TTFT and TPOT "
          "within the SLO, {:.4g} J per request\n",
          r.max_rate.rate, r.max_rate.summary.throughput_requests_per_second,
          r.max_rate.summary.joules_per_request);
    } else {
      out << "  serving capacity none: even the lowest rate tried misses the SLO\n";
    }
  }
  out << "  Model estimates for architecture exploration, not sign-off numbers.\n";
}

void WriteServePlots(const std::string& dir, const ServeReport& report) {
  OccupancyPlot(dir, report);
  LatencyPlot(dir, report);
  if (!report.load.empty()) LoadPlot(dir, report);
}

}  // namespace tritsim
