#include "run/sampling.h"

#include <algorithm>
#include <cmath>
#include <deque>
#include <map>
#include <string>
#include <utility>
#include <vector>

#include <boost/math/distributions/students_t.hpp>

#include "common/error.h"
#include "config/energy_table.h"
#include "energy/energy_model.h"
#include "mapping/resource_bounds.h"
#include "run/simulation.h"

namespace tritsim {
namespace {

using Vec = std::vector<double>;

// The additive figures of a run, in the order of a measurement vector.
constexpr uint64_t EventCounts::*kEventFields[] = {
    &EventCounts::weight_uses,        &EventCounts::weight_uses_zero,
    &EventCounts::accumulator_adds,   &EventCounts::decoder_bytes,
    &EventCounts::vector_macs,        &EventCounts::vector_special,
    &EventCounts::vector_elementwise, &EventCounts::sram_reads,
    &EventCounts::sram_writes,        &EventCounts::dram_bytes_read,
    &EventCounts::dram_bytes_written, &EventCounts::dram_activates,
    &EventCounts::dram_refreshes};
constexpr size_t kEventCount = sizeof kEventFields / sizeof kEventFields[0];

constexpr size_t kDramCount = sizeof kDramStatsFields / sizeof kDramStatsFields[0];

constexpr double ResourceDemand::*kDemandFields[] = {
    &ResourceDemand::dram_bytes, &ResourceDemand::decoder_bytes, &ResourceDemand::array_products,
    &ResourceDemand::vector_cycles, &ResourceDemand::sram_accesses};
constexpr size_t kDemandCount = sizeof kDemandFields / sizeof kDemandFields[0];

constexpr uint64_t StallBreakdown::*kStallFields[] = {
    &StallBreakdown::busy, &StallBreakdown::dram_wait, &StallBreakdown::sram_conflict,
    &StallBreakdown::vector_wait, &StallBreakdown::idle};
constexpr size_t kStallCount = sizeof kStallFields / sizeof kStallFields[0];

// Global part of a measurement vector.
constexpr size_t kCycles = 0;
constexpr size_t kStalls = 1;
constexpr size_t kEvents = kStalls + kStallCount;
constexpr size_t kDram = kEvents + kEventCount;
constexpr size_t kVectorBusy = kDram + kDramCount;
constexpr size_t kSramPortBusy = kVectorBusy + 1;
constexpr size_t kJoules = kSramPortBusy + 1;
constexpr size_t kGlobals = kJoules + 1;

// Per-op part: one slot of these fields per op name of a unit family.
constexpr size_t kOpCycles = 0;
constexpr size_t kOpOps = 1;
constexpr size_t kOpDramBytes = 2;
constexpr size_t kOpBoundCycles = 3;
constexpr size_t kOpDemand = 4;
constexpr size_t kOpEvents = kOpDemand + kDemandCount;
constexpr size_t kOpFields = kOpEvents + kEventCount;

void AddTo(Vec& into, const Vec& from, double scale = 1.0) {
  if (into.size() < from.size()) into.resize(from.size(), 0.0);
  for (size_t i = 0; i < from.size(); ++i) into[i] += scale * from[i];
}

Vec Scaled(const Vec& v, double scale) {
  Vec out(v.size());
  for (size_t i = 0; i < v.size(); ++i) out[i] = scale * v[i];
  return out;
}

double At(const Vec& v, size_t i) { return i < v.size() ? v[i] : 0.0; }

uint64_t Count(double x) { return x > 0 ? uint64_t(std::llround(x)) : 0; }

// The cumulative global figures of a snapshot (joules left 0: priced per unit).
Vec GlobalsOf(const RunResult& r) {
  Vec v(kGlobals, 0.0);
  v[kCycles] = double(r.cycles);
  for (size_t i = 0; i < kStallCount; ++i) v[kStalls + i] = double(r.stalls.*kStallFields[i]);
  for (size_t i = 0; i < kEventCount; ++i) v[kEvents + i] = double(r.events.*kEventFields[i]);
  for (size_t i = 0; i < kDramCount; ++i) v[kDram + i] = double(r.dram.*kDramStatsFields[i]);
  v[kVectorBusy] = double(r.vector_busy_cycles);
  v[kSramPortBusy] = double(r.sram_port_busy_cycles);
  return v;
}

Vec OpFieldsOf(const OpResult& r) {
  Vec v(kOpFields, 0.0);
  v[kOpCycles] = double(r.cycles);
  v[kOpOps] = double(r.ops);
  v[kOpDramBytes] = double(r.dram_bytes);
  v[kOpBoundCycles] = double(r.bound_cycles);
  for (size_t i = 0; i < kDemandCount; ++i) v[kOpDemand + i] = r.demand.*kDemandFields[i];
  for (size_t i = 0; i < kEventCount; ++i) v[kOpEvents + i] = double(r.events.*kEventFields[i]);
  return v;
}

EventCounts EventsAt(const Vec& v, size_t offset) {
  EventCounts e;
  for (size_t i = 0; i < kEventCount; ++i) e.*kEventFields[i] = Count(At(v, offset + i));
  return e;
}

// The prologue (ops before the first decoder layer), one decoder layer, or
// the epilogue (ops after the last layer).
enum class Family { kPrologue, kBlock, kEpilogue };

struct UnitTag {
  Phase phase = Phase::kDecode;
  int64_t step = 0;  // within the phase
  int64_t context = 0;
  Family family = Family::kBlock;
  int64_t layer = -1;
  bool certain = false;  // the first or last layer: measured in every kept step
};

// What the reduced trace left out, per phase, for the estimate.
struct PhaseCounts {
  int64_t steps = 0;
  double context_sum = 0;  // sum of the steps' contexts (the regressor)
  uint64_t tokens = 0;     // batch x tokens over the steps
};

int PhaseIndex(Phase p) { return p == Phase::kPrefill ? 0 : 1; }

// Passes through the records of the kept units of `inner` and remembers,
// for the last op of each kept unit, its index among the ops passed and
// what the unit is.
class SampledSource : public TraceSource {
 public:
  SampledSource(TraceSource& inner, const SamplingOptions& options)
      : inner_(inner), options_(options) {
    const int64_t n_total = inner.header().workload.decode_tokens;
    const int64_t kept = std::min(n_total, options.decode_steps);
    for (int64_t i = 0; i < kept; ++i) {
      // Systematic, with both ends: the first step (time to first token)
      // and the last anchor the regression on context.
      kept_decode_.push_back(
          kept == 1 ? 0
                    : int64_t(std::llround(double(i) * double(n_total - 1) / double(kept - 1))));
    }
  }

  const TraceHeader& header() const override { return inner_.header(); }

  bool next(TraceRecord& record) override {
    for (;;) {
      TraceRecord r;
      if (!Pull(r)) return false;
      if (r.is_step) {
        StartStep(r.step);
        if (!keep_step_) continue;
        record = r;
        return true;
      }
      if (!keep_step_) continue;
      UnitTag tag;
      if (!Classify(r.op, tag)) continue;
      const int64_t index = passed_ops_++;
      const TraceRecord* next = Peek();
      if (!next || next->is_step || next->op.layer != r.op.layer) units_.push_back({index, tag});
      record = r;
      return true;
    }
  }

  bool IsUnitEnd(int64_t op_index) const {
    return !units_.empty() && units_.front().first == op_index;
  }
  UnitTag PopUnit() {
    const UnitTag tag = units_.front().second;
    units_.pop_front();
    return tag;
  }
  const PhaseCounts& counts(int phase) const { return counts_[phase]; }
  int64_t kept_steps(int phase) const { return kept_steps_[phase]; }

 private:
  bool Pull(TraceRecord& r) {
    if (has_peek_) {
      r = peek_;
      has_peek_ = false;
      return true;
    }
    return inner_.next(r);
  }
  const TraceRecord* Peek() {
    if (!has_peek_) has_peek_ = inner_.next(peek_);
    return has_peek_ ? &peek_ : nullptr;
  }

  void StartStep(const TraceStep& step) {
    step_ = step;
    PhaseCounts& c = counts_[PhaseIndex(step.phase)];
    ++c.steps;
    c.context_sum += double(step.context);
    c.tokens += uint64_t(step.tokens) * uint64_t(step.batch);
    keep_step_ = step.phase == Phase::kPrefill ||
                 std::binary_search(kept_decode_.begin(), kept_decode_.end(), step.step);
    in_blocks_ = false;
    sampled_.clear();
    if (!keep_step_) return;
    const int64_t ordinal = kept_steps_[0] + kept_steps_[1];
    ++kept_steps_[PhaseIndex(step.phase)];
    // Layers 1 .. L-2, systematic, the start rotated from step to step by
    // the golden ratio so that every layer is measured over the run.
    const int64_t inner = std::max<int64_t>(0, options_.layers - 2);
    const int64_t m = std::min(
        inner, step.phase == Phase::kPrefill ? options_.prefill_layers : options_.step_layers);
    const double start = m < inner ? std::fmod(double(ordinal) * 0.6180339887498949, 1.0) : 0.0;
    for (int64_t j = 0; j < m; ++j) {
      sampled_.push_back(1 + std::min(inner - 1, int64_t(std::floor((double(j) + start) *
                                                                    double(inner) / double(m)))));
    }
  }

  bool Classify(const TraceOp& op, UnitTag& tag) {
    tag.phase = step_.phase;
    tag.step = step_.step;
    tag.context = step_.context;
    tag.layer = op.layer;
    if (op.layer < 0) {
      tag.family = in_blocks_ ? Family::kEpilogue : Family::kPrologue;
      return true;
    }
    in_blocks_ = true;
    tag.family = Family::kBlock;
    tag.certain = op.layer == 0 || op.layer == options_.layers - 1;
    return tag.certain || std::find(sampled_.begin(), sampled_.end(), op.layer) != sampled_.end();
  }

  TraceSource& inner_;
  SamplingOptions options_;
  std::vector<int64_t> kept_decode_;  // sorted
  TraceRecord peek_;
  bool has_peek_ = false;
  TraceStep step_;
  bool keep_step_ = false;
  bool in_blocks_ = false;
  std::vector<int64_t> sampled_;  // layers 1 .. L-2 measured in this step
  int64_t passed_ops_ = 0;
  std::deque<std::pair<int64_t, UnitTag>> units_;
  PhaseCounts counts_[2];
  int64_t kept_steps_[2] = {0, 0};
};

// Op names of one phase's units, each given a slot of kOpFields in the
// measurement vectors.
struct Slot {
  Family family = Family::kBlock;
  TraceOp op;  // the first instance seen
};

// One kept step as measured: prologue and epilogue, and its measured layers.
struct StepMeasure {
  int64_t step = -1;
  double context = 0;
  Vec fixed;       // prologue, epilogue, first and last layer
  Vec layers_sum;  // over the sampled layers
  double prologue_cycles = 0;
  double block_cycles = 0;  // over every layer measured (for start cycles)
  int64_t blocks = 0;
  int64_t m = 0;
  double cycles_sum = 0, cycles_sq = 0, joules_sum = 0, joules_sq = 0;
};

// A kept step's estimate and the variance of its layer sample.
struct StepEstimate {
  double context = 0;
  Vec y;
  double var_cycles = 0, var_joules = 0;  // second stage (layers)
  int64_t df = 0;
  double prologue_cycles = 0, layer_cycles = 0;
};

struct Variance {
  double value = 0;  // of the estimated total
  double df = 0;     // degrees of freedom of `value` (0 when value is 0)
};

// Welch-Satterthwaite: degrees of freedom of a sum of independent variance
// estimates (Satterthwaite 1946).
Variance Combine(const std::vector<Variance>& parts) {
  Variance sum;
  double denominator = 0;
  for (const Variance& p : parts) {
    if (p.value <= 0) continue;
    sum.value += p.value;
    denominator += p.value * p.value / p.df;
  }
  sum.df = denominator > 0 ? sum.value * sum.value / denominator : 0;
  return sum;
}

struct PhaseEstimate {
  Vec total;
  Variance cycles, joules;
  double prologue_cycles = 0, layer_cycles = 0;  // of the phase's first step
};

// Estimates of one phase, from its kept steps.
class PhaseSampler {
 public:
  std::map<std::pair<int, std::string>, size_t> slot_index;
  std::vector<Slot> slots;
  std::vector<StepEstimate> steps;  // one per kept step: bounded by the options
  StepMeasure open;
  int64_t detailed_layers = 0;

  size_t SlotOf(Family family, const TraceOp& op) {
    const auto key = std::make_pair(int(family), op.name);
    auto it = slot_index.find(key);
    if (it != slot_index.end()) return it->second;
    slots.push_back({family, op});
    slot_index.emplace(key, slots.size() - 1);
    return slots.size() - 1;
  }

  // `layers`: the layers the sampled ones stand for (all but the first and last).
  void Close(int64_t layers) {
    if (open.step < 0) return;
    StepEstimate e;
    e.context = open.context;
    e.y = open.fixed;
    const double m = double(open.m);
    const double l = double(layers);
    if (open.m > 0) AddTo(e.y, open.layers_sum, l / m);
    if (open.m < layers && open.m >= 2) {
      // Cochran (1977) ch. 10: M^2 (1 - m/M) s^2 / m for a sample of m of M.
      const double fpc = l * l * (1.0 - m / l) / m;
      e.var_cycles = fpc * (open.cycles_sq - open.cycles_sum * open.cycles_sum / m) / (m - 1);
      e.var_joules = fpc * (open.joules_sq - open.joules_sum * open.joules_sum / m) / (m - 1);
      e.var_cycles = std::max(0.0, e.var_cycles);
      e.var_joules = std::max(0.0, e.var_joules);
      e.df = open.m - 1;
    }
    e.prologue_cycles = open.prologue_cycles;
    e.layer_cycles = open.blocks > 0 ? open.block_cycles / double(open.blocks) : 0;
    steps.push_back(std::move(e));
    open = StepMeasure();
  }

  // Least squares of the kept steps' estimates on context, summed over all
  // `counts.steps` steps (Cochran 1977, ch. 7, the regression estimator);
  // the mean per step when fewer than three steps were kept.
  PhaseEstimate Estimate(const PhaseCounts& counts) const {
    PhaseEstimate out;
    if (steps.empty()) return out;
    const double big_n = double(counts.steps);
    const double n = double(steps.size());
    double xbar = 0;
    Vec ybar;
    for (const StepEstimate& s : steps) {
      xbar += s.context / n;
      AddTo(ybar, s.y, 1.0 / n);
    }
    double sxx = 0;
    Vec sxy(ybar.size(), 0.0);
    for (const StepEstimate& s : steps) {
      const double dx = s.context - xbar;
      sxx += dx * dx;
      for (size_t i = 0; i < ybar.size(); ++i) sxy[i] += dx * (At(s.y, i) - ybar[i]);
    }
    const bool regress = steps.size() >= 3 && sxx > 0;
    const double dx_all = counts.context_sum - big_n * xbar;
    out.total = Scaled(ybar, big_n);
    if (regress) AddTo(out.total, sxy, dx_all / sxx);
    // First stage: the steps not kept, from the residuals of the fit.
    std::vector<Variance> cycles_parts, joules_parts;
    const double df1 = n - (regress ? 2.0 : 1.0);
    if (n < big_n && df1 > 0) {
      for (size_t which : {kCycles, kJoules}) {
        double sse = 0;
        const double slope = regress ? sxy[which] / sxx : 0.0;
        for (const StepEstimate& s : steps) {
          const double r = At(s.y, which) - ybar[which] - slope * (s.context - xbar);
          sse += r * r;
        }
        const Variance v{big_n * big_n * (1.0 - n / big_n) * (sse / df1) / n, df1};
        (which == kCycles ? cycles_parts : joules_parts).push_back(v);
      }
    }
    // Second stage: the layers not measured in the kept steps.
    double var2_c = 0, var2_j = 0, df2 = 0;
    for (const StepEstimate& s : steps) {
      var2_c += s.var_cycles;
      var2_j += s.var_joules;
      df2 += double(s.df);
    }
    cycles_parts.push_back({big_n / n * var2_c, df2});
    joules_parts.push_back({big_n / n * var2_j, df2});
    out.cycles = Combine(cycles_parts);
    out.joules = Combine(joules_parts);
    out.prologue_cycles = steps.front().prologue_cycles;
    out.layer_cycles = steps.front().layer_cycles;
    return out;
  }
};

// Measures the kept units of a sampled run at their last op's retirement.
class UnitMeter {
 public:
  UnitMeter(const ArchConfig& arch, SampledSource& source, int64_t layers)
      : arch_(arch),
        table_(ResolveEnergyTable(arch.energy, arch.dram.preset)),
        source_(source),
        layers_(layers),
        last_(kGlobals, 0.0) {}

  void Measure(const RunResult& so_far, const std::vector<OpResult>& ops) {
    const UnitTag tag = source_.PopUnit();
    const Vec now = GlobalsOf(so_far);
    Vec delta = now;
    AddTo(delta, last_, -1.0);
    last_ = now;
    // Events of the unit's own ops: the counters at its end also hold the
    // next unit's loads already under way, which the reduced trace does not
    // always share with the full one. Activates and refreshes are no op's.
    for (size_t i = 0; i < kEventCount; ++i) {
      if (kEventFields[i] != &EventCounts::dram_activates &&
          kEventFields[i] != &EventCounts::dram_refreshes)
        delta[kEvents + i] = 0;
    }
    PhaseSampler& phase = phases_[PhaseIndex(tag.phase)];
    // Per-op figures: the entries this unit's ops retired into.
    if (op_last_.size() < ops.size()) op_last_.resize(ops.size());
    for (size_t i = 0; i < ops.size(); ++i) {
      const OpResult& r = ops[i];
      const bool mine = r.op.phase == tag.phase &&
                        (tag.family == Family::kBlock ? r.op.layer == tag.layer : r.op.layer < 0);
      if (!mine) continue;
      Vec fields = OpFieldsOf(r);
      Vec op_delta = fields;
      if (!op_last_[i].empty()) AddTo(op_delta, op_last_[i], -1.0);
      op_last_[i] = std::move(fields);
      if (op_delta[kOpOps] == 0 && op_delta[kOpCycles] == 0 && op_delta[kOpDramBytes] == 0)
        continue;  // not retired in this unit (a prologue entry during the epilogue)
      for (size_t k = 0; k < kEventCount; ++k) {
        if (kEventFields[k] != &EventCounts::dram_activates &&
            kEventFields[k] != &EventCounts::dram_refreshes)
          delta[kEvents + k] += op_delta[kOpEvents + k];
      }
      const size_t slot = phase.SlotOf(tag.family, r.op);
      Vec placed(kGlobals + (slot + 1) * kOpFields, 0.0);
      std::copy(op_delta.begin(), op_delta.end(),
                placed.begin() + long(kGlobals + slot * kOpFields));
      AddTo(delta, placed);
    }
    PriceJoules(delta);
    StepMeasure& open = phase.open;
    if (open.step != tag.step) {
      phase.Close(InnerLayers());
      open.step = tag.step;
      open.context = double(tag.context);
    }
    if (tag.family == Family::kBlock) {
      ++phase.detailed_layers;
      open.block_cycles += delta[kCycles];
      ++open.blocks;
    }
    if (tag.family == Family::kBlock && !tag.certain) {
      AddTo(open.layers_sum, delta);
      ++open.m;
      open.cycles_sum += delta[kCycles];
      open.cycles_sq += delta[kCycles] * delta[kCycles];
      open.joules_sum += delta[kJoules];
      open.joules_sq += delta[kJoules] * delta[kJoules];
    } else {
      if (tag.family == Family::kPrologue) open.prologue_cycles += delta[kCycles];
      AddTo(open.fixed, delta);
    }
  }

  RunResult Finish(const RunResult& reduced, const SamplingOptions& options) {
    for (PhaseSampler& p : phases_) p.Close(InnerLayers());
    // What ran after the last kept unit retired (the final stores' drain).
    Vec tail = GlobalsOf(reduced);
    AddTo(tail, last_, -1.0);
    PriceJoules(tail);
    PhaseEstimate estimates[2];
    int last_phase = -1;
    for (int p = 0; p < 2; ++p) {
      if (source_.counts(p).steps == 0) continue;
      estimates[p] = phases_[p].Estimate(source_.counts(p));
      last_phase = p;
    }
    if (last_phase < 0) return reduced;
    AddTo(estimates[last_phase].total, tail);
    return Assemble(reduced, estimates, options);
  }

 private:
  void PriceJoules(Vec& delta) const {
    RunResult unit;
    unit.cycles = Count(delta[kCycles]);
    unit.sim_ps = uint64_t(std::llround(delta[kCycles] * PeriodPs()));
    unit.events = EventsAt(delta, kEvents);
    delta[kJoules] = ComputeEnergyWithTable(arch_, table_, unit).total_joules();
  }
  double PeriodPs() const { return std::round(1e6 / arch_.clock.core_mhz); }
  int64_t InnerLayers() const { return std::max<int64_t>(0, layers_ - 2); }

  RunResult Assemble(const RunResult& reduced, const PhaseEstimate* estimates,
                     const SamplingOptions& options) const;

  const ArchConfig& arch_;
  EnergyTable table_;
  SampledSource& source_;
  int64_t layers_;
  Vec last_;                  // cumulative globals at the last unit's end
  std::vector<Vec> op_last_;  // cumulative per-op fields, by op result index
  PhaseSampler phases_[2];
};

// Rounds `parts` to integers that sum to `total` (largest remainder).
std::vector<uint64_t> Apportion(const std::vector<double>& parts, uint64_t total) {
  std::vector<uint64_t> out(parts.size(), 0);
  std::vector<std::pair<double, size_t>> rest;
  uint64_t sum = 0;
  for (size_t i = 0; i < parts.size(); ++i) {
    const double p = std::max(0.0, parts[i]);
    out[i] = uint64_t(std::floor(p));
    sum += out[i];
    rest.push_back({p - std::floor(p), i});
  }
  std::stable_sort(rest.begin(), rest.end(),
                   [](const auto& a, const auto& b) { return a.first > b.first; });
  for (size_t k = 0; sum < total; k = (k + 1) % rest.size(), ++sum) ++out[rest[k].second];
  for (size_t i = out.size(); sum > total && i-- > 0;) {
    const uint64_t cut = std::min(out[i], sum - total);
    out[i] -= cut;
    sum -= cut;
  }
  return out;
}

OpResult OpAt(const Slot& slot, const Vec& v, size_t offset, double scale,
              const ResourceRates& rates) {
  OpResult r;
  r.op = slot.op;
  r.op.step = 0;
  r.cycles = Count(scale * At(v, offset + kOpCycles));
  r.ops = Count(scale * At(v, offset + kOpOps));
  r.dram_bytes = Count(scale * At(v, offset + kOpDramBytes));
  r.bound_cycles = Count(scale * At(v, offset + kOpBoundCycles));
  for (size_t i = 0; i < kDemandCount; ++i)
    r.demand.*kDemandFields[i] = scale * At(v, offset + kOpDemand + i);
  for (size_t i = 0; i < kEventCount; ++i)
    r.events.*kEventFields[i] = Count(scale * At(v, offset + kOpEvents + i));
  r.bound_by = BoundsOf(r.demand, rates).binding;
  r.regime = RegimeOf(r.bound_by);
  return r;
}

double RelativeHalfWidth(const Variance& v, double estimate, double confidence) {
  if (v.value <= 0 || estimate <= 0) return 0.0;
  const boost::math::students_t t(v.df);
  return boost::math::quantile(t, 1.0 - (1.0 - confidence) / 2.0) * std::sqrt(v.value) / estimate;
}

RunResult UnitMeter::Assemble(const RunResult& reduced, const PhaseEstimate* estimates,
                              const SamplingOptions& options) const {
  RunResult out;
  out.arch_name = reduced.arch_name;
  out.model_name = reduced.model_name;
  out.weights_resident = reduced.weights_resident;
  out.core_mhz = reduced.core_mhz;
  out.peak_ops_per_second = reduced.peak_ops_per_second;
  out.dram_peak_bytes_per_second = reduced.dram_peak_bytes_per_second;
  out.vector_peak_ops_per_second = reduced.vector_peak_ops_per_second;
  out.concurrency_bytes_per_second = reduced.concurrency_bytes_per_second;
  out.decoder_bytes_per_second = reduced.decoder_bytes_per_second;
  const ResourceRates rates = RatesOf(arch_);
  const double period = PeriodPs();

  Vec total;
  for (int p = 0; p < 2; ++p) AddTo(total, estimates[p].total);
  total.resize(std::max(total.size(), kGlobals), 0.0);
  out.cycles = Count(total[kCycles]);
  out.sim_ps = out.cycles * uint64_t(period);
  std::vector<double> stall_parts(total.begin() + kStalls, total.begin() + kStalls + kStallCount);
  const std::vector<uint64_t> stalls = Apportion(stall_parts, out.cycles);
  for (size_t i = 0; i < kStallCount; ++i) out.stalls.*kStallFields[i] = stalls[i];
  out.events = EventsAt(total, kEvents);
  for (size_t i = 0; i < kDramCount; ++i) out.dram.*kDramStatsFields[i] = Count(total[kDram + i]);
  out.events.dram_activates = out.dram.activates;
  out.events.dram_refreshes = out.dram.refreshes;
  out.vector_busy_cycles = Count(total[kVectorBusy]);
  out.sram_port_busy_cycles = Count(total[kSramPortBusy]);

  // Phases and per-op figures (layers: the per-layer mean of the estimate).
  uint64_t prefill_cycles = 0;
  uint64_t phase_start = 0;
  std::vector<uint64_t> run_stalls(kStallCount, 0);
  std::vector<Variance> cycle_parts, joule_parts;
  for (int p = 0; p < 2; ++p) {
    const PhaseCounts& counts = source_.counts(p);
    if (counts.steps == 0) continue;
    const Phase phase = p == 0 ? Phase::kPrefill : Phase::kDecode;
    const PhaseEstimate& e = estimates[p];
    const PhaseSampler& sampler = phases_[p];
    PhaseResult result;
    result.phase = phase;
    result.tokens = counts.tokens;
    if (p == 0) {
      prefill_cycles = std::min(out.cycles, Count(At(e.total, kCycles)));
      result.cycles = prefill_cycles;
    } else {
      result.cycles = out.cycles - prefill_cycles;
    }
    for (int family = 0; family < 3; ++family) {
      const int64_t copies = family == int(Family::kBlock) ? layers_ : 1;
      for (int64_t layer = 0; layer < copies; ++layer) {
        for (size_t s = 0; s < sampler.slots.size(); ++s) {
          const Slot& slot = sampler.slots[s];
          if (int(slot.family) != family) continue;
          OpResult r = OpAt(slot, e.total, kGlobals + s * kOpFields, 1.0 / double(copies), rates);
          if (slot.family == Family::kBlock) r.op.layer = layer;
          double start = double(phase_start);
          if (slot.family != Family::kPrologue)
            start += e.prologue_cycles +
                     e.layer_cycles * double(slot.family == Family::kBlock ? layer : layers_);
          r.start_cycle = uint64_t(start);
          result.demand.Add(r.demand);
          out.ops += r.ops;
          out.layers.push_back(std::move(r));
        }
      }
    }
    // The phase's stalls: its own estimated causes, apportioned to its
    // cycles; the run's are the phases' sum (so both identities hold).
    std::vector<double> phase_stall_parts;
    for (size_t i = 0; i < kStallCount; ++i) phase_stall_parts.push_back(At(e.total, kStalls + i));
    const std::vector<uint64_t> phase_stalls = Apportion(phase_stall_parts, result.cycles);
    for (size_t i = 0; i < kStallCount; ++i) {
      result.stalls.*kStallFields[i] = phase_stalls[i];
      run_stalls[i] += phase_stalls[i];
    }
    const ResourceBounds bounds = BoundsOf(result.demand, rates);
    result.bound_by = bounds.binding;
    result.bound_cycles = uint64_t(std::ceil(bounds.max_cycles() - 1e-9));
    out.phases.push_back(result);
    phase_start += result.cycles;

    SamplingPhase sp;
    sp.phase = phase;
    sp.detailed_steps = source_.kept_steps(p);
    sp.total_steps = counts.steps;
    sp.cycles_bound = RelativeHalfWidth(e.cycles, At(e.total, kCycles), options.confidence);
    sp.energy_bound = RelativeHalfWidth(e.joules, At(e.total, kJoules), options.confidence);
    out.sampling.phases.push_back(sp);
    out.sampling.detailed_steps += sp.detailed_steps;
    out.sampling.total_steps += sp.total_steps;
    out.sampling.detailed_layers += sampler.detailed_layers;
    out.sampling.total_layers += counts.steps * layers_;
    cycle_parts.push_back(e.cycles);
    joule_parts.push_back(e.joules);
  }
  if (!out.phases.empty()) {
    for (size_t i = 0; i < kStallCount; ++i) out.stalls.*kStallFields[i] = run_stalls[i];
  }
  const PhaseCounts& decode = source_.counts(1);
  const PhaseCounts& prefill = source_.counts(0);
  out.tokens = decode.tokens > 0 ? decode.tokens : prefill.tokens;
  if (prefill.steps > 0) {
    out.first_token_cycles = prefill_cycles;
  } else if (!phases_[1].steps.empty()) {
    out.first_token_cycles = std::min(out.cycles, Count(At(phases_[1].steps.front().y, kCycles)));
  }

  SamplingSummary& s = out.sampling;
  s.sampled = true;
  s.confidence = options.confidence;
  const Variance cycles = Combine(cycle_parts);
  const Variance joules = Combine(joule_parts);
  s.degrees_of_freedom = cycles.df;
  s.t_quantile = cycles.value > 0 ? boost::math::quantile(boost::math::students_t(cycles.df),
                                                          1.0 - (1.0 - options.confidence) / 2.0)
                                  : 0.0;
  s.cycles_bound = RelativeHalfWidth(cycles, total[kCycles], options.confidence);
  s.energy_bound = RelativeHalfWidth(joules, total[kJoules], options.confidence);
  return out;
}

}  // namespace

RunResult RunSampledSimulation(const ArchConfig& arch, TraceSource& trace,
                               const SimOptions& options, const SamplingOptions& sampling) {
  if (sampling.layers < 1 || sampling.decode_steps < 3 || sampling.step_layers < 2 ||
      sampling.prefill_layers < 2) {
    throw Error(ExitCode::kInternal,
                "sampling: layers >= 1, decode_steps >= 3, step_layers >= 2 "
                "and prefill_layers >= 2 are required");
  }
  SampledSource source(trace, sampling);
  UnitMeter meter(arch, source, sampling.layers);
  RetireProbe probe;
  probe.wants = [&source](int64_t index) { return source.IsUnitEnd(index); };
  probe.measure = [&meter](int64_t, const RunResult& so_far, const std::vector<OpResult>& ops) {
    meter.Measure(so_far, ops);
  };
  const RunResult reduced = RunSimulation(arch, source, options, probe);
  return meter.Finish(reduced, sampling);
}

}  // namespace tritsim
