#include "serve/batch_scheduler.h"

#include <algorithm>
#include <deque>

namespace tritsim {

const char* ScheduleName(Schedule s) {
  switch (s) {
    case Schedule::kPrefillFirst:
      return "prefill-first";
    case Schedule::kChunked:
      return "chunked";
  }
  return "?";
}

namespace {

// An admitted, unfinished request.
struct Running {
  size_t record = 0;        // index into ServeOutcome::records
  int64_t prefilled = 0;    // prompt tokens in the cache
  int64_t generated = 0;    // output tokens produced (the first by the prefill)
  int64_t step_tokens = 0;  // this step's share
};

class Server {
 public:
  Server(const std::vector<Request>& requests, const ServePolicy& policy, StepCostModel& cost)
      : requests_(requests), policy_(policy), cost_(cost) {
    out_.records.reserve(requests.size());
    for (const Request& r : requests) out_.records.push_back(RequestRecord{r});
  }

  ServeOutcome Run() {
    double t = 0;
    while (true) {
      Arrive(t);
      Admit(t);
      if (running_.empty()) {
        if (next_ == requests_.size()) break;
        t = std::max(t, requests_[next_].arrival_seconds);
        continue;
      }
      t = Step(t);
    }
    out_.end_seconds = std::max(t, requests_.empty() ? 0.0 : requests_.back().arrival_seconds);
    out_.joules += cost_.IdleWatts() * (out_.end_seconds - out_.busy_seconds);
    return std::move(out_);
  }

 private:
  double Need(const Request& r) const {
    return double(r.prompt_tokens + r.output_tokens) * policy_.kv_bytes_per_token;
  }

  void Arrive(double t) {
    while (next_ < requests_.size() && requests_[next_].arrival_seconds <= t) {
      waiting_.push_back(next_++);
    }
  }

  // First come, first served: the head of the queue waits for room rather
  // than being overtaken by a smaller request behind it.
  void Admit(double t) {
    while (!waiting_.empty() && int64_t(running_.size()) < policy_.max_batch) {
      RequestRecord& rec = out_.records[waiting_.front()];
      const double need = Need(rec.request);
      if (need > policy_.kv_capacity_bytes) {
        rec.refused = true;
        ++out_.refused;
        waiting_.pop_front();
        continue;
      }
      if (reserved_ + need > policy_.kv_capacity_bytes) break;
      reserved_ += need;
      out_.kv_reserved_peak_bytes = std::max(out_.kv_reserved_peak_bytes, reserved_);
      rec.admitted = t;
      running_.push_back(Running{waiting_.front()});
      waiting_.pop_front();
    }
  }

  const Request& RequestOf(const Running& s) const { return out_.records[s.record].request; }
  bool Prefilling(const Running& s) const { return s.prefilled < RequestOf(s).prompt_tokens; }

  // Sets each running sequence's step_tokens for this step.
  void Plan() {
    for (Running& s : running_) s.step_tokens = 0;
    const bool any_prefill = std::any_of(running_.begin(), running_.end(),
                                         [&](const Running& s) { return Prefilling(s); });
    if (policy_.schedule == Schedule::kPrefillFirst) {
      int64_t budget = policy_.prefill_tokens;
      bool first = true;
      for (Running& s : running_) {
        if (!any_prefill) {
          s.step_tokens = 1;
          continue;
        }
        if (!Prefilling(s)) continue;
        const int64_t prompt = RequestOf(s).prompt_tokens - s.prefilled;
        if (!first && prompt > budget) break;  // admission order: no overtaking
        s.step_tokens = prompt;
        budget -= prompt;
        first = false;
      }
      return;
    }
    int64_t budget = policy_.chunk_tokens;
    for (Running& s : running_) {
      if (!Prefilling(s)) {
        s.step_tokens = 1;
        --budget;
      }
    }
    for (Running& s : running_) {
      if (budget <= 0) break;
      if (!Prefilling(s)) continue;
      s.step_tokens = std::min(budget, RequestOf(s).prompt_tokens - s.prefilled);
      budget -= s.step_tokens;
    }
  }

  double Step(double t) {
    Plan();
    StepShape shape;
    for (const Running& s : running_) {
      if (s.step_tokens == 0) continue;
      const int64_t context = Prefilling(s) ? s.prefilled : s.prefilled + s.generated - 1;
      shape.sequences.push_back(SequenceSpan{s.step_tokens, context});
    }
    const StepCost c = cost_.Cost(shape);
    const double end = t + c.seconds;
    out_.busy_seconds += c.seconds;
    out_.joules += c.joules;
    for (Running& s : running_) Advance(s, end);
    running_.erase(std::remove_if(running_.begin(), running_.end(),
                                  [&](const Running& s) { return Finished(s); }),
                   running_.end());
    StepSample sample;
    sample.start = t;
    sample.seconds = c.seconds;
    sample.sequences = int64_t(shape.sequences.size());
    sample.tokens = shape.tokens();
    sample.running = int64_t(running_.size());
    sample.kv_bytes = held_;
    out_.steps.push_back(sample);
    return end;
  }

  bool Finished(const Running& s) const { return s.generated == RequestOf(s).output_tokens; }

  void Advance(Running& s, double end) {
    if (s.step_tokens == 0) return;
    RequestRecord& rec = out_.records[s.record];
    if (Prefilling(s)) {
      s.prefilled += s.step_tokens;
      held_ += double(s.step_tokens) * policy_.kv_bytes_per_token;
      if (!Prefilling(s)) {
        s.generated = 1;
        ++out_.generated_tokens;
        rec.first_token = end;
      }
    } else {
      ++s.generated;  // the token fed in is written to the cache
      ++out_.generated_tokens;
      held_ += policy_.kv_bytes_per_token;
    }
    out_.kv_peak_bytes = std::max(out_.kv_peak_bytes, held_);
    if (!Finished(s)) return;
    rec.finish = end;
    // Its cache is freed: the prompt and every output token fed back in.
    held_ -= double(s.prefilled + s.generated - 1) * policy_.kv_bytes_per_token;
    reserved_ -= Need(rec.request);
  }

  const std::vector<Request>& requests_;
  const ServePolicy& policy_;
  StepCostModel& cost_;
  ServeOutcome out_;
  size_t next_ = 0;  // the next request to arrive
  std::deque<size_t> waiting_;
  std::vector<Running> running_;
  double reserved_ = 0;  // KV bytes reserved for admitted requests
  double held_ = 0;      // KV bytes written so far by admitted requests
};

}  // namespace

ServeOutcome Serve(const std::vector<Request>& requests, const ServePolicy& policy,
                   StepCostModel& cost) {
  return Server(requests, policy, cost).Run();
}

}  // namespace tritsim
