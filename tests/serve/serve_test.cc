// The serving scheduler against queueing theory and its own invariants.
// Step costs come from small fixed models here, so each check is exact or
// statistical in the textbook sense; the engine-backed cost model is tested
// by the serve CLI tests.
#include <cmath>
#include <numeric>

#include <gtest/gtest.h>

#include "common/error.h"
#include "serve/batch_scheduler.h"
#include "serve/request_stream.h"
#include "serve/serve_stats.h"

namespace tritsim {
namespace {

// A step costs `prefill` seconds when it holds a prompt token, else
// `decode`, whatever its size: a deterministic service time.
class FixedCost : public StepCostModel {
 public:
  FixedCost(double prefill, double decode) : prefill_(prefill), decode_(decode) {}
  StepCost Cost(const StepShape& step) override {
    bool prompt = false;
    for (const auto& s : step.sequences) prompt |= s.tokens > 1 || s.context == 0;
    ++steps;
    return StepCost{prompt ? prefill_ : decode_, 1.0};
  }
  double IdleWatts() const override { return 0.5; }
  int64_t steps = 0;

 private:
  double prefill_, decode_;
};

// Keeps every step it is asked about; a step costs `per_token` seconds per
// new token plus `fixed`, no energy.
class RecordingCost : public StepCostModel {
 public:
  RecordingCost(double per_token, double fixed) : per_token_(per_token), fixed_(fixed) {}
  StepCost Cost(const StepShape& step) override {
    shapes.push_back(step);
    return StepCost{per_token_ * double(step.tokens()) + fixed_, 0};
  }
  double IdleWatts() const override { return 0; }
  std::vector<StepShape> shapes;

 private:
  double per_token_, fixed_;
};

std::vector<Request> Poisson(double rate, int64_t count, int64_t prompt, int64_t output,
                             uint64_t seed) {
  RequestGenerator g;
  g.rate_per_second = rate;
  g.count = count;
  g.prompt = {prompt, prompt};
  g.output = {output, output};
  g.seed = seed;
  return GenerateRequests(g);
}

ServePolicy OneAtATime() {
  ServePolicy p;
  p.max_batch = 1;
  p.kv_capacity_bytes = 1e12;
  p.kv_bytes_per_token = 1;
  return p;
}

// Mean queueing delay with a 99.7% half-width from batch means (Law and
// Kelton, Simulation Modeling and Analysis, 2000, section 9.5.3: 20 batches).
struct BatchMeans {
  double mean = 0, half_width = 0;
};
BatchMeans QueueDelay(const ServeOutcome& out, size_t warmup) {
  const size_t batches = 20;
  const size_t per = (out.records.size() - warmup) / batches;
  std::vector<double> means;
  for (size_t b = 0; b < batches; ++b) {
    double sum = 0;
    for (size_t i = 0; i < per; ++i) sum += out.records[warmup + b * per + i].queue();
    means.push_back(sum / double(per));
  }
  BatchMeans m;
  m.mean = std::accumulate(means.begin(), means.end(), 0.0) / double(batches);
  double ss = 0;
  for (double x : means) ss += (x - m.mean) * (x - m.mean);
  const double sd = std::sqrt(ss / double(batches - 1));
  m.half_width = 3.0 * sd / std::sqrt(double(batches));
  return m;
}

// Pollaczek-Khinchine for M/D/1 (Kleinrock, Queueing Systems vol. 1, 1975):
// Wq = rho S / (2 (1 - rho)). One request at a time, a prompt step of 0.4 s
// and three decode steps of 0.2 s: a deterministic service time S = 1 s.
void ExpectMd1(double rho, uint64_t seed) {
  const double service = 1.0;
  FixedCost cost(0.4, 0.2);
  const auto requests = Poisson(rho / service, 200000, 16, 4, seed);
  const ServeOutcome out = Serve(requests, OneAtATime(), cost);
  for (const auto& r : out.records) ASSERT_NEAR(r.finish - r.admitted, service, 1e-9);
  const BatchMeans wq = QueueDelay(out, 2000);
  const double expected = rho * service / (2.0 * (1.0 - rho));
  EXPECT_NEAR(wq.mean, expected, wq.half_width)
      << "rho " << rho << ": simulated Wq " << wq.mean << " +- " << wq.half_width;
  EXPECT_LT(wq.half_width, 0.08 * expected) << "the estimate is too loose to test anything";
}

TEST(ServeQueueing, MeanQueueDelayMatchesPollaczekKhinchineForMD1AtHalfLoad) { ExpectMd1(0.5, 11); }

TEST(ServeQueueing, MeanQueueDelayMatchesPollaczekKhinchineForMD1AtEightyPercentLoad) {
  ExpectMd1(0.8, 12);
}

// Little's law (Little 1961): the time-average number of requests in the
// system equals the arrival rate times the mean time in system. At rho 0.8,
// M/D/1 gives L = lambda (Wq + S) = 0.8 x (2 + 1) = 2.4.
TEST(ServeQueueing, LittlesLawHolds) {
  FixedCost cost(0.4, 0.2);
  const double rate = 0.8;
  const auto requests = Poisson(rate, 200000, 16, 4, 13);
  const ServeOutcome out = Serve(requests, OneAtATime(), cost);
  const ServeSummary s = Summarize(out, 0, 0);
  EXPECT_NEAR(s.mean_in_system, rate * s.e2e.mean, 0.02 * s.mean_in_system);
  EXPECT_NEAR(s.mean_in_system, 2.4, 0.1);
}

// At a vanishing rate nobody waits: TTFT is the prefill step, TPOT the
// decode step (definitions; common practice).
TEST(ServeLatency, AtAVanishingRateTtftIsThePrefillAndTpotTheDecodeStep) {
  FixedCost cost(0.3, 0.02);
  const auto requests = Poisson(1e-3, 50, 64, 10, 14);
  ServePolicy p = OneAtATime();
  p.max_batch = 8;
  const ServeSummary s = Summarize(Serve(requests, p, cost), 0, 0);
  EXPECT_NEAR(s.ttft.p99, 0.3, 1e-9);
  EXPECT_NEAR(s.tpot.p50, 0.02, 1e-9);
  EXPECT_NEAR(s.queue.p99, 0.0, 1e-12);
}

// At saturation every step decodes max_batch sequences (between prefills),
// so output tokens/s approaches max_batch / decode step time.
TEST(ServeLatency, AtSaturationThroughputApproachesTheBatchLimitedBound) {
  FixedCost cost(0.001, 0.01);
  const auto requests = Poisson(1e6, 4000, 8, 200, 15);
  ServePolicy p = OneAtATime();
  p.max_batch = 16;
  const ServeOutcome out = Serve(requests, p, cost);
  // Tokens of decode steps (the first token of each request comes from its prefill).
  const double decoded = double(out.generated_tokens - int64_t(requests.size()));
  const double rate = decoded / out.end_seconds;
  const double bound = 16 / 0.01;
  EXPECT_LE(rate, bound * (1 + 1e-9));
  EXPECT_GT(rate, 0.95 * bound);
}

TEST(ServeCapacity, NeverHoldsMoreKvCacheThanTheCapacityAndRefusesWhatCanNeverFit) {
  FixedCost cost(0.05, 0.01);
  RequestGenerator g;
  g.rate_per_second = 50;
  g.count = 400;
  g.prompt = {16, 400};
  g.output = {1, 300};
  g.seed = 16;
  auto requests = GenerateRequests(g);
  requests[7].prompt_tokens = 5000;  // 5000 + output > 4096 tokens: can never fit
  ServePolicy p;
  p.max_batch = 32;
  p.kv_bytes_per_token = 1024;
  p.kv_capacity_bytes = 4096 * 1024.0;
  const ServeOutcome out = Serve(requests, p, cost);
  EXPECT_EQ(out.refused, 1);
  EXPECT_TRUE(out.records[7].refused);
  EXPECT_LE(out.kv_reserved_peak_bytes, p.kv_capacity_bytes);
  EXPECT_LE(out.kv_peak_bytes, out.kv_reserved_peak_bytes);
  EXPECT_GT(out.kv_peak_bytes, 0.5 * p.kv_capacity_bytes) << "the test never loaded the cache";
  for (const auto& s : out.steps) EXPECT_LE(s.kv_bytes, p.kv_capacity_bytes);
  EXPECT_DOUBLE_EQ(out.steps.back().kv_bytes, 0.0) << "every finished request frees its cache";
}

// Chunked prefill (Agrawal et al. 2024): decodes first, then prompt chunks
// up to the token budget; every prompt token is computed exactly once and
// every request produces exactly its output tokens.
TEST(ServeSchedule, ChunkedStepsKeepTheTokenBudgetAndConserveTokens) {
  RecordingCost cost(0.001, 0.01);
  RequestGenerator g;
  g.rate_per_second = 200;
  g.count = 300;
  g.prompt = {1, 700};
  g.output = {1, 50};
  g.seed = 17;
  const auto requests = GenerateRequests(g);
  ServePolicy p;
  p.max_batch = 12;
  p.schedule = Schedule::kChunked;
  p.chunk_tokens = 256;
  p.kv_capacity_bytes = 1e12;
  p.kv_bytes_per_token = 1;
  const ServeOutcome out = Serve(requests, p, cost);
  int64_t tokens = 0, want = 0, generated = 0;
  for (const auto& shape : cost.shapes) {
    EXPECT_LE(shape.tokens(), p.chunk_tokens);  // 12 decodes < 256: the budget binds
    EXPECT_LE(int64_t(shape.sequences.size()), p.max_batch);
    tokens += shape.tokens();
  }
  for (const auto& r : requests) {
    want += r.prompt_tokens + r.output_tokens - 1;
    generated += r.output_tokens;
  }
  EXPECT_EQ(tokens, want);
  EXPECT_EQ(out.generated_tokens, generated);
  for (const auto& r : out.records) {
    EXPECT_LE(r.request.arrival_seconds, r.admitted);
    EXPECT_LT(r.admitted, r.first_token);
    EXPECT_LE(r.first_token, r.finish);
  }
}

TEST(ServeSchedule, PrefillFirstRunsAdmittedPromptsAloneThenDecodesEverySequence) {
  RecordingCost cost(0.0, 0.01);
  // Two requests at t = 0: one prefill step of both prompts, then decodes.
  std::vector<Request> requests = {{0, 0.0, 5, 3}, {1, 0.0, 7, 2}};
  ServePolicy p = OneAtATime();
  p.max_batch = 4;
  Serve(requests, p, cost);
  ASSERT_EQ(cost.shapes.size(), 3u);
  EXPECT_EQ(cost.shapes[0].sequences, (std::vector<SequenceSpan>{{5, 0}, {7, 0}}));
  // Decode: the first output token goes in at context = prompt.
  EXPECT_EQ(cost.shapes[1].sequences, (std::vector<SequenceSpan>{{1, 5}, {1, 7}}));
  EXPECT_EQ(cost.shapes[2].sequences, (std::vector<SequenceSpan>{{1, 6}}));
}

// Prefill-first with a prompt budget: admitted prompts run alone in steps of
// at most the budget, in admission order; one longer prompt runs by itself.
TEST(ServeSchedule, PrefillFirstKeepsThePromptBudgetInAdmissionOrder) {
  RecordingCost cost(0.0, 0.01);
  std::vector<Request> requests = {
      {0, 0.0, 300, 2}, {1, 0.0, 300, 2}, {2, 0.0, 900, 2}, {3, 0.0, 100, 2}};
  ServePolicy p = OneAtATime();
  p.max_batch = 4;
  p.prefill_tokens = 700;
  Serve(requests, p, cost);
  ASSERT_GE(cost.shapes.size(), 3u);
  EXPECT_EQ(cost.shapes[0].sequences, (std::vector<SequenceSpan>{{300, 0}, {300, 0}}));
  EXPECT_EQ(cost.shapes[1].sequences, (std::vector<SequenceSpan>{{900, 0}}));  // alone
  EXPECT_EQ(cost.shapes[2].sequences, (std::vector<SequenceSpan>{{100, 0}}));
}

TEST(ServeRequests, GeneratedStreamsAreReproducibleWithPoissonGaps) {
  const auto a = Poisson(4.0, 100000, 1, 1, 99);
  const auto b = Poisson(4.0, 100000, 1, 1, 99);
  ASSERT_EQ(a.size(), b.size());
  EXPECT_EQ(a.back().arrival_seconds, b.back().arrival_seconds);
  // Exponential gaps of mean 1/rate: the mean of 1e5 is within 3 standard
  // errors (sd = mean for the exponential distribution).
  const double mean_gap = a.back().arrival_seconds / double(a.size());
  EXPECT_NEAR(mean_gap, 0.25, 3 * 0.25 / std::sqrt(1e5));
}

TEST(ServeRequests, LengthSpecsAcceptNOrUniformAndRefuseTheRest) {
  EXPECT_EQ(ParseLengthSpec("128", "--prompt-tokens").high, 128);
  const LengthSpec u = ParseLengthSpec("uniform:64:256", "--output-tokens");
  EXPECT_EQ(u.low, 64);
  EXPECT_EQ(u.high, 256);
  for (const char* bad : {"0", "-3", "uniform:5:2", "uniform:5", "normal:1:2", "12x", ""}) {
    try {
      ParseLengthSpec(bad, "--prompt-tokens");
      ADD_FAILURE() << bad;
    } catch (const Error& e) {
      EXPECT_EQ(e.code(), ExitCode::kUsage);
      EXPECT_NE(std::string(e.what()).find("uniform:A:B"), std::string::npos);
    }
  }
}

}  // namespace
}  // namespace tritsim
