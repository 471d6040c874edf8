// Step times of a serving run from the cycle-level engine.
//
// A serving run has thousands of steps of many shapes; simulating each would
// take hours, and SystemC elaborates once per process. So the engine runs a
// few representative steps, each in its own child process (`tritsim run
// --trace`, one mixed step of trace format 2), and a fitted model estimates
// the rest:
//  1. Layer extrapolation. The blocks of a step are identical, so a step of
//     L blocks costs c(2) + (L - 2) (c(3) - c(2)), from runs of the model cut
//     to 2 and 3 blocks (the steady-state block and the fixed part: embedding,
//     head, pipeline fill).
//  2. A regression over step shapes, weighted for relative error:
//       cost = g(T) + a x (keys streamed) + b x (score pairs) + c x (groups)
//     g piecewise linear in the step's new tokens T on a power-of-two grid
//     (the projections: weight streaming, then compute past the ridge), a the
//     per-key cost of streaming each sequence's cache, b the per-pair cost of
//     the attention arithmetic, c the fixed cost of one group of attention
//     ops (sequences of equal tokens and context share one). Seconds and
//     joules are fitted alike.
// The error is measured, not assumed: Validate() simulates actual steps of
// the run in full detail and reports how far the estimates were.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "config/model_config.h"
#include "serve/batch_scheduler.h"

namespace tritsim {

struct EngineRunner {
  std::string binary;                  // the tritsim program for the child runs
  std::vector<std::string> arch_args;  // e.g. {"--arch", F, "--set", "arch.k=v"}
  std::string work_dir;                // traces and JSON of the child runs
  int jobs = 2;                        // child runs at once
};

// The shapes a serving run can take, to calibrate on.
struct CalibrationRange {
  int64_t max_batch = 16;
  int64_t max_step_tokens = 512;  // the most new tokens one step can hold
  int64_t min_context = 0;        // shortest prompt
  int64_t max_context = 1024;     // longest prompt + output
  bool chunked = false;
  int64_t chunk_tokens = 512;
};

struct StepTimeCheck {
  int64_t steps = 0;                   // steps simulated in detail
  double mean_abs_relative_error = 0;  // of the estimated step seconds
  double max_abs_relative_error = 0;
  double busy_relative_error = 0;    // sum of estimates over sum of detailed, minus 1
  double energy_relative_error = 0;  // the same for joules
};

class EngineStepCost : public StepCostModel {
 public:
  EngineStepCost(const ModelConfig& model, const EngineRunner& runner);

  // Runs the calibration steps and fits the model. Throws tritsim::Error
  // when a child run fails (its message).
  void Calibrate(const CalibrationRange& range);
  StepCost Cost(const StepShape& step) override;
  double IdleWatts() const override { return idle_watts_; }

  // Simulates `steps` in full detail and compares them with Cost().
  StepTimeCheck Validate(const std::vector<StepShape>& steps);

  int64_t child_runs() const { return child_runs_; }
  int64_t calibration_shapes() const { return int64_t(calibration_.size()); }

 private:
  struct Measured {
    double seconds = 0, joules = 0, leakage_watts = 0;
  };
  // Simulates each shape with the model cut to `layers` blocks (0: as is).
  std::vector<Measured> Simulate(const std::vector<StepShape>& shapes, int64_t layers);
  std::vector<double> Features(const StepShape& step) const;

  ModelConfig model_;
  EngineRunner runner_;
  std::vector<int64_t> grid_;  // new-token grid of g(T)
  std::vector<StepShape> calibration_;
  std::vector<double> seconds_coef_, joules_coef_;
  double idle_watts_ = 0;
  int64_t child_runs_ = 0;
  int64_t next_file_ = 0;
};

}  // namespace tritsim
