#include "report/run_report.h"

#include <fmt/format.h>
#include <algorithm>
#include <cstdio>
#include <nlohmann/json.hpp>
#include <sstream>
#include <vector>

#include "common/csv.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

double Seconds(uint64_t cycles, const RunResult& run) {
  return double(cycles) / (run.core_mhz * 1e6);
}

double Ratio(double num, double den) { return den > 0 ? num / den : 0.0; }

const char* RegimeName(Regime r) { return r == Regime::kCompute ? "compute" : "memory"; }

double Efficiency(const OpResult& layer) {
  return Ratio(double(layer.bound_cycles), double(layer.cycles));
}

uint64_t DecodeTokensPerSequence(const RunReport& r) {
  return uint64_t(std::max<int64_t>(0, r.workload.decode_tokens));
}

std::string Fixed(double value, int digits) { return fmt::format("{:.{}f}", value, digits); }

std::string Scaled(double value, const char* unit) {
  const char* prefixes[] = {"", "k", "M", "G", "T", "P"};
  int i = 0;
  while (value >= 1000.0 && i < 5) {
    value /= 1000.0;
    ++i;
  }
  return Fixed(value, value < 10 ? 2 : 1) + " " + prefixes[i] + unit;
}

std::string Time(double seconds) {
  if (seconds >= 1) return Fixed(seconds, 3) + " s";
  if (seconds >= 1e-3) return Fixed(seconds * 1e3, 3) + " ms";
  return Fixed(seconds * 1e6, 3) + " us";
}

// Dynamic energy of one layer's own events (no leakage, no DRAM activates
// or refreshes, which belong to the run as a whole).
EnergyBreakdown LayerEnergy(const RunReport& r, const OpResult& layer) {
  RunResult only;
  only.events = layer.events;
  return ComputeEnergyWithTable(r.arch, r.table, only);
}

std::string Percent(double fraction) { return Fixed(fraction * 100.0, 1) + "%"; }

// Energy no layer carries (leakage, DRAM activates and refreshes).
double UnattributedJoules(const RunReport& r) {
  double layers = 0.0;
  for (const OpResult& layer : r.run.layers) layers += LayerEnergy(r, layer).total_joules();
  return r.energy.total_joules() - layers;
}

}  // namespace

namespace {

// a += scale * b, component by component (the five summed components).
void AddScaled(const EnergyBreakdown& b, double scale, EnergyBreakdown& a) {
  a.arithmetic_joules += scale * b.arithmetic_joules;
  a.sram_joules += scale * b.sram_joules;
  a.dram_joules += scale * b.dram_joules;
  a.decoder_joules += scale * b.decoder_joules;
  a.leakage_joules += scale * b.leakage_joules;
}

}  // namespace

PhaseFigures ComputePhaseFigures(const RunReport& r, const PhaseResult& p) {
  PhaseFigures f;
  f.seconds = Seconds(p.cycles, r.run);
  f.tokens_per_second = Ratio(double(p.tokens), f.seconds);
  EnergyBreakdown unattributed = r.energy;  // minus every layer's own energy below
  for (const OpResult& layer : r.run.layers) {
    const EnergyBreakdown own = LayerEnergy(r, layer);
    AddScaled(own, -1.0, unattributed);
    if (layer.op.phase == p.phase) {
      f.joules += own.total_joules();
      AddScaled(own, 1.0, f.energy);
    }
  }
  // The layers' events are a subset of the run's, so a component of the
  // remainder is >= 0 but for rounding (-1e-20 J): never shown negative.
  for (double* c :
       {&unattributed.arithmetic_joules, &unattributed.sram_joules, &unattributed.dram_joules,
        &unattributed.decoder_joules, &unattributed.leakage_joules}) {
    *c = std::max(0.0, *c);
  }
  const double share = Ratio(double(p.cycles), double(r.run.cycles));
  f.joules += UnattributedJoules(r) * share;
  AddScaled(unattributed, share, f.energy);
  f.joules_per_token = Ratio(f.joules, double(p.tokens));
  f.watts = Ratio(f.joules, f.seconds);
  return f;
}

Headline ComputeHeadline(const RunReport& r) {
  const RunResult& run = r.run;
  Headline h;
  h.seconds = Seconds(run.cycles, run);
  h.tokens_per_second = Ratio(double(run.tokens), h.seconds);
  h.time_to_first_token_seconds = Seconds(run.first_token_cycles, run);
  for (const PhaseResult& p : run.phases) {
    if (p.phase == Phase::kDecode && DecodeTokensPerSequence(r) > 0) {
      h.time_per_output_token_seconds = Seconds(p.cycles, run) / double(DecodeTokensPerSequence(r));
    }
  }
  h.joules_per_token = Ratio(r.energy.total_joules(), double(run.tokens));
  h.picojoules_per_op = Ratio(r.energy.total_joules() * 1e12, double(run.ops));
  const double bytes = double(run.dram.reads + run.dram.writes) > 0
                           ? double(run.events.dram_bytes_read + run.events.dram_bytes_written)
                           : 0.0;
  h.dram_bandwidth_bytes_per_second = Ratio(bytes, h.seconds);
  const double channel_ps = double(run.sim_ps) * double(std::max<int64_t>(1, r.arch.dram.channels));
  h.dram_bus_utilization = r.arch.dram.is_ideal() ? Ratio(h.dram_bandwidth_bytes_per_second,
                                                          run.dram_peak_bytes_per_second)
                                                  : Ratio(double(run.dram.busy_ps), channel_ps);
  h.refresh_fraction = Ratio(double(run.dram.refresh_ps), channel_ps);
  h.tree_utilization = Ratio(double(run.stalls.busy), double(run.cycles));
  h.vector_utilization = Ratio(double(run.vector_busy_cycles), double(run.cycles));
  h.sram_port_utilization =
      Ratio(double(run.sram_port_busy_cycles),
            double(run.cycles) * double(r.arch.sram.banks) * double(r.arch.sram.ports));
  double memory_cycles = 0, all_cycles = 0;
  for (const OpResult& layer : run.layers) {
    all_cycles += double(layer.cycles);
    if (layer.regime == Regime::kMemory) memory_cycles += double(layer.cycles);
  }
  h.memory_bound_cycle_share = Ratio(memory_cycles, all_cycles);
  return h;
}

namespace {

nlohmann::ordered_json StallsJson(const StallBreakdown& s) {
  return {{"busy", s.busy},
          {"dram_wait", s.dram_wait},
          {"sram_conflict", s.sram_conflict},
          {"vector_wait", s.vector_wait},
          {"idle", s.idle}};
}

nlohmann::ordered_json EnergyJson(const EnergyBreakdown& e) {
  return {{"arithmetic", e.arithmetic_joules},
          {"sram", e.sram_joules},
          {"dram", e.dram_joules},
          {"decoder", e.decoder_joules},
          {"leakage", e.leakage_joules}};
}

// The `sampling` section of a sampled run (docs/report-format.md).
nlohmann::ordered_json SamplingJson(const SamplingSummary& s) {
  using nlohmann::ordered_json;
  ordered_json phases = ordered_json::array();
  for (const SamplingPhase& p : s.phases) {
    phases.push_back({{"name", PhaseName(p.phase)},
                      {"detailed_steps", p.detailed_steps},
                      {"total_steps", p.total_steps},
                      {"relative_error_bound",
                       {{"cycles", p.cycles_bound}, {"energy_joules", p.energy_bound}}}});
  }
  return {{"method",
           "systematic sample of steps and layers; regression on context (99.7% "
           "two-sided Student t interval)"},
          {"detailed_steps", s.detailed_steps},
          {"total_steps", s.total_steps},
          {"detailed_layers", s.detailed_layers},
          {"total_layers", s.total_layers},
          {"confidence", s.confidence},
          {"t_quantile", s.t_quantile},
          {"degrees_of_freedom", s.degrees_of_freedom},
          {"relative_error_bound", {{"cycles", s.cycles_bound}, {"energy_joules", s.energy_bound}}},
          {"phases", phases}};
}

}  // namespace

nlohmann::ordered_json RunJson(const RunReport& r) {
  using nlohmann::ordered_json;
  const RunResult& run = r.run;
  const Headline h = ComputeHeadline(r);
  ordered_json j;
  j["schema"] = kRunSchema;
  j["design"] = {{"arch", run.arch_name},
                 {"model", run.model_name},
                 {"core_mhz", run.core_mhz},
                 {"weights_resident", run.weights_resident}};
  j["workload"] = {{"prefill", r.workload.prefill_tokens},
                   {"decode", r.workload.decode_tokens},
                   {"context", r.workload.context_tokens},
                   {"batch", r.workload.batch}};
  j["totals"] = {{"cycles", run.cycles},
                 {"seconds", h.seconds},
                 {"tokens", run.tokens},
                 {"tokens_per_second", h.tokens_per_second},
                 {"ops", run.ops},
                 {"time_to_first_token_seconds", h.time_to_first_token_seconds},
                 {"time_per_output_token_seconds", h.time_per_output_token_seconds},
                 {"energy_joules", r.energy.total_joules()},
                 {"joules_per_token", h.joules_per_token},
                 {"picojoules_per_op", h.picojoules_per_op},
                 {"area_mm2", r.area.total_mm2()}};
  if (run.sampling.sampled) j["sampling"] = SamplingJson(run.sampling);
  ordered_json phases = ordered_json::array();
  for (const PhaseResult& p : run.phases) {
    const PhaseFigures f = ComputePhaseFigures(r, p);
    phases.push_back({{"name", PhaseName(p.phase)},
                      {"cycles", p.cycles},
                      {"seconds", f.seconds},
                      {"tokens", p.tokens},
                      {"tokens_per_second", f.tokens_per_second},
                      {"bound_by", ResourceName(p.bound_by)},
                      {"bound_cycles", p.bound_cycles},
                      {"joules", f.joules},
                      {"joules_per_token", f.joules_per_token},
                      {"watts", f.watts},
                      {"stalls", StallsJson(p.stalls)},
                      {"energy", EnergyJson(f.energy)}});
  }
  j["phases"] = phases;
  j["stalls"] = StallsJson(run.stalls);
  j["utilization"] = {{"tree_array", h.tree_utilization},
                      {"vector_unit", h.vector_utilization},
                      {"sram_ports", h.sram_port_utilization},
                      {"dram_bus", h.dram_bus_utilization}};
  j["dram"] = {{"bytes_read", run.events.dram_bytes_read},
               {"bytes_written", run.events.dram_bytes_written},
               {"row_hit_rate", run.dram.row_hit_rate()},
               {"bandwidth_bytes_per_second", h.dram_bandwidth_bytes_per_second},
               {"refresh_fraction", h.refresh_fraction},
               {"peak_bytes_per_second", run.dram_peak_bytes_per_second},
               {"reads", run.dram.reads},
               {"writes", run.dram.writes},
               {"row_hits", run.dram.row_hits},
               {"row_misses", run.dram.row_misses},
               {"row_conflicts", run.dram.row_conflicts},
               {"activates", run.dram.activates},
               {"refreshes", run.dram.refreshes}};
  j["energy"] = EnergyJson(r.energy);
  j["area"] = {{"array_mm2", r.area.array_mm2}, {"vector_mm2", r.area.vector_mm2},
               {"sram_mm2", r.area.sram_mm2},   {"decoder_mm2", r.area.decoder_mm2},
               {"other_mm2", r.area.other_mm2}, {"total_mm2", r.area.total_mm2()}};
  j["arch"] = {
      {"peak_ops_per_second", run.peak_ops_per_second},
      {"dram_peak_bytes_per_second", run.dram_peak_bytes_per_second},
      {"ridge_ops_per_byte", Ratio(run.peak_ops_per_second, run.dram_peak_bytes_per_second)},
      {"vector_peak_ops_per_second", run.vector_peak_ops_per_second},
      {"concurrency_bytes_per_second", run.concurrency_bytes_per_second},
      {"decoder_bytes_per_second", run.decoder_bytes_per_second}};
  const EventCounts& e = run.events;
  j["events"] = {{"weight_uses", e.weight_uses},
                 {"weight_uses_zero", e.weight_uses_zero},
                 {"accumulator_adds", e.accumulator_adds},
                 {"decoder_bytes", e.decoder_bytes},
                 {"vector_macs", e.vector_macs},
                 {"vector_special", e.vector_special},
                 {"vector_elementwise", e.vector_elementwise},
                 {"sram_reads", e.sram_reads},
                 {"sram_writes", e.sram_writes}};
  ordered_json layers = ordered_json::array();
  for (const OpResult& layer : run.layers) {
    const EnergyBreakdown e = LayerEnergy(r, layer);
    layers.push_back({{"name", layer.op.name},
                      {"layer", layer.op.layer},
                      {"phase", PhaseName(layer.op.phase)},
                      {"kind", OpKindName(layer.op.kind)},
                      {"tensor", TensorClassName(layer.op.tensor)},
                      {"cycles", layer.cycles},
                      {"ops", layer.ops},
                      {"dram_bytes", layer.dram_bytes},
                      {"intensity_ops_per_byte", layer.intensity()},
                      {"bound_cycles", layer.bound_cycles},
                      {"regime", RegimeName(layer.regime)},
                      {"bound_by", ResourceName(layer.bound_by)},
                      {"roofline_efficiency", Efficiency(layer)},
                      {"energy_joules", e.total_joules()}});
  }
  j["layers"] = layers;
  return j;
}

namespace {

// printf-style %g with `digits` significant digits (the CSV's number format).
std::string General(double value, int digits) { return fmt::format("{:.{}g}", value, digits); }

constexpr int kSecondsDigits = 9;  // CSV seconds: %.9g
constexpr int kFigureDigits = 6;   // other CSV reals: %.6g

const std::vector<std::string>& RunCsvHeader() {
  static const std::vector<std::string> header = {"phase",
                                                  "layer",
                                                  "name",
                                                  "kind",
                                                  "tensor",
                                                  "cycles",
                                                  "seconds",
                                                  "ops",
                                                  "dram_bytes",
                                                  "intensity_ops_per_byte",
                                                  "bound_cycles",
                                                  "regime",
                                                  "roofline_efficiency",
                                                  "energy_joules",
                                                  "arithmetic_joules",
                                                  "sram_joules",
                                                  "dram_joules",
                                                  "decoder_joules",
                                                  "bound_by"};
  return header;
}

std::vector<std::string> RunCsvRow(const RunReport& r, const OpResult& layer) {
  const EnergyBreakdown e = LayerEnergy(r, layer);
  return {PhaseName(layer.op.phase),
          std::to_string(layer.op.layer),
          layer.op.name,
          OpKindName(layer.op.kind),
          TensorClassName(layer.op.tensor),
          std::to_string(layer.cycles),
          General(Seconds(layer.cycles, r.run), kSecondsDigits),
          std::to_string(layer.ops),
          std::to_string(layer.dram_bytes),
          General(layer.intensity(), kFigureDigits),
          std::to_string(layer.bound_cycles),
          RegimeName(layer.regime),
          General(Efficiency(layer), kFigureDigits),
          General(e.total_joules(), kFigureDigits),
          General(e.arithmetic_joules, kFigureDigits),
          General(e.sram_joules, kFigureDigits),
          General(e.dram_joules, kFigureDigits),
          General(e.decoder_joules, kFigureDigits),
          ResourceName(layer.bound_by)};
}

}  // namespace

// One RFC 4180 line per layer op (common/csv.h), so any op name survives.
std::string RunCsv(const RunReport& r) {
  std::string out = CsvLine(RunCsvHeader());
  for (const OpResult& layer : r.run.layers) out += CsvLine(RunCsvRow(r, layer));
  return out;
}

// " (+-0.42%)" after a sampled figure, or "" in an exact run.
std::string Bound(const SamplingSummary& s, double relative) {
  if (!s.sampled) return "";
  return " (+-" + fmt::format("{:.2f}", relative * 100.0) + "%)";
}

const SamplingPhase* SampledPhase(const SamplingSummary& s, Phase phase) {
  for (const SamplingPhase& p : s.phases) {
    if (p.phase == phase) return &p;
  }
  return nullptr;
}

// One phase: time, throughput, energy and the binding resource.
void PrintPhase(const RunReport& r, const PhaseResult& p, std::ostream& out) {
  const PhaseFigures f = ComputePhaseFigures(r, p);
  const SamplingPhase* sp = SampledPhase(r.run.sampling, p.phase);
  out << "    " << PhaseName(p.phase) << (p.phase == Phase::kDecode ? "        " : "       ")
      << p.cycles << " cycles" << (sp ? Bound(r.run.sampling, sp->cycles_bound) : "") << " = "
      << Time(f.seconds) << ", " << p.tokens << (p.tokens == 1 ? " token, " : " tokens, ")
      << Fixed(f.tokens_per_second, 2) << " tokens/s, " << Fixed(f.joules_per_token * 1e3, 3)
      << " mJ/token, " << Fixed(f.watts, 2) << " W; bound by " << ResourceName(p.bound_by) << "\n";
}

void PrintRunSummary(const RunReport& r, std::ostream& out) {
  const RunResult& run = r.run;
  const Headline h = ComputeHeadline(r);
  out << "tritsim run: " << run.model_name << " on " << run.arch_name << "\n";
  out << "  workload        prefill " << r.workload.prefill_tokens << ", decode "
      << r.workload.decode_tokens << ", context " << r.workload.context_tokens << ", batch "
      << r.workload.batch << "\n";
  out << "  core clock      " << Fixed(run.core_mhz, 1) << " MHz; peak "
      << Scaled(run.peak_ops_per_second, "op/s") << ", DRAM "
      << Scaled(run.dram_peak_bytes_per_second, "B/s") << ", ridge "
      << Fixed(Ratio(run.peak_ops_per_second, run.dram_peak_bytes_per_second), 1) << " op/B\n\n";
  const SamplingSummary& sampling = run.sampling;
  if (sampling.sampled) {
    out << "  sampled         " << sampling.detailed_steps << " of " << sampling.total_steps
        << " steps, " << sampling.detailed_layers << " of " << sampling.total_layers
        << " layers in detail; bounds: " << Fixed(sampling.confidence * 100.0, 1)
        << "% confidence, relative\n";
  }
  out << "  time            " << run.cycles << " cycles" << Bound(sampling, sampling.cycles_bound)
      << " = " << Time(h.seconds) << "\n";
  for (const PhaseResult& p : run.phases) PrintPhase(r, p, out);
  out << "  first token     " << Time(h.time_to_first_token_seconds) << "\n";
  if (h.time_per_output_token_seconds > 0) {
    out << "  per output tok  " << Time(h.time_per_output_token_seconds) << "\n";
  }
  out << "  throughput      " << Fixed(h.tokens_per_second, 2) << " tokens/s\n\n";
  const StallBreakdown& s = run.stalls;
  const double c = double(std::max<uint64_t>(1, run.cycles));
  out << "  tree array      busy " << Percent(s.busy / c) << ", DRAM wait "
      << Percent(s.dram_wait / c) << ", SRAM conflict " << Percent(s.sram_conflict / c)
      << ", vector wait " << Percent(s.vector_wait / c) << ", idle " << Percent(s.idle / c) << "\n";
  out << "  utilization     tree array " << Percent(h.tree_utilization) << ", vector unit "
      << Percent(h.vector_utilization) << ", SRAM ports " << Percent(h.sram_port_utilization)
      << ", DRAM bus " << Percent(h.dram_bus_utilization) << "\n";
  out << "  DRAM            " << Scaled(h.dram_bandwidth_bytes_per_second, "B/s")
      << " achieved, row hits " << Percent(run.dram.row_hit_rate()) << ", refresh "
      << Percent(h.refresh_fraction) << "\n\n";
  out << "  energy          " << Fixed(r.energy.total_joules() * 1e3, 3) << " mJ total"
      << Bound(sampling, sampling.energy_bound) << ", " << Fixed(h.joules_per_token * 1e3, 3)
      << " mJ/token, " << Fixed(h.picojoules_per_op, 3) << " pJ/op\n";
  const double e = std::max(1e-300, r.energy.total_joules());
  out << "    by component  arithmetic " << Percent(r.energy.arithmetic_joules / e) << ", SRAM "
      << Percent(r.energy.sram_joules / e) << ", DRAM " << Percent(r.energy.dram_joules / e)
      << ", decoder " << Percent(r.energy.decoder_joules / e) << ", leakage "
      << Percent(r.energy.leakage_joules / e) << "\n";
  out << "  area            " << Fixed(r.area.total_mm2(), 2) << " mm^2 (array "
      << Fixed(r.area.array_mm2, 2) << ", vector " << Fixed(r.area.vector_mm2, 2) << ", SRAM "
      << Fixed(r.area.sram_mm2, 2) << ", decoder " << Fixed(r.area.decoder_mm2, 2) << ", other "
      << Fixed(r.area.other_mm2, 2) << "), estimate\n\n";
  std::vector<const OpResult*> top;
  for (const OpResult& layer : run.layers) top.push_back(&layer);
  std::stable_sort(top.begin(), top.end(),
                   [](const OpResult* a, const OpResult* b) { return a->cycles > b->cycles; });
  out << "  top layers by time\n";
  out << "    phase    layer  op               cycles      op/B     bound by             of "
         "bound\n";
  for (size_t i = 0; i < std::min<size_t>(8, top.size()); ++i) {
    const OpResult& l = *top[i];
    out << fmt::format("    {:<8} {:>5}  {:<16} {:>10} {:>9.1f}  {:<19} {:>6.1f}%\n",
                       PhaseName(l.op.phase), l.op.layer, l.op.name, l.cycles, l.intensity(),
                       ResourceName(l.bound_by), Efficiency(l) * 100.0);
  }
  out << "\n  Model estimates for architecture exploration, not sign-off numbers.\n";
}

}  // namespace tritsim
