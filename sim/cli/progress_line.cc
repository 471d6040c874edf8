// Run progress line. See progress_line.h.
#include "cli/progress_line.h"

#include <unistd.h>

#include <fmt/core.h>
#include <algorithm>
#include <cstdio>
#include <string>

#include "model/trace_builder.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

constexpr double kMicro = 1e-6, kMilli = 1e-3;

std::string SimulatedTime(double s) {
  if (s < kMilli) return fmt::format("{:.3g} us", s / kMicro);
  if (s < 1.0) return fmt::format("{:.3g} ms", s / kMilli);
  return fmt::format("{:.3g} s", s);
}

std::string WallTime(double s) { return fmt::format(s < 100 ? "{:.1f} s" : "{:.0f} s", s); }

}  // namespace

bool WantsProgressLine(bool quiet) { return !quiet && ::isatty(STDERR_FILENO) == 1; }

uint64_t OpsPerStep(const ModelConfig& model) {
  WorkloadConfig one;  // one decode token, batch 1, empty cache
  auto source = BuildTrace(model, one);
  TraceRecord record;
  uint64_t ops = 0;
  while (source->next(record)) ops += record.is_step ? 0 : 1;
  return ops;
}

ProgressLine::ProgressLine(int64_t prefill_steps, int64_t decode_steps, uint64_t ops_per_step)
    : prefill_steps_(prefill_steps), decode_steps_(decode_steps), ops_per_step_(ops_per_step) {}

ProgressLine::~ProgressLine() {
  if (drawn_) std::fputs("\r\033[K", stderr);
}

void ProgressLine::Update(const SimProgress& p) {
  Learn(p);
  const Clock::time_point now = Clock::now();
  if (now - last_draw_ < std::chrono::milliseconds(1000 / kRedrawsPerSecond)) return;
  last_draw_ = now;
  Draw(p, std::chrono::duration<double>(now - start_).count());
}

void ProgressLine::Learn(const SimProgress& p) {
  if (p.phase == last_phase_ && p.step == last_step_) return;
  last_phase_ = p.phase;
  last_step_ = p.step;
  ++steps_started_;
  // The second step starts after all ops of the first.
  if (steps_started_ == 2 && ops_per_step_ == 0) ops_per_step_ = p.ops_started;
}

double ProgressLine::ShareDone(const SimProgress& p) const {
  const double total = double(ops_per_step_) * double(prefill_steps_ + decode_steps_);
  return total > 0 ? std::min(1.0, double(p.ops_started) / total) : -1.0;
}

void ProgressLine::Draw(const SimProgress& p, double elapsed) {
  const bool prefill = p.phase == Phase::kPrefill;
  const double share = ShareDone(p);
  std::string done = "? done", eta = "?";
  if (share >= 0) {
    done = std::to_string(int(share * 100)) + "% done";
    if (share > 0) eta = WallTime(elapsed * (1 - share) / share);
  }
  std::fprintf(stderr, "\r\033[Krun: %s step %lld/%lld, %s, %s simulated, %s elapsed, ETA %s",
               PhaseName(p.phase), static_cast<long long>(p.step + 1),
               static_cast<long long>(prefill ? prefill_steps_ : decode_steps_), done.c_str(),
               SimulatedTime(p.simulated_seconds).c_str(), WallTime(elapsed).c_str(), eta.c_str());
  std::fflush(stderr);
  drawn_ = true;
}

}  // namespace tritsim
