#include "cli/commands.h"

#include <boost/program_options.hpp>
#include <fstream>
#include <iostream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "cli/cli_options.h"
#include "cli/progress_line.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "common/output_paths.h"
#include "config/energy_table.h"
#include "datapath/accumulator_width.h"
#include "energy/area_model.h"
#include "energy/energy_model.h"
#include "mapping/tiler.h"
#include "model/model_stats.h"
#include "model/trace_builder.h"
#include "report/inspect_report.h"
#include "report/plots.h"
#include "report/resolved_config.h"
#include "report/run_report.h"
#include "run/sampling.h"
#include "run/simulation.h"
#include "trace/trace_format.h"
#include "trace/trace_reader.h"
#include "trace/trace_writer.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

std::string JsonText(const nlohmann::ordered_json& j) { return j.dump(2) + "\n"; }

// One line on stderr when the accumulator can wrap on the model's GEMMs.
void WarnAccumulatorWidth(const ArchConfig& arch, const ModelConfig& model) {
  const std::string warning = AccumulatorWarning(arch, model);
  if (!warning.empty()) std::cerr << "tritsim: warning: " << warning << "\n";
}

}  // namespace

std::string MainUsage() {
  return "tritsim " TRITSIM_VERSION
         ": cycle-level estimates of ternary-weight LLM inference accelerators\n"
         "\n"
         "usage: tritsim COMMAND [options]   (tritsim COMMAND --help for its options)\n"
         "\n"
         "commands:\n"
         "  inspect   what a model and design point imply before simulation\n"
         "  trace     write the layer trace of a model and workload\n"
         "  run       simulate a workload on a design point and report it\n"
         "  sweep     run many design points (see tritsim sweep --help)\n"
         "  compare   run a study's named variants side by side against a reference\n"
         "  diff      compare two run reports: totals, phases, op classes, config\n"
         "  serve     serve a stream of requests: latency, throughput, SLOs, capacity\n"
         "  report    write the HTML report page of a run JSON or a sweep CSV\n"
         "  datapath  check the bit-exact datapath (packing, adder trees, accumulator)\n"
         "\n"
         "Results are model estimates for architecture exploration, not sign-off numbers.\n";
}

int InspectCommand(const Args& args) {
  InputOptions in;
  std::string json_path;
  po::options_description desc("inspect options");
  desc.add_options()("help,h", "show this help");
  AddInputOptions(desc, in, true);
  desc.add_options()("json", po::value(&json_path)->value_name("FILE"),
                     "write the figures as JSON");
  if (WantsHelp(args)) {
    PrintHelp(
        "usage: tritsim inspect [--model FILE] [--arch FILE] [workload options] [--json FILE]",
        desc);
    return 0;
  }
  po::variables_map vm;
  ParseCommandLine("inspect", args, desc, vm);
  FinishInputOptions(vm, in);
  CheckOutputPaths({{"--json", json_path, OutputKind::kFile}});
  const ModelConfig model = LoadModel(in);
  const ArchConfig arch = LoadArch(in);
  ValidateWorkload(in.workload, model);
  WarnAccumulatorWidth(arch, model);
  const InspectInputs inputs{model, arch, in.workload};
  if (!json_path.empty()) {
    nlohmann::ordered_json resolved = {{"model", ResolvedModelJson(model)},
                                       {"arch", ResolvedArchJson(arch)},
                                       {"workload", ResolvedWorkloadJson(in.workload)}};
    const nlohmann::ordered_json doc =
        WithOrigin(InspectJson(inputs), ProvenanceJson(RecordedCommand("inspect", args)), resolved);
    WriteFileAtomically(json_path, JsonText(doc));
  }
  PrintInspect(inputs, std::cout);
  return 0;
}

// The sequences of `--mix T@C,...`: usage error when malformed.
std::vector<SequenceSpan> MixOption(const std::string& text) {
  std::vector<SequenceSpan> mix;
  const std::string error = ParseMixText(text, mix);
  if (!error.empty()) throw UsageError("--mix: " + error);
  return mix;
}

int TraceCommand(const Args& args) {
  InputOptions in;
  std::string out_path, mix_text;
  po::options_description desc("trace options");
  desc.add_options()("help,h", "show this help");
  AddInputOptions(desc, in, false);
  desc.add_options()("mix", po::value(&mix_text)->value_name("T@C,..."),
                     "one mixed step instead of the workload options (trace format 2): each "
                     "sequence's new tokens T at context C, e.g. 512@0,1@700,1@300");
  desc.add_options()("out", po::value(&out_path)->value_name("FILE"),
                     "where to write the trace (required)");
  if (WantsHelp(args)) {
    PrintHelp("usage: tritsim trace [--model FILE] [workload options | --mix T@C,...] --out FILE",
              desc);
    return 0;
  }
  po::variables_map vm;
  ParseCommandLine("trace", args, desc, vm);
  FinishInputOptions(vm, in);
  if (out_path.empty()) throw UsageError("trace: --out FILE is required");
  if (vm.count("mix") && in.workload_given) {
    throw UsageError("trace: --mix replaces --prefill, --decode, --context and --batch; give one");
  }
  CheckOutputPaths({{"--out", out_path, OutputKind::kFile}});
  const ModelConfig model = LoadModel(in);
  std::unique_ptr<TraceSource> source;
  if (vm.count("mix")) {
    const std::vector<SequenceSpan> mix = MixOption(mix_text);
    source = BuildMixedStepTrace(model, PhaseOfMix(mix), mix);
  } else {
    ValidateWorkload(in.workload, model);
    source = BuildTrace(model, in.workload);
  }
  // Streamed: a long decode trace never sits in memory whole.
  StreamFileAtomically(out_path, [&source](std::ostream& out) { WriteTrace(*source, out); });
  std::cerr << "tritsim trace: wrote " << out_path << "\n";
  return 0;
}

namespace {

// Paths a `run` writes to; all are checked before the simulation starts.
struct RunOutputs {
  std::string json, csv, plots_dir;
};

// Refuses --weights-resident when the model's weights do not fit in the
// scratchpad beside the activations: the tiler keeps half of
// sram.capacity_kib for the activations (engine/tiler.h).
void CheckWeightsResident(const ModelConfig& model, const ArchConfig& arch) {
  const double weights = WeightBytesOnArch(model, arch);
  const uint64_t room = ComputeRates(arch).activation_bytes;  // the half left for weights
  if (weights <= double(room)) return;
  throw SimError("--weights-resident: the weights of " + model.name + " (" +
                 std::to_string(uint64_t(weights)) +
                 " bytes on this design) do not fit in the scratchpad beside the activations: " +
                 std::to_string(room) +
                 " bytes (half of sram.capacity_kib = " + std::to_string(arch.sram.capacity_kib) +
                 " KiB; the other half holds activations); drop --weights-resident");
}

std::string Bytes(double bytes) { return std::to_string(uint64_t(bytes)) + " bytes"; }

// Refuses a workload whose weights, activation buffers and final KV cache
// (batch x final context) do not fit in the DRAM (dram.capacity_gib).
void CheckDramCapacity(const ModelConfig& model, const ArchConfig& arch,
                       const WorkloadConfig& workload) {
  const DramCapacity c = ComputeDramCapacity(model, arch, workload);
  if (c.fits()) return;
  throw SimError("the DRAM of " + arch.name + " (" + Bytes(c.dram_bytes) +
                 ", dram.capacity_gib) cannot hold the weights of " + model.name + " (" +
                 Bytes(c.weight_bytes) + ") plus its KV cache at batch " +
                 std::to_string(workload.batch) + " x context " +
                 std::to_string(FinalContextTokens(workload)) + " (" + Bytes(c.kv_bytes_at_end) +
                 ") and activation buffers (" + Bytes(c.activation_bytes) +
                 "); the longest context at this batch is " +
                 std::to_string(c.max_context_at_batch) + " (tritsim inspect)");
}

// The trace to simulate: generated from the model (checking its workload and
// --weights-resident), or replayed from --trace. Sets `ops_per_step` for the
// progress line (0 for a replayed trace: learned as it runs).
// The trace to simulate: generated from the resolved model (checking its
// workload and --weights-resident), or replayed from the trace file. Sets
// `ops_per_step` for the progress line (0 for a replayed trace: learned as
// it runs).
std::unique_ptr<TraceSource> OpenRunTrace(const ResolvedRun& in, uint64_t& ops_per_step) {
  if (!in.trace.empty()) return OpenTraceFile(in.trace);
  const ModelConfig& model = *in.model;
  ValidateWorkload(in.workload, model);
  WarnAccumulatorWidth(in.arch, model);
  CheckDramCapacity(model, in.arch, in.workload);
  if (in.weights_resident) CheckWeightsResident(model, in.arch);
  ops_per_step = OpsPerStep(model);
  return BuildTrace(model, in.workload);
}

// The run's inputs from the command line (the trace is opened later).
ResolvedRun ResolveRunInputs(const InputOptions& in, const std::string& trace_path,
                             bool weights_resident) {
  ResolvedRun run;
  run.arch = LoadArch(in);
  if (trace_path.empty()) run.model = LoadModel(in);
  run.workload = in.workload;
  run.trace = trace_path;
  run.weights_resident = weights_resident;
  return run;
}

// Refuses flag combinations that contradict each other.
void CheckRunFlags(const InputOptions& in, const std::string& trace_path, bool weights_resident,
                   const std::string& from_report) {
  const bool inputs_given = in.workload_given || !in.model_path.empty() || !in.arch_path.empty() ||
                            !in.overrides.empty() || !trace_path.empty() || weights_resident;
  if (!from_report.empty() && inputs_given) {
    throw UsageError(
        "run: --from-report takes the model, design, workload and trace from the report; do "
        "not combine it with --model, --arch, --set, --trace, --weights-resident or workload "
        "options");
  }
  if (!trace_path.empty() && (in.workload_given || !in.model_path.empty())) {
    throw UsageError(
        "run: --trace fixes the model and workload; do not combine it with "
        "--model or workload options");
  }
  if (!trace_path.empty() && weights_resident) {
    throw UsageError(
        "run: --weights-resident needs the model to check that its weights fit the "
        "scratchpad; use --model instead of --trace");
  }
}

// Simulates (sampled when `sampling` is given) with a progress line on
// stderr when `show_progress`.
RunResult SimulateRun(const ArchConfig& arch, TraceSource& source, SimOptions options,
                      bool show_progress, uint64_t ops_per_step, const SamplingOptions* sampling) {
  auto simulate = [&]() {
    return sampling ? RunSampledSimulation(arch, source, options, *sampling)
                    : RunSimulation(arch, source, options);
  };
  if (!show_progress) return simulate();
  const WorkloadConfig& w = source.header().workload;
  ProgressLine line(w.prefill_tokens > 0 ? 1 : 0, w.decode_tokens, ops_per_step);
  options.on_progress = [&line](const SimProgress& p) { line.Update(p); };
  return simulate();
}

// Refuses --sample where a sampled run cannot be estimated or reported.
void CheckSampleFlags(const ResolvedRun& inputs, const SimOptions& options) {
  if (!inputs.model) {
    throw UsageError(
        "run: --sample needs the model (its layer count); use --model instead of --trace");
  }
  if (!options.vcd_path.empty() || !options.dram_log_path.empty()) {
    throw UsageError(
        "run: --sample simulates only part of the run; do not combine it with --vcd or "
        "--dram-log");
  }
}

void WriteRunOutputs(const RunOutputs& out, const RunReport& report,
                     const nlohmann::ordered_json& provenance,
                     const nlohmann::ordered_json& resolved) {
  if (!out.json.empty()) {
    WriteFileAtomically(out.json, JsonText(WithOrigin(RunJson(report), provenance, resolved)));
  }
  if (!out.csv.empty()) WriteFileAtomically(out.csv, RunCsv(report));
  if (!out.plots_dir.empty()) WriteRunPlots(out.plots_dir, report.run, report.energy);
}

}  // namespace

int RunCommand(const Args& args) {
  InputOptions in;
  std::string trace_path;
  std::string from_report;
  RunOutputs out;
  SimOptions options;
  bool quiet = false;
  bool sample = false;
  po::options_description desc("run options");
  desc.add_options()("help,h", "show this help");
  AddInputOptions(desc, in, true);
  desc.add_options()("trace", po::value(&trace_path)->value_name("FILE"),
                     "replay a saved trace instead of generating one from --model")(
      "from-report", po::value(&from_report)->value_name("RUN.json"),
      "re-run exactly the point of a run JSON, from its resolved section (model or trace, "
      "design, workload, --weights-resident)")("json", po::value(&out.json)->value_name("FILE"),
                                               "write the full report as JSON")(
      "csv", po::value(&out.csv)->value_name("FILE"), "write one row per layer op as CSV")(
      "plots", po::value(&out.plots_dir)->value_name("DIR"),
      "write roofline, stall and energy plots (SVG + data + gnuplot script)")(
      "vcd", po::value(&options.vcd_path)->value_name("FILE"), "write unit activity as VCD")(
      "dram-log", po::value(&options.dram_log_path)->value_name("FILE"),
      "write every DRAM command (docs/dram-log.md)")(
      "dram-log-limit", po::value(&options.dram_log_limit)->value_name("N"),
      "stop the DRAM log after N commands, N >= 1 (default 1000000)")(
      "weights-resident", po::bool_switch(&options.weights_resident),
      "what-if: all weights already sit in the scratchpad, so no weight DMA; refused (exit 4) "
      "when they do not fit in the half of it beside the activations; needs --model; recorded "
      "as design.weights_resident in the JSON")(
      "sample", po::bool_switch(&sample),
      "sampled simulation: simulate a systematic sample of the decode steps and layers, "
      "estimate the rest and report the error bound (99.7 % confidence) beside the figures; "
      "refused with --trace, --vcd and --dram-log (docs/performance.md)")(
      "quiet,q", po::bool_switch(&quiet), "no console summary and no progress line");
  if (WantsHelp(args)) {
    PrintHelp(
        "usage: tritsim run [--model FILE | --trace FILE] [--arch FILE] [workload options]\n"
        "       tritsim run --from-report RUN.json\n"
        "                   [--json FILE] [--csv FILE] [--plots DIR] [--vcd FILE]\n"
        "                   [--dram-log FILE [--dram-log-limit N]] [--sample]\n"
        "On a terminal, a progress line (step, share done, simulated time, ETA) shows on stderr.",
        desc);
    return 0;
  }
  po::variables_map vm;
  ParseCommandLine("run", args, desc, vm);
  FinishInputOptions(vm, in);
  CheckRunFlags(in, trace_path, options.weights_resident, from_report);
  if (vm.count("dram-log-limit") && (options.dram_log_limit < 1 || options.dram_log_path.empty()))
    throw UsageError("--dram-log-limit: allowed: an integer >= 1, with --dram-log");
  // Before anything is simulated: a typo in an output path must not cost the run.
  CheckOutputPaths({{"--json", out.json, OutputKind::kFile},
                    {"--csv", out.csv, OutputKind::kFile},
                    {"--plots", out.plots_dir, OutputKind::kFolder},
                    {"--vcd", options.vcd_path, OutputKind::kFile},
                    {"--dram-log", options.dram_log_path, OutputKind::kFile}});
  ResolvedRun inputs = from_report.empty()
                           ? ResolveRunInputs(in, trace_path, options.weights_resident)
                           : LoadResolvedRun(from_report);
  options.weights_resident = inputs.weights_resident;
  SamplingOptions sampling;
  if (sample) {
    CheckSampleFlags(inputs, options);
    sampling.layers = inputs.model->layers;
  }
  // Resolved before running, so a bad energy table is rejected at once.
  const EnergyTable table = ResolveEnergyTable(inputs.arch.energy, inputs.arch.dram.preset);
  uint64_t ops_per_step = 0;
  std::unique_ptr<TraceSource> source = OpenRunTrace(inputs, ops_per_step);
  inputs.workload = source->header().workload;
  const ArchConfig& arch = inputs.arch;
  const RunResult run = SimulateRun(arch, *source, options, WantsProgressLine(quiet), ops_per_step,
                                    sample ? &sampling : nullptr);
  const EnergyBreakdown energy = ComputeEnergyWithTable(arch, table, run);
  const AreaBreakdown area = EstimateArea(arch);
  const RunReport report{arch, inputs.workload, run, energy, area, table};
  WriteRunOutputs(out, report, ProvenanceJson(RecordedCommand("run", args)),
                  ResolvedRunJson(inputs));
  if (!quiet) PrintRunSummary(report, std::cout);
  return 0;
}

}  // namespace tritsim
