#include "cli/commands.h"

#include <boost/program_options.hpp>
#include <fstream>
#include <iostream>
#include <sstream>

#include "cli/cli_options.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "energy/area_model.h"
#include "energy/energy_model.h"
#include "energy/energy_table.h"
#include "engine/simulation.h"
#include "model/trace_builder.h"
#include "report/inspect_report.h"
#include "report/plots.h"
#include "report/run_report.h"
#include "trace/trace_reader.h"
#include "trace/trace_writer.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

bool WantsHelp(const Args& args) {
  for (const std::string& a : args) {
    if (a == "--help" || a == "-h") return true;
  }
  return false;
}

void PrintHelp(const std::string& usage, const po::options_description& desc) {
  std::cout << usage << "\n\n" << desc << "\n";
}

std::string JsonText(const nlohmann::ordered_json& j) { return j.dump(2) + "\n"; }

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
  const ModelConfig model = LoadModel(in);
  const ArchConfig arch = LoadArch(in);
  ValidateWorkload(in.workload, model);
  const InspectInputs inputs{model, arch, in.workload};
  if (!json_path.empty()) WriteFileAtomically(json_path, JsonText(InspectJson(inputs)));
  PrintInspect(inputs, std::cout);
  return 0;
}

int TraceCommand(const Args& args) {
  InputOptions in;
  std::string out_path;
  po::options_description desc("trace options");
  desc.add_options()("help,h", "show this help");
  AddInputOptions(desc, in, false);
  desc.add_options()("out", po::value(&out_path)->value_name("FILE"),
                     "where to write the trace (required)");
  if (WantsHelp(args)) {
    PrintHelp("usage: tritsim trace [--model FILE] [workload options] --out FILE", desc);
    return 0;
  }
  po::variables_map vm;
  ParseCommandLine("trace", args, desc, vm);
  if (out_path.empty()) throw UsageError("tritsim trace: --out FILE is required");
  const ModelConfig model = LoadModel(in);
  ValidateWorkload(in.workload, model);
  auto source = BuildTrace(model, in.workload);
  // Streamed: a long decode trace never sits in memory whole.
  StreamFileAtomically(out_path, [&source](std::ostream& out) { WriteTrace(*source, out); });
  std::cerr << "tritsim trace: wrote " << out_path << "\n";
  return 0;
}

int RunCommand(const Args& args) {
  InputOptions in;
  std::string trace_path, json_path, csv_path, plots_dir;
  SimOptions options;
  bool quiet = false;
  po::options_description desc("run options");
  desc.add_options()("help,h", "show this help");
  AddInputOptions(desc, in, true);
  desc.add_options()("trace", po::value(&trace_path)->value_name("FILE"),
                     "replay a saved trace instead of generating one from --model")(
      "json", po::value(&json_path)->value_name("FILE"), "write the full report as JSON")(
      "csv", po::value(&csv_path)->value_name("FILE"), "write one row per layer op as CSV")(
      "plots", po::value(&plots_dir)->value_name("DIR"),
      "write roofline, stall and energy plots (SVG + data + gnuplot script)")(
      "vcd", po::value(&options.vcd_path)->value_name("FILE"), "write unit activity as VCD")(
      "dram-log", po::value(&options.dram_log_path)->value_name("FILE"),
      "write every DRAM command (docs/dram-log.md)")(
      "dram-log-limit", po::value(&options.dram_log_limit)->value_name("N"),
      "stop the DRAM log after N commands, N >= 1 (default 1000000)")(
      "weights-resident", po::bool_switch(&options.weights_resident),
      "assume all weights already sit in the scratchpad (no weight DMA)")(
      "quiet,q", po::bool_switch(&quiet), "no console summary");
  if (WantsHelp(args)) {
    PrintHelp(
        "usage: tritsim run [--model FILE | --trace FILE] [--arch FILE] [workload options]\n"
        "                   [--json FILE] [--csv FILE] [--plots DIR]",
        desc);
    return 0;
  }
  po::variables_map vm;
  ParseCommandLine("run", args, desc, vm);
  FinishInputOptions(vm, in);
  if (vm.count("dram-log-limit") && (options.dram_log_limit < 1 || options.dram_log_path.empty()))
    throw UsageError("tritsim run: --dram-log-limit: allowed: an integer >= 1, with --dram-log");
  if (!trace_path.empty() && (in.workload_given || !in.model_path.empty())) {
    throw UsageError(
        "tritsim run: --trace fixes the model and workload; do not combine it with "
        "--model or workload options");
  }
  const ArchConfig arch = LoadArch(in);
  // Resolved before running, so a bad energy table is rejected at once.
  const EnergyTable table = ResolveEnergyTable(arch.energy, arch.dram.preset);
  std::unique_ptr<TraceSource> source;
  WorkloadConfig workload = in.workload;
  if (trace_path.empty()) {
    const ModelConfig model = LoadModel(in);
    ValidateWorkload(in.workload, model);
    source = BuildTrace(model, in.workload);
  } else {
    source = OpenTraceFile(trace_path);
    workload = source->header().workload;
  }
  const RunResult run = RunSimulation(arch, *source, options);
  const EnergyBreakdown energy = ComputeEnergyWithTable(arch, table, run);
  const AreaBreakdown area = EstimateArea(arch);
  const RunReport report{arch, workload, run, energy, area, table};
  if (!json_path.empty()) WriteFileAtomically(json_path, JsonText(RunJson(report)));
  if (!csv_path.empty()) WriteFileAtomically(csv_path, RunCsv(report));
  if (!plots_dir.empty()) WriteRunPlots(plots_dir, run, energy);
  if (!quiet) PrintRunSummary(report, std::cout);
  return 0;
}

}  // namespace tritsim
