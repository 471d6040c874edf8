// The progress line of `tritsim run` on a terminal: one line on stderr,
// redrawn in place, e.g.
//   run: decode step 12/64, 18% done, 3.21 ms simulated, 4.2 s elapsed, ETA 19 s
// Shown only when stderr is a terminal and -q is not given; redrawn at most
// kRedrawsPerSecond times per second of wall time, so it costs nothing
// measurable however many trace ops the run has.
#pragma once

#include <chrono>
#include <cstdint>

#include "config/model_config.h"
#include "mapping/sim_options.h"

namespace tritsim {

// True when a run should show the line: stderr is a terminal and not quiet.
bool WantsProgressLine(bool quiet);

// Trace ops in one step of `model` (every step has the same ops), for the
// share done; counted from a one-token trace, which costs microseconds.
uint64_t OpsPerStep(const ModelConfig& model);

class ProgressLine {
 public:
  static constexpr int kRedrawsPerSecond = 5;

  // `ops_per_step` 0 = unknown: learned when the second step starts (a
  // replayed trace); until then the share and ETA show "?".
  ProgressLine(int64_t prefill_steps, int64_t decode_steps, uint64_t ops_per_step);
  // Clears the line if it was drawn, so a message after it starts a clean line.
  ~ProgressLine();
  ProgressLine(const ProgressLine&) = delete;
  ProgressLine& operator=(const ProgressLine&) = delete;

  // Records where the run is; redraws if the last redraw is old enough.
  void Update(const SimProgress& p);

 private:
  using Clock = std::chrono::steady_clock;
  void Learn(const SimProgress& p);
  double ShareDone(const SimProgress& p) const;
  void Draw(const SimProgress& p, double elapsed_seconds);

  int64_t prefill_steps_;
  int64_t decode_steps_;
  uint64_t ops_per_step_;
  int64_t steps_started_ = 0;
  Phase last_phase_ = Phase::kDecode;
  int64_t last_step_ = -1;
  Clock::time_point start_ = Clock::now();
  Clock::time_point last_draw_{};
  bool drawn_ = false;
};

}  // namespace tritsim
