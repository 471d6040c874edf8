#include "serving/engine_step_cost.h"

#include <sys/types.h>
#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>

#include <Eigen/Dense>

#include "common/atomic_file.h"
#include "common/error.h"
#include "common/subprocess.h"
#include "model/trace_builder.h"
#include "report/resolved_config.h"
#include "trace/trace_writer.h"

namespace tritsim {
namespace {

// Blocks cut for layer extrapolation (see the header).
constexpr int64_t kFewLayers = 2;
// Features beside the token grid: keys streamed, score pairs, attention
// groups (each group's ops cost a fixed start-up and drain).
constexpr size_t kShapeFeatures = 3;

// Points where g(T) is a parameter: 1, 2, 4, ... up to `most`, and `most`.
std::vector<int64_t> TokenGrid(int64_t most) {
  std::vector<int64_t> grid;
  for (int64_t t = 1; t < most; t *= 2) grid.push_back(t);
  grid.push_back(std::max<int64_t>(1, most));
  return grid;
}

StepShape Alike(int64_t sequences, int64_t tokens, int64_t context) {
  StepShape s;
  s.sequences.assign(size_t(std::max<int64_t>(1, sequences)), SequenceSpan{tokens, context});
  return s;
}

// The calibration steps: one prompt of each grid size on an empty cache (the
// projections, g), decodes of small, half and full batches at short, middle
// and long contexts (streaming the caches, a), and several prompts or a
// chunk on a filled cache (the attention arithmetic, b).
std::vector<StepShape> CalibrationShapes(const CalibrationRange& r,
                                         const std::vector<int64_t>& grid) {
  std::vector<StepShape> shapes;
  for (int64_t t : grid) shapes.push_back(Alike(1, t, 0));
  const int64_t mid = (r.min_context + r.max_context) / 2;
  std::vector<int64_t> batches = {1, (r.max_batch + 1) / 2, r.max_batch};
  batches.erase(std::unique(batches.begin(), batches.end()), batches.end());
  for (int64_t b : batches) {
    for (int64_t c : {std::max<int64_t>(1, r.min_context), mid, r.max_context}) {
      shapes.push_back(Alike(b, 1, c));
    }
  }
  // Decodes at spread contexts: one attention group per sequence.
  for (int64_t b : batches) {
    if (b < 2) continue;
    StepShape spread;
    for (int64_t i = 0; i < b; ++i) {
      const int64_t lo = std::max<int64_t>(1, r.min_context);
      spread.sequences.push_back(SequenceSpan{1, lo + (r.max_context - lo) * i / (b - 1)});
    }
    shapes.push_back(spread);
  }
  for (int64_t k : {2, 4}) {
    const int64_t prompt = std::max<int64_t>(1, std::min(r.max_step_tokens / k, r.max_context));
    if (k <= r.max_batch) shapes.push_back(Alike(k, prompt, 0));
  }
  const int64_t chunk = std::max<int64_t>(2, std::min(r.chunk_tokens, r.max_step_tokens) / 2);
  shapes.push_back(Alike(1, chunk, mid));
  StepShape mixed = Alike(1, chunk, r.max_context / 2);
  for (int64_t i = 1; i < r.max_batch; ++i) mixed.sequences.push_back(SequenceSpan{1, mid});
  shapes.push_back(mixed);
  return shapes;
}

std::string ShapeText(const StepShape& s) {
  std::string text;
  for (const SequenceSpan& span : s.sequences) {
    if (!text.empty()) text += ',';
    text += std::to_string(span.tokens) + "@" + std::to_string(span.context);
    if (text.size() > 60) return text + ",...";
  }
  return text;
}

// Weighted least squares for relative error: each row divided by its target.
std::vector<double> Fit(const std::vector<std::vector<double>>& rows,
                        const std::vector<double>& target) {
  const Eigen::Index n = Eigen::Index(rows.size()), p = Eigen::Index(rows.front().size());
  Eigen::MatrixXd a(n, p);
  Eigen::VectorXd y(n);
  for (Eigen::Index i = 0; i < n; ++i) {
    const double w = target[size_t(i)] > 0 ? 1.0 / target[size_t(i)] : 1.0;
    for (Eigen::Index j = 0; j < p; ++j) a(i, j) = rows[size_t(i)][size_t(j)] * w;
    y(i) = target[size_t(i)] * w;
  }
  const Eigen::VectorXd x = a.colPivHouseholderQr().solve(y);
  return std::vector<double>(x.data(), x.data() + x.size());
}

double Dot(const std::vector<double>& a, const std::vector<double>& b) {
  double sum = 0;
  for (size_t i = 0; i < a.size(); ++i) sum += a[i] * b[i];
  return sum;
}

}  // namespace

EngineStepCost::EngineStepCost(const ModelConfig& model, const EngineRunner& runner)
    : model_(model), runner_(runner) {}

std::vector<double> EngineStepCost::Features(const StepShape& step) const {
  std::vector<double> f(grid_.size() + kShapeFeatures, 0.0);
  const double t = double(step.tokens());
  size_t hi = 1;
  while (hi + 1 < grid_.size() && double(grid_[hi]) < t) ++hi;
  if (grid_.size() == 1) {
    f[0] = 1;
  } else {
    const double t0 = double(grid_[hi - 1]), t1 = double(grid_[hi]);
    const double w = std::max(0.0, (t - t0) / (t1 - t0));  // > 1 past the grid: extrapolates
    f[hi - 1] = 1 - w;
    f[hi] = w;
  }
  double keys = 0, pairs = 0;
  std::vector<SequenceSpan> groups;
  for (const SequenceSpan& s : step.sequences) {
    const double n = double(s.tokens), c = double(s.context);
    keys += c + n;
    pairs += n * c + n * (n + 1) / 2;
    if (std::find(groups.begin(), groups.end(), s) == groups.end()) groups.push_back(s);
  }
  f[grid_.size()] = keys;
  f[grid_.size() + 1] = pairs;
  f[grid_.size() + 2] = double(groups.size());
  return f;
}

std::vector<EngineStepCost::Measured> EngineStepCost::Simulate(const std::vector<StepShape>& shapes,
                                                               int64_t layers) {
  ModelConfig model = model_;
  if (layers > 0) model.layers = layers;
  std::vector<std::string> json(shapes.size()), errors(shapes.size());
  std::vector<SpawnRequest> requests;
  for (size_t i = 0; i < shapes.size(); ++i) {
    const std::string stem = runner_.work_dir + "/step-" + std::to_string(next_file_++);
    auto trace = BuildMixedStepTrace(model, PhaseOfMix(shapes[i].sequences), shapes[i].sequences);
    StreamFileAtomically(stem + ".trace", [&](std::ostream& out) { WriteTrace(*trace, out); });
    json[i] = stem + ".json";
    errors[i] = stem + ".err";
    SpawnRequest r;
    r.argv = {runner_.binary, "run", "--trace", stem + ".trace"};
    r.argv.insert(r.argv.end(), runner_.arch_args.begin(), runner_.arch_args.end());
    r.argv.insert(r.argv.end(), {"--json", json[i], "-q"});
    r.stderr_to = ChildOutput::kFile;
    r.stderr_file = errors[i];
    requests.push_back(r);
  }
  // At most `jobs` children at once, waited for in order.
  std::vector<pid_t> running;
  std::vector<int> status(shapes.size(), 0);
  size_t started = 0, done = 0;
  while (done < shapes.size()) {
    while (started < shapes.size() && started - done < size_t(std::max(1, runner_.jobs))) {
      running.push_back(SpawnChild(requests[started++]));
    }
    status[done] = WaitForChild(running[done]);
    ++done;
  }
  child_runs_ += int64_t(shapes.size());
  std::vector<Measured> out;
  for (size_t i = 0; i < shapes.size(); ++i) {
    if (ExitCodeOf(status[i]) != 0) {
      throw Error(ExitCode::kSimFailed, "serve: the engine run of step " + ShapeText(shapes[i]) +
                                            " failed: " + LastStderrLine(ReadFileText(errors[i])));
    }
    const nlohmann::json j = ReadRunJsonFile(json[i]);
    Measured m;
    m.seconds = j.at("totals").at("seconds").get<double>();
    m.joules = j.at("totals").at("energy_joules").get<double>();
    m.leakage_watts = m.seconds > 0 ? j.at("energy").at("leakage").get<double>() / m.seconds : 0;
    out.push_back(m);
  }
  return out;
}

void EngineStepCost::Calibrate(const CalibrationRange& range) {
  grid_ = TokenGrid(range.max_step_tokens);
  calibration_ = CalibrationShapes(range, grid_);
  std::vector<Measured> full;
  if (model_.layers <= kFewLayers + 1) {
    full = Simulate(calibration_, 0);
  } else {
    const std::vector<Measured> two = Simulate(calibration_, kFewLayers);
    const std::vector<Measured> three = Simulate(calibration_, kFewLayers + 1);
    const double more = double(model_.layers - kFewLayers);
    for (size_t i = 0; i < two.size(); ++i) {
      Measured m;
      m.seconds = two[i].seconds + more * (three[i].seconds - two[i].seconds);
      m.joules = two[i].joules + more * (three[i].joules - two[i].joules);
      m.leakage_watts = three[i].leakage_watts;
      full.push_back(m);
    }
  }
  std::vector<std::vector<double>> rows;
  std::vector<double> seconds, joules;
  for (size_t i = 0; i < calibration_.size(); ++i) {
    rows.push_back(Features(calibration_[i]));
    seconds.push_back(full[i].seconds);
    joules.push_back(full[i].joules);
    idle_watts_ = full[i].leakage_watts;  // the same for every step of a design
  }
  seconds_coef_ = Fit(rows, seconds);
  joules_coef_ = Fit(rows, joules);
}

StepCost EngineStepCost::Cost(const StepShape& step) {
  const std::vector<double> f = Features(step);
  StepCost c;
  c.seconds = std::max(0.0, Dot(seconds_coef_, f));
  c.joules = std::max(0.0, Dot(joules_coef_, f));
  return c;
}

StepTimeCheck EngineStepCost::Validate(const std::vector<StepShape>& steps) {
  StepTimeCheck check;
  if (steps.empty()) return check;
  const std::vector<Measured> detailed = Simulate(steps, 0);
  double estimated_seconds = 0, detailed_seconds = 0, estimated_joules = 0, detailed_joules = 0;
  for (size_t i = 0; i < steps.size(); ++i) {
    const StepCost c = Cost(steps[i]);
    const double error = std::abs(c.seconds / detailed[i].seconds - 1);
    check.mean_abs_relative_error += error / double(steps.size());
    check.max_abs_relative_error = std::max(check.max_abs_relative_error, error);
    estimated_seconds += c.seconds;
    detailed_seconds += detailed[i].seconds;
    estimated_joules += c.joules;
    detailed_joules += detailed[i].joules;
  }
  check.steps = int64_t(steps.size());
  check.busy_relative_error = estimated_seconds / detailed_seconds - 1;
  check.energy_relative_error = estimated_joules / detailed_joules - 1;
  return check;
}

}  // namespace tritsim
