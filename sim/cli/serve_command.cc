// tritsim serve: a stream of requests on one design point (docs/serving.md).
//
// The scheduler (sim/serve) replays the requests step by step; step times
// come from the cycle-level engine through EngineStepCost (sim/serving),
// which runs representative steps in child processes and estimates the
// rest, then simulates a random sample of the actual steps in detail to
// state its error. A load sweep (--rates) and the search for the highest
// rate meeting the SLO (--find-max-rate) reuse the same step-time model:
// only the scheduler runs again.
#include <unistd.h>
#include <algorithm>
#include <boost/program_options.hpp>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <functional>
#include <iostream>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>

#include "cli/cli_options.h"
#include "cli/commands.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "common/output_paths.h"
#include "model/model_stats.h"
#include "report/resolved_config.h"
#include "serve/batch_scheduler.h"
#include "serve/request_stream.h"
#include "serve/serve_stats.h"
#include "serving/engine_step_cost.h"
#include "serving/serve_report.h"

namespace tritsim {
namespace {

namespace po = boost::program_options;

struct ServeArgs {
  InputOptions in;
  std::string requests_file;
  std::string rate = "", rates, prompt = "128", output = "128", schedule = "prefill-first";
  std::string slo_ttft_ms, slo_tpot_ms;
  int64_t count = 100, max_batch = 16, chunk_tokens = 512, prefill_tokens = 2048;
  int64_t validate_steps = 6, seed = 1, jobs = 2;
  bool find_max_rate = false;
  bool quiet = false;
  std::string json, csv, plots;
};

// A positive, finite number given as text to `option`.
double PositiveNumber(const std::string& text, const std::string& option) {
  char* end = nullptr;
  const double v = std::strtod(text.c_str(), &end);
  if (text.empty() || *end != '\0' || !std::isfinite(v) || v <= 0) {
    throw UsageError(option + ": expected a positive number, got '" + text + "'");
  }
  return v;
}

std::vector<double> RateList(const std::string& text) {
  std::vector<double> rates;
  std::stringstream in(text);
  std::string item;
  while (std::getline(in, item, ',')) rates.push_back(PositiveNumber(item, "--rates"));
  if (rates.empty()) throw UsageError("--rates: expected R1,R2,... requests per second");
  return rates;
}

Schedule ScheduleOption(const std::string& text) {
  if (text == "prefill-first") return Schedule::kPrefillFirst;
  if (text == "chunked") return Schedule::kChunked;
  throw UsageError("--schedule: '" + text + "' is not allowed, allowed prefill-first | chunked");
}

po::options_description Options(ServeArgs& a) {
  po::options_description d("serve options");
  d.add_options()("help,h", "show this help");
  d.add_options()("model", po::value(&a.in.model_path)->value_name("FILE"),
                  "model description (YAML); default: the embedded demo model");
  d.add_options()("arch", po::value(&a.in.arch_path)->value_name("FILE"),
                  "architecture / design point (YAML); default: the embedded demo design");
  d.add_options()("set", po::value(&a.in.overrides)->value_name("KEY=VALUE")->composing(),
                  "override one config key (repeatable)");
  d.add_options()("requests", po::value(&a.requests_file)->value_name("FILE"),
                  "requests from a CSV: arrival_seconds,prompt_tokens,output_tokens");
  d.add_options()("rate", po::value(&a.rate)->value_name("R"),
                  "generated requests: Poisson arrivals, R per second");
  AddIntegerOption(d, "count", 1, a.count, "generated requests (default 100)");
  d.add_options()("prompt-tokens", po::value(&a.prompt)->value_name("SPEC"),
                  "prompt lengths: N or uniform:A:B (default 128)");
  d.add_options()("output-tokens", po::value(&a.output)->value_name("SPEC"),
                  "output lengths: N or uniform:A:B (default 128)");
  AddIntegerOption(d, "seed", 0, a.seed, "seed of the generated requests (default 1)");
  AddIntegerOption(d, "max-batch", 1, a.max_batch, "running sequences at most (default 16)");
  d.add_options()("schedule", po::value(&a.schedule)->value_name("POLICY"),
                  "prefill-first (default) or chunked");
  AddIntegerOption(d, "chunk-tokens", 1, a.chunk_tokens,
                   "chunked: new tokens per step, decodes first (default 512)");
  AddIntegerOption(d, "prefill-tokens", 1, a.prefill_tokens,
                   "prefill-first: prompt tokens per prefill step; a longer prompt runs alone "
                   "(default 2048)");
  d.add_options()("slo-ttft-ms", po::value(&a.slo_ttft_ms)->value_name("MS"),
                  "target time to first token");
  d.add_options()("slo-tpot-ms", po::value(&a.slo_tpot_ms)->value_name("MS"),
                  "target time per output token");
  d.add_options()("rates", po::value(&a.rates)->value_name("R1,R2,..."),
                  "also serve at these rates (a load sweep)");
  d.add_options()("find-max-rate", po::bool_switch(&a.find_max_rate),
                  "search the highest rate whose p99 TTFT and TPOT meet the SLO");
  AddIntegerOption(d, "validate-steps", 0, a.validate_steps,
                   "steps of the run simulated in full detail to measure the step-time error "
                   "(default 6)");
  AddIntegerOption(d, "jobs", 1, a.jobs, "engine runs at once (default 2)");
  d.add_options()("quiet,q", po::bool_switch(&a.quiet), "print nothing but errors");
  d.add_options()("json", po::value(&a.json)->value_name("FILE"), "write the figures as JSON");
  d.add_options()("csv", po::value(&a.csv)->value_name("FILE"), "write one row per request");
  d.add_options()("plots", po::value(&a.plots)->value_name("DIR"),
                  "write occupancy, latency and load plots (SVG, gnuplot)");
  return d;
}

// Keeps a uniform random sample of the steps a cost model is asked about
// (reservoir sampling, Vitter 1985), so validation can simulate some of the
// run's own steps with memory flat in the number of steps.
class SampledSteps : public StepCostModel {
 public:
  SampledSteps(StepCostModel& inner, size_t keep, uint64_t seed)
      : inner_(inner), keep_(keep), bits_(seed) {}
  StepCost Cost(const StepShape& step) override {
    ++seen_;
    if (kept.size() < keep_) {
      kept.push_back(step);
    } else if (keep_ > 0) {
      const uint64_t slot = bits_() % seen_;
      if (slot < keep_) kept[size_t(slot)] = step;
    }
    return inner_.Cost(step);
  }
  double IdleWatts() const override { return inner_.IdleWatts(); }
  std::vector<StepShape> kept;

 private:
  StepCostModel& inner_;
  size_t keep_;
  std::mt19937_64 bits_;
  uint64_t seen_ = 0;
};

// A private folder for the engine runs' traces and reports, removed after.
class WorkDir {
 public:
  WorkDir() {
    std::string pattern =
        (std::filesystem::temp_directory_path() / "tritsim-serve-XXXXXX").string();
    if (::mkdtemp(pattern.data()) == nullptr) {
      throw Error(ExitCode::kInternal, "serve: cannot create a temporary folder");
    }
    path_ = pattern;
  }
  ~WorkDir() {
    std::error_code ec;
    std::filesystem::remove_all(path_, ec);
  }
  const std::string& path() const { return path_; }

 private:
  std::string path_;
};

std::vector<std::string> ArchArgs(const InputOptions& in) {
  std::vector<std::string> args;
  if (!in.arch_path.empty()) args.insert(args.end(), {"--arch", in.arch_path});
  for (const std::string& o : in.overrides) {
    const auto start = o.find_first_not_of(" \t");
    if (start != std::string::npos && o.compare(start, 5, "arch.") == 0) {
      args.insert(args.end(), {"--set", o});
    }
  }
  return args;
}

// The range of step shapes the requests that fit (`fits`) can produce.
CalibrationRange RangeOf(const std::vector<Request>& requests, const ServePolicy& p,
                         const std::function<bool(const Request&)>& fits) {
  CalibrationRange r;
  r.max_batch = p.max_batch;
  r.chunked = p.schedule == Schedule::kChunked;
  r.chunk_tokens = p.chunk_tokens;
  int64_t longest_prompt = 1, shortest_prompt = INT64_MAX, longest = 1, all_prompts = 0;
  for (const Request& q : requests) {
    if (!fits(q)) continue;
    longest_prompt = std::max(longest_prompt, q.prompt_tokens);
    shortest_prompt = std::min(shortest_prompt, q.prompt_tokens);
    longest = std::max(longest, q.prompt_tokens + q.output_tokens);
    all_prompts += q.prompt_tokens;
  }
  r.min_context = shortest_prompt == INT64_MAX ? 1 : shortest_prompt;
  r.max_context = longest;
  r.max_step_tokens = r.chunked ? std::max(p.chunk_tokens, p.max_batch)
                                : std::max({p.max_batch, p.prefill_tokens, longest_prompt});
  // No step holds more than all the requests' prompts.
  r.max_step_tokens = std::min(r.max_step_tokens, std::max(all_prompts, p.max_batch));
  return r;
}

// The KV cache room beside the weights and the activation buffers of the
// biggest step the requests that fit can make (computed twice: a request too
// big for the room must not size the buffers).
CalibrationRange SizeKvCache(const ModelConfig& model, const ArchConfig& arch,
                             const std::vector<Request>& requests, ServePolicy& policy) {
  auto fits_in = [&](double room) {
    return [&policy, room](const Request& q) {
      return double(q.prompt_tokens + q.output_tokens) * policy.kv_bytes_per_token <= room;
    };
  };
  WorkloadConfig step;  // the activation buffers of one step
  step.decode_tokens = 0;
  step.prefill_tokens =
      std::max(policy.max_batch,
               policy.schedule == Schedule::kChunked ? policy.chunk_tokens : policy.prefill_tokens);
  DramCapacity capacity = ComputeDramCapacity(model, arch, step);
  policy.kv_bytes_per_token = capacity.kv_bytes_per_token;
  CalibrationRange range = RangeOf(requests, policy, fits_in(capacity.free_bytes));
  step.prefill_tokens = range.max_step_tokens;
  capacity = ComputeDramCapacity(model, arch, step);
  policy.kv_capacity_bytes = capacity.free_bytes;
  return RangeOf(requests, policy, fits_in(capacity.free_bytes));
}

LoadPoint ServeAt(double rate, RequestGenerator g, const ServePolicy& policy, StepCostModel& cost,
                  double slo_ttft, double slo_tpot) {
  g.rate_per_second = rate;
  const ServeOutcome out = Serve(GenerateRequests(g), policy, cost);
  LoadPoint p;
  p.rate = rate;
  p.summary = Summarize(out, slo_ttft, slo_tpot);
  p.kv_peak_bytes = out.kv_peak_bytes;
  return p;
}

bool MeetsSlo(const LoadPoint& p, double slo_ttft, double slo_tpot) {
  return p.summary.refused == 0 && (slo_ttft <= 0 || p.summary.ttft.p99 <= slo_ttft) &&
         (slo_tpot <= 0 || p.summary.tpot.p99 <= slo_tpot);
}

// Bisection on the rate (the p99 latencies grow with load): the highest rate
// found, within 2%, whose p99 TTFT and TPOT meet the targets.
void FindMaxRate(ServeReport& report, const ServePolicy& policy, StepCostModel& cost,
                 double slo_ttft, double slo_tpot) {
  report.searched_max_rate = true;
  // Start from the throughput the design reached, and bracket.
  double lo = 0, hi = std::max(1e-3, report.summary.throughput_requests_per_second);
  LoadPoint best;
  for (int i = 0; i < 30; ++i) {
    const LoadPoint p = ServeAt(hi, report.generator, policy, cost, slo_ttft, slo_tpot);
    if (!MeetsSlo(p, slo_ttft, slo_tpot)) break;
    lo = hi;
    best = p;
    hi *= 2;
  }
  if (lo == 0) {  // the starting rate misses: search below it
    for (int i = 0; i < 30 && lo == 0; ++i) {
      hi /= 2;
      const LoadPoint p = ServeAt(hi, report.generator, policy, cost, slo_ttft, slo_tpot);
      if (MeetsSlo(p, slo_ttft, slo_tpot)) {
        lo = hi;
        best = p;
        hi *= 2;
      }
    }
    if (lo == 0) return;
  }
  while (hi / lo > 1.02) {
    const double mid = std::sqrt(lo * hi);
    const LoadPoint p = ServeAt(mid, report.generator, policy, cost, slo_ttft, slo_tpot);
    if (MeetsSlo(p, slo_ttft, slo_tpot)) {
      lo = mid;
      best = p;
    } else {
      hi = mid;
    }
  }
  report.found_max_rate = true;
  report.max_rate = best;
}

}  // namespace

int ServeCommand(const Args& args) {
  ServeArgs a;
  po::options_description desc = Options(a);
  if (WantsHelp(args)) {
    PrintHelp(
        "usage: tritsim serve [--model FILE] [--arch FILE] (--requests FILE | --rate R "
        "[--count N] [--prompt-tokens SPEC] [--output-tokens SPEC]) [options]",
        desc);
    return 0;
  }
  po::variables_map vm;
  ParseCommandLine("serve", args, desc, vm);
  if (a.requests_file.empty() == a.rate.empty()) {
    throw UsageError("serve: give either --requests FILE or --rate R (generated requests)");
  }
  if (!a.requests_file.empty()) {
    for (const char* o : {"count", "prompt-tokens", "output-tokens", "seed", "rates"}) {
      if (vm.count(o))
        throw UsageError(std::string("serve: --") + o + " needs --rate, not --requests");
    }
    if (a.find_max_rate) throw UsageError("serve: --find-max-rate needs --rate, not --requests");
  }
  ServeReport report;
  report.generator.count = a.count;
  report.generator.seed = uint64_t(a.seed);
  report.generator.prompt = ParseLengthSpec(a.prompt, "--prompt-tokens");
  report.generator.output = ParseLengthSpec(a.output, "--output-tokens");
  if (!a.rate.empty()) report.generator.rate_per_second = PositiveNumber(a.rate, "--rate");
  const std::vector<double> rates = a.rates.empty() ? std::vector<double>() : RateList(a.rates);
  report.slo_ttft_ms = a.slo_ttft_ms.empty() ? 0 : PositiveNumber(a.slo_ttft_ms, "--slo-ttft-ms");
  report.slo_tpot_ms = a.slo_tpot_ms.empty() ? 0 : PositiveNumber(a.slo_tpot_ms, "--slo-tpot-ms");
  if (a.find_max_rate && report.slo_ttft_ms == 0 && report.slo_tpot_ms == 0) {
    throw UsageError("serve: --find-max-rate needs a target: --slo-ttft-ms and/or --slo-tpot-ms");
  }
  ServePolicy& policy = report.policy;
  policy.max_batch = a.max_batch;
  policy.schedule = ScheduleOption(a.schedule);
  policy.chunk_tokens = a.chunk_tokens;
  policy.prefill_tokens = a.prefill_tokens;
  CheckOutputPaths({{"--json", a.json, OutputKind::kFile},
                    {"--csv", a.csv, OutputKind::kFile},
                    {"--plots", a.plots, OutputKind::kFolder}});

  const ModelConfig model = LoadModel(a.in);
  const ArchConfig arch = LoadArch(a.in);
  report.model_name = model.name;
  report.arch_name = arch.name;
  std::vector<Request> requests;
  if (!a.requests_file.empty()) {
    requests = ReadRequestsCsv(a.requests_file);
    report.requests_file = a.requests_file;
  } else {
    requests = GenerateRequests(report.generator);
  }
  const CalibrationRange range = SizeKvCache(model, arch, requests, policy);

  WorkDir work;
  EngineRunner runner{SelfPath(), ArchArgs(a.in), work.path(), int(a.jobs)};
  EngineStepCost engine(model, runner);
  if (!a.quiet) std::cerr << "tritsim serve: calibrating step times on the engine...\n";
  engine.Calibrate(range);
  SampledSteps sampled(engine, size_t(a.validate_steps), uint64_t(a.seed) ^ 0x5eed);
  report.outcome = Serve(requests, policy, sampled);
  const double slo_ttft = report.slo_ttft_ms / 1e3, slo_tpot = report.slo_tpot_ms / 1e3;
  report.summary = Summarize(report.outcome, slo_ttft, slo_tpot);
  if (report.summary.refused > 0) {
    for (const RequestRecord& r : report.outcome.records) {
      if (!r.refused) continue;
      std::cerr << "tritsim serve: refused " << report.summary.refused
                << " request(s) that can never fit, e.g. request " << r.request.id << ": "
                << r.request.prompt_tokens << " + " << r.request.output_tokens
                << " tokens of KV cache need "
                << uint64_t(double(r.request.prompt_tokens + r.request.output_tokens) *
                            policy.kv_bytes_per_token)
                << " bytes, the DRAM leaves " << uint64_t(policy.kv_capacity_bytes)
                << " after the weights (dram.capacity_gib)\n";
      break;
    }
  }
  if (!sampled.kept.empty()) {
    if (!a.quiet)
      std::cerr << "tritsim serve: simulating " << sampled.kept.size()
                << " steps in detail to measure the step-time error...\n";
    report.check = engine.Validate(sampled.kept);
  }
  report.calibration_shapes = engine.calibration_shapes();
  report.child_runs = engine.child_runs();
  for (double rate : rates) {
    report.load.push_back(ServeAt(rate, report.generator, policy, engine, slo_ttft, slo_tpot));
  }
  if (a.find_max_rate) FindMaxRate(report, policy, engine, slo_ttft, slo_tpot);

  if (!a.json.empty()) {
    nlohmann::ordered_json resolved = {{"model", ResolvedModelJson(model)},
                                       {"arch", ResolvedArchJson(arch)}};
    const nlohmann::ordered_json doc =
        WithOrigin(ServeJson(report), ProvenanceJson(RecordedCommand("serve", args)), resolved);
    WriteFileAtomically(a.json, doc.dump(2) + "\n");
  }
  if (!a.csv.empty()) WriteFileAtomically(a.csv, ServeCsv(report.outcome));
  if (!a.plots.empty()) WriteServePlots(a.plots, report);
  if (!a.quiet) PrintServe(report, std::cout);
  return 0;
}

}  // namespace tritsim
