// Iteration-level scheduling of a request stream on one design point
// (continuous batching, Yu et al., OSDI 2022): every step serves the running
// sequences; a waiting request is admitted, first come first served, when the
// batch limit and the KV capacity allow its whole prompt plus output.
//
// Two policies decide what a step runs:
//  - prefill-first: a step with sequences still to prefill runs their whole
//    prompts alone, as many as fit a token budget in admission order (one
//    longer prompt runs by itself); otherwise it decodes one token of every
//    running sequence;
//  - chunked: every decoding sequence gets its token, then prompt chunks of
//    the admitted sequences fill the rest of a token budget (Agrawal et al.,
//    2024), so prefills share steps with decodes.
// What a step costs comes from a StepCostModel (the cycle-level engine, or a
// fixed table in tests). Plain C++, no SystemC: one process serves the whole
// stream.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "serve/request_stream.h"
#include "trace/trace_op.h"

namespace tritsim {

// What one step computes: the projections see all tokens as one GEMM,
// attention runs per sequence over its own cache.
struct StepShape {
  std::vector<SequenceSpan> sequences;  // each sequence's new tokens and context
  int64_t tokens() const {
    int64_t n = 0;
    for (const auto& s : sequences) n += s.tokens;
    return n;
  }
};

struct StepCost {
  double seconds = 0;
  double joules = 0;
};

class StepCostModel {
 public:
  virtual ~StepCostModel() = default;
  virtual StepCost Cost(const StepShape& step) = 0;
  // Power while no step runs (leakage), watts.
  virtual double IdleWatts() const = 0;
};

enum class Schedule { kPrefillFirst, kChunked };

// "prefill-first" or "chunked".
const char* ScheduleName(Schedule s);

struct ServePolicy {
  int64_t max_batch = 16;  // running sequences at most
  Schedule schedule = Schedule::kPrefillFirst;
  int64_t chunk_tokens = 512;     // chunked: tokens per step (decodes first)
  int64_t prefill_tokens = 2048;  // prefill-first: prompt tokens per step (one longer runs alone)
  double kv_capacity_bytes = 0;
  double kv_bytes_per_token = 0;  // over all layers, K and V
};

// What happened to one request. Times in seconds from the start.
struct RequestRecord {
  Request request;
  bool refused = false;  // its prompt plus output can never fit the KV capacity
  double admitted = 0;
  double first_token = 0;
  double finish = 0;
  double ttft() const { return first_token - request.arrival_seconds; }
  double queue() const { return admitted - request.arrival_seconds; }
  double e2e() const { return finish - request.arrival_seconds; }
  // Time per output token after the first; 0 for a one-token answer.
  double tpot() const {
    return request.output_tokens > 1 ? (finish - first_token) / double(request.output_tokens - 1)
                                     : 0.0;
  }
};

// The state after each step, for the occupancy plots.
struct StepSample {
  double start = 0;       // seconds
  double seconds = 0;     // the step's duration
  int64_t sequences = 0;  // sequences the step served
  int64_t tokens = 0;     // new tokens of the step
  int64_t running = 0;    // admitted, unfinished sequences after the step
  double kv_bytes = 0;    // KV cache held after the step (tokens written so far)
};

struct ServeOutcome {
  std::vector<RequestRecord> records;  // in request order
  std::vector<StepSample> steps;
  double end_seconds = 0;             // the last finish (or the last arrival, if later)
  double busy_seconds = 0;            // sum of step times
  double joules = 0;                  // steps plus idle leakage
  double kv_peak_bytes = 0;           // most KV cache held at once
  double kv_reserved_peak_bytes = 0;  // most reserved for admitted requests at once
  int64_t generated_tokens = 0;
  int64_t refused = 0;
};

// REQUIRES: requests sorted by arrival; policy.max_batch >= 1,
// chunk_tokens >= 1, kv_bytes_per_token > 0.
ServeOutcome Serve(const std::vector<Request>& requests, const ServePolicy& policy,
                   StepCostModel& cost);

}  // namespace tritsim
