// `tritsim compare STUDY.yaml`: run a study's named variants (one process
// each, resumable) and write their side-by-side table against the
// reference variant. docs/studies.md describes the study file and outputs.
#include <unistd.h>

#include <algorithm>
#include <boost/program_options.hpp>
#include <filesystem>
#include <fstream>
#include <iomanip>
#include <iostream>
#include <sstream>
#include <thread>

#include "cli/cli_options.h"
#include "cli/commands.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "config/study_file.h"
#include "study/study_plan.h"
#include "study/study_plots.h"
#include "study/study_run.h"
#include "study/study_table.h"
#include "sweep/sweep_csv.h"

namespace po = boost::program_options;
namespace fs = std::filesystem;

namespace tritsim {
namespace {

constexpr size_t kStatusColumn = 2;  // id, variant, status, error (one axis)
constexpr size_t kErrorColumn = 3;

const char* const kUsage =
    "usage: tritsim compare STUDY.yaml [--out DIR] [--jobs N] [--no-plots] [-q]\n"
    "\n"
    "Runs each variant of a study file as its own `tritsim run` process (variants\n"
    "already finished in DIR are not run again) and writes the side-by-side table\n"
    "against the reference variant: console, DIR/table.csv, DIR/table.json and\n"
    "plots in DIR/plots/ (see docs/studies.md). Exit code 0 when every variant ran,\n"
    "4 when one failed, 3 for a bad study file, 2 for a bad command line, 130 when\n"
    "interrupted.";

struct CompareArgs {
  std::vector<std::string> inputs;  // the study file
  std::string out;                  // --out DIR; default NAME.study
  int jobs = 0;                     // --jobs; 0 = hardware concurrency
  bool no_plots = false;
  bool quiet = false;
};

void AddOptions(po::options_description& d, CompareArgs& a) {
  d.add_options()("help,h", "show this help")(
      "out", po::value(&a.out)->value_name("DIR"),
      "output folder (default: STUDY-NAME.study in the current folder)")(
      "no-plots", po::bool_switch(&a.no_plots), "skip the gnuplot SVGs")(
      "quiet,q", po::bool_switch(&a.quiet), "no table on stdout, no summary on stderr");
  AddIntegerOption(d, "jobs", 1, a.jobs,
                   "variants run at once (default: the number of hardware threads)");
}

void Parse(const Args& args, const po::options_description& desc, CompareArgs& a) {
  po::options_description all;
  all.add(desc);
  all.add_options()("input", po::value(&a.inputs)->composing(), "the study file");
  po::variables_map vm;
  ParseCommandLine("compare", args, all, vm, "input", -1);
  if (a.inputs.size() != 1) {
    throw UsageError("compare: expected one STUDY.yaml, got " + std::to_string(a.inputs.size()) +
                     " (see tritsim compare --help)");
  }
}

// The journal row of each variant (by id), checked ok; throws kSimFailed
// naming the first failed variant.
void CheckAllRan(const StudyPlan& plan, const std::string& out_dir) {
  const CsvTable runs = ReadCsvFile(StudyRunsCsv(out_dir));
  for (const SweepPoint& p : plan.runs.points) {
    const auto row = std::find_if(runs.rows.begin(), runs.rows.end(),
                                  [&](const auto& r) { return r.front() == p.id; });
    if (row == runs.rows.end()) throw SimError("variant " + p.values[0] + " has no result");
    if ((*row)[kStatusColumn] != kStatusOk) {
      throw SimError("variant " + p.values[0] + " failed: " + (*row)[kErrorColumn] +
                     " (it runs again on the next tritsim compare)");
    }
  }
}

nlohmann::json ReadRunJson(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  try {
    return nlohmann::json::parse(text.str());
  } catch (const std::exception& e) {
    throw Error(ExitCode::kBadInput, path + ": " + OneLine(e.what()));
  }
}

StudyTable MakeTable(const StudyPlan& plan, const std::string& out_dir) {
  std::vector<nlohmann::json> runs;
  for (const SweepPoint& p : plan.runs.points) {
    const std::string path = StudyRunJson(out_dir, p);
    runs.push_back(ReadRunJson(path));
  }
  try {
    return BuildStudyTable(plan, runs);
  } catch (const Error& e) {
    throw Error(e.code(), "study " + plan.file.name + ": " + e.what());
  }
}

void WriteOutputs(const StudyTable& table, const CompareArgs& a, const std::string& out_dir) {
  WriteFileAtomically((fs::path(out_dir) / "table.csv").string(), StudyTableCsv(table));
  WriteFileAtomically((fs::path(out_dir) / "table.json").string(), StudyTableJson(table));
  if (!a.no_plots) WriteStudyPlots((fs::path(out_dir) / "plots").string(), table);
  if (!a.quiet) std::cout << StudyTableText(table);
}

}  // namespace

int CompareCommand(const Args& args) {
  CompareArgs a;
  po::options_description desc("compare options");
  AddOptions(desc, a);
  if (std::find(args.begin(), args.end(), "--help") != args.end() ||
      std::find(args.begin(), args.end(), "-h") != args.end()) {
    std::cout << kUsage << "\n\n" << desc << "\n";
    return 0;
  }
  Parse(args, desc, a);
  const StudyPlan plan = BuildStudyPlan(LoadStudyFile(a.inputs.front()));
  StudyRunOptions options;
  options.tritsim_path = SelfPath();
  options.out_dir = a.out.empty() ? plan.file.name + ".study" : a.out;
  options.jobs = a.jobs > 0 ? a.jobs : int(std::max(1u, std::thread::hardware_concurrency()));
  options.progress = !a.quiet && ::isatty(STDERR_FILENO);
  const StudyRunSummary s = RunStudy(plan, options);
  if (!a.quiet) {
    std::cerr << "tritsim compare: " << plan.file.name << ": ran " << s.ran << " variants (" << s.ok
              << " ok, " << s.failed << " failed), " << s.reused << " already in "
              << options.out_dir << ", " << std::fixed << std::setprecision(2) << s.wall_seconds
              << " s with " << options.jobs << " jobs\n";
  }
  CheckAllRan(plan, options.out_dir);
  WriteOutputs(MakeTable(plan, options.out_dir), a, options.out_dir);
  return 0;
}

}  // namespace tritsim
