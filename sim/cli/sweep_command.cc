// `tritsim sweep`: run a sweep file's design points (locally, sharded or as
// a Slurm job array), extract Pareto fronts, draw plots, merge shards.
// docs/sweeps.md describes the commands, the CSV and resume semantics.
#include <unistd.h>

#include <algorithm>
#include <boost/program_options.hpp>
#include <cstdio>
#include <filesystem>
#include <iomanip>
#include <iostream>
#include <thread>

#include "cli/cli_options.h"
#include "cli/commands.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "common/output_paths.h"
#include "config/sweep_file.h"
#include "sweep/pareto.h"
#include "sweep/slurm_script.h"
#include "sweep/sweep_csv.h"
#include "sweep/sweep_identity.h"
#include "sweep/sweep_journal.h"
#include "sweep/sweep_merge.h"
#include "sweep/sweep_plan.h"
#include "sweep/sweep_plots.h"
#include "sweep/sweep_runner.h"

namespace po = boost::program_options;
namespace fs = std::filesystem;

namespace tritsim {
namespace {

constexpr size_t kDefaultSlurmTasks = 16;  // array tasks when --tasks is not given (at most points)
constexpr const char* kDefaultMetric = "tokens_per_second";

const char* const kUsage =
    "usage: tritsim sweep FILE --out CSV [--jobs N] [--resume] [--shard I/N] [--plots DIR]\n"
    "       tritsim sweep FILE --dry-run [--shard I/N]\n"
    "       tritsim sweep FILE --slurm DIR [--tasks N] [--partition P] [--time-limit T]\n"
    "                          [--mem-per-task M]\n"
    "       tritsim sweep --pareto max:COL,min:COL[,...] CSV [--out FILE] [--plots DIR]\n"
    "       tritsim sweep CSV --plots DIR [--plot-axis AXIS] [--metric COL]\n"
    "       tritsim sweep merge FILE --out CSV SHARD.csv...\n"
    "\n"
    "Runs every design point of a sweep file as its own `tritsim run` process and\n"
    "appends one CSV row per finished point (see docs/sweeps.md). Exit code 0 when the\n"
    "sweep ran (failed points are rows with status failed), 4 when every point run\n"
    "failed, 3 for a bad sweep file, 2 for a bad command line, 130 when interrupted.";

struct SweepArgs {
  std::vector<std::string> inputs;  // positionals: sweep FILE, CSV, or merge's FILE + shards
  std::string out;                  // --out
  int jobs = 0;                     // --jobs; 0 = hardware concurrency
  bool resume = false;
  bool dry_run = false;
  bool quiet = false;
  std::string shard;       // --shard I/N
  std::string plots;       // --plots DIR
  std::string plot_axis;   // --plot-axis
  std::string metric;      // --metric
  std::string pareto;      // --pareto spec
  std::string slurm;       // --slurm DIR
  std::string partition;   // --partition
  std::string time_limit;  // --time-limit
  std::string mem;         // --mem-per-task
  size_t tasks = 0;        // --tasks; 0 = default
};

void AddOptions(po::options_description& d, SweepArgs& a) {
  d.add_options()("help,h", "show this help")(
      "out", po::value(&a.out)->value_name("CSV"),
      "result CSV (one row per point); its per-point JSON go to CSV.points/")(
      "resume", po::bool_switch(&a.resume), "continue --out: run only points missing from it")(
      "dry-run", po::bool_switch(&a.dry_run), "list the points (id and values); run nothing")(
      "shard", po::value(&a.shard)->value_name("I/N"),
      "run only points whose index mod N is I (0 <= I < N)")(
      "quiet,q", po::bool_switch(&a.quiet), "no progress line or summary on stderr")(
      "plots", po::value(&a.plots)->value_name("DIR"),
      "write SVG plots (+ data + gnuplot script) into DIR")(
      "plot-axis", po::value(&a.plot_axis)->value_name("AXIS"),
      "axis for the metric-by-axis plot (default: the first axis)")(
      "metric", po::value(&a.metric)->value_name("COL"),
      "metric for the metric-by-axis plot (default: tokens_per_second)")(
      "pareto", po::value(&a.pareto)->value_name("SPEC"),
      "Pareto front of a result CSV, e.g. max:tokens_per_second,min:joules_per_token")(
      "slurm", po::value(&a.slurm)->value_name("DIR"),
      "write a Slurm job array (sweep.sbatch, merge.sbatch, submit.sh) into DIR")(
      "partition", po::value(&a.partition)->value_name("P"), "Slurm partition")(
      "time-limit", po::value(&a.time_limit)->value_name("T"), "Slurm time limit per task")(
      "mem-per-task", po::value(&a.mem)->value_name("M"), "Slurm memory per task, e.g. 2G");
  AddIntegerOption(d, "jobs", 1, a.jobs,
                   "points run at once (default: the number of hardware threads)");
  AddIntegerOption(d, "tasks", 1, a.tasks, "Slurm array tasks (default: min(16, points))");
}

// Parses `args` with `desc` plus the hidden positional inputs into a.inputs.
void Parse(const std::string& command, const Args& args, const po::options_description& desc,
           SweepArgs& a) {
  po::options_description all;
  all.add(desc);
  all.add_options()("input", po::value(&a.inputs)->composing(), "positional inputs");
  po::variables_map vm;
  ParseCommandLine(command, args, all, vm, "input", -1);
}

// "I/N" -> (I, N). Throws UsageError.
std::pair<size_t, size_t> ParseShard(const std::string& text) {
  size_t i = 0, n = 0;
  char tail = 0;
  if (std::sscanf(text.c_str(), "%zu/%zu%c", &i, &n, &tail) != 2 || n == 0 || i >= n ||
      text.find('-') != std::string::npos) {
    throw UsageError("--shard " + text + ": expected I/N with 0 <= I < N, e.g. 0/4");
  }
  return {i, n};
}

std::string OnlyInput(const SweepArgs& a, const std::string& what) {
  if (a.inputs.size() != 1) {
    throw UsageError("sweep: expected one " + what + ", got " + std::to_string(a.inputs.size()) +
                     " (see tritsim sweep --help)");
  }
  return a.inputs.front();
}

bool EndsWith(const std::string& s, const std::string& suffix) {
  return s.size() >= suffix.size() &&
         s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
}

std::vector<const SweepPoint*> SelectedPoints(const SweepPlan& plan, const SweepArgs& a) {
  if (a.shard.empty()) return ShardPoints(plan, 0, 1);
  const auto [i, n] = ParseShard(a.shard);
  return ShardPoints(plan, i, n);
}

int DryRun(const SweepPlan& plan, const std::vector<const SweepPoint*>& points, bool quiet) {
  for (const SweepPoint* p : points) {
    std::cout << p->id << "  " << DescribePoint(*p) << "  (area " << p->area_mm2 << " mm2)\n";
  }
  if (!quiet) {
    std::cerr << "tritsim sweep: " << plan.file.name << ": " << points.size() << " of "
              << plan.points.size() << " points listed (" << plan.excluded
              << " excluded by constraints); nothing run\n";
  }
  return 0;
}

int WriteSlurm(const SweepPlan& plan, const SweepArgs& a) {
  SlurmOptions o;
  o.dir = fs::absolute(a.slurm).lexically_normal().string();
  o.tritsim_path = SelfPath();
  o.sweep_path = fs::absolute(plan.file.path).lexically_normal().string();
  o.sweep_name = plan.file.name;
  o.tasks = a.tasks ? a.tasks : std::min(kDefaultSlurmTasks, plan.points.size());
  if (o.tasks < 1 || o.tasks > plan.points.size()) {
    throw UsageError("--tasks " + std::to_string(a.tasks) + ": must be in [1, " +
                     std::to_string(plan.points.size()) + "] (the number of points)");
  }
  o.partition = a.partition;
  o.time_limit = a.time_limit;
  o.mem_per_task = a.mem;
  WriteSlurmScripts(o);
  std::cout << "wrote " << o.dir << "/{sweep.sbatch,merge.sbatch,submit.sh}: " << o.tasks
            << " array tasks over " << plan.points.size() << " points\n"
            << "submit with: " << o.dir << "/submit.sh   (result: " << o.dir << "/sweep.csv)\n";
  return 0;
}

void DrawAxisPlot(const std::string& csv, const SweepArgs& a) {
  const CsvTable table = ReadCsvFile(csv);
  const std::vector<std::string> axes = AxisColumnsOf(table);
  if (axes.empty()) throw InputError(csv, 1, "", "not a sweep CSV (no axis columns before status)");
  const std::string axis = a.plot_axis.empty() ? axes.front() : a.plot_axis;
  if (std::find(axes.begin(), axes.end(), axis) == axes.end()) {
    std::string list;
    for (const std::string& x : axes) list += (list.empty() ? "" : ", ") + x;
    throw UsageError("--plot-axis " + axis + ": not an axis of " + csv + "; axes: " + list);
  }
  const std::string metric = a.metric.empty() ? kDefaultMetric : a.metric;
  const std::string name = WriteAxisPlot(a.plots, table, axes, axis, metric, csv);
  if (!a.quiet) std::cerr << "tritsim sweep: wrote " << a.plots << "/" << name << ".svg\n";
}

int RunPoints(const SweepPlan& plan, const SweepArgs& a) {
  if (a.out.empty()) throw UsageError("sweep: --out CSV is required (or --dry-run)");
  const std::vector<const SweepPoint*> selected = SelectedPoints(plan, a);
  const std::string hint = "nothing was changed; to start afresh, move " + a.out + " and " + a.out +
                           ".points/ away or choose another --out";
  const ResumeCheck check = [&plan, &a, &hint](const CsvTable& table) {
    CheckRowsBelong(plan, table, a.out, hint);
  };
  SweepJournal journal(a.out, SweepCsvHeader(plan.axis_keys), check, a.resume);
  std::vector<const SweepPoint*> todo;
  for (const SweepPoint* p : selected) {
    if (!journal.done().count(p->id)) todo.push_back(p);
  }
  SweepRunOptions options;
  options.tritsim_path = SelfPath();
  options.points_dir = a.out + ".points";
  options.jobs = a.jobs > 0 ? a.jobs : int(std::max(1u, std::thread::hardware_concurrency()));
  options.progress = !a.quiet && ::isatty(STDERR_FILENO);
  const SweepRunSummary s = RunSweepPoints(plan, todo, options, journal);
  if (!a.quiet) {
    std::cerr << "tritsim sweep: " << plan.file.name << ": ran " << s.ran << " points (" << s.ok
              << " ok, " << s.failed << " failed), " << selected.size() - todo.size()
              << " already in " << a.out << ", " << std::fixed << std::setprecision(2)
              << s.wall_seconds << " s with " << options.jobs << " jobs\n";
  }
  if (!a.plots.empty()) DrawAxisPlot(a.out, a);
  if (s.ran > 0 && s.ok == 0) {
    std::cerr << "tritsim sweep: every point failed; see the error column of " << a.out << "\n";
    return int(ExitCode::kSimFailed);
  }
  return 0;
}

void PrintFront(const CsvTable& table, const std::vector<Objective>& objectives,
                const std::vector<size_t>& rows) {
  const std::vector<std::string> axes = AxisColumnsOf(table);
  std::cout << "id";
  for (const std::string& a : axes) std::cout << "  " << a;
  for (const Objective& o : objectives)
    std::cout << "  " << (o.maximize ? "max:" : "min:") << o.column;
  std::cout << "\n";
  for (size_t r : rows) {
    std::cout << table.rows[r][0];
    for (size_t k = 0; k < axes.size(); ++k) std::cout << "  " << table.rows[r][1 + k];
    for (const Objective& o : objectives) {
      std::cout << "  " << table.rows[r][ColumnIndex(table.header, o.column, "", "")];
    }
    std::cout << "\n";
  }
}

std::string ParetoOut(const SweepArgs& a) {
  return !a.out.empty() || a.inputs.size() != 1 ? a.out : a.inputs.front() + ".pareto.csv";
}

int Pareto(const SweepArgs& a) {
  const std::string csv = OnlyInput(a, "result CSV for --pareto");
  if (EndsWith(csv, ".yaml") || EndsWith(csv, ".yml")) {
    throw UsageError("--pareto reads a sweep's result CSV, not the sweep file " + csv);
  }
  const std::vector<Objective> objectives = ParseObjectives(a.pareto);
  const CsvTable table = ReadCsvFile(csv);
  if (table.header.empty()) throw InputError(csv, 0, "", "empty CSV");
  const ObjectiveRows selected = SelectObjectiveRows(table, objectives, csv);
  std::vector<size_t> front = ParetoFront(selected.values, objectives);
  std::stable_sort(front.begin(), front.end(), [&](size_t x, size_t y) {
    const double vx = selected.values[x][0], vy = selected.values[y][0];
    return objectives[0].maximize ? vx > vy : vx < vy;
  });
  std::vector<size_t> rows;
  std::string text = CsvLine(table.header);
  for (size_t i : front) {
    rows.push_back(selected.rows[i]);
    text += CsvLine(table.rows[selected.rows[i]]);
  }
  const std::string out = ParetoOut(a);
  WriteFileAtomically(out, text);
  PrintFront(table, objectives, rows);
  if (!a.quiet) {
    std::cerr << "tritsim sweep: " << front.size() << " non-dominated of " << selected.rows.size()
              << " ok points; wrote " << out << "\n";
  }
  if (!a.plots.empty()) {
    WriteFrontPlot(a.plots, table, objectives, selected, front);
    if (!a.plot_axis.empty() || !a.metric.empty()) DrawAxisPlot(csv, a);
  }
  return 0;
}

// Every output this invocation may write, checked before any work
// (common/output_paths.h). A dry run writes nothing.
void CheckSweepOutputs(const SweepArgs& a) {
  const OutputPath plots{"--plots", a.plots, OutputKind::kFolder};
  if (!a.pareto.empty()) {
    CheckOutputPaths({{"--out", ParetoOut(a), OutputKind::kFile}, plots});
  } else if (!a.slurm.empty()) {
    CheckOutputPaths({{"--slurm", a.slurm, OutputKind::kFolder}});
  } else if (!a.dry_run) {
    const std::string points = a.out.empty() ? "" : a.out + ".points";
    CheckOutputPaths(
        {{"--out", a.out, OutputKind::kFile}, {"--out", points, OutputKind::kFolder}, plots});
  }
}

int Merge(const Args& args) {
  SweepArgs a;
  po::options_description desc("sweep merge options");
  AddOptions(desc, a);
  if (WantsHelp(args)) {
    std::cout << "usage: tritsim sweep merge FILE --out CSV SHARD.csv...\n\n"
                 "Combines the shard CSVs of sweep FILE into one CSV in point order, checking\n"
                 "that every point is present exactly once (see docs/sweeps.md).\n";
    return 0;
  }
  Parse("sweep merge", args, desc, a);
  if (a.inputs.size() < 2) {
    throw UsageError("sweep merge: expected the sweep FILE and at least one shard CSV");
  }
  if (a.out.empty()) throw UsageError("sweep merge: --out CSV is required");
  CheckOutputPaths({{"--out", a.out, OutputKind::kFile}});
  const SweepPlan plan = BuildSweepPlan(LoadSweepFile(a.inputs.front()));
  const std::vector<std::string> shards(a.inputs.begin() + 1, a.inputs.end());
  WriteFileAtomically(a.out, MergeShardCsvs(plan, shards));
  if (!a.quiet) {
    std::cerr << "tritsim sweep merge: " << plan.points.size() << " points from " << shards.size()
              << " shards into " << a.out << "\n";
  }
  return 0;
}

}  // namespace

int SweepCommand(const Args& args) {
  if (!args.empty() && args.front() == "merge") return Merge(Args(args.begin() + 1, args.end()));
  SweepArgs a;
  po::options_description desc("sweep options");
  AddOptions(desc, a);
  if (WantsHelp(args)) {
    std::cout << kUsage << "\n\n" << desc << "\n";
    return 0;
  }
  Parse("sweep", args, desc, a);
  CheckSweepOutputs(a);
  if (!a.pareto.empty()) return Pareto(a);
  const std::string input = OnlyInput(a, "sweep FILE");
  if (EndsWith(input, ".csv")) {
    if (a.plots.empty()) throw UsageError("sweep " + input + ": a CSV needs --plots DIR");
    DrawAxisPlot(input, a);
    return 0;
  }
  const SweepPlan plan = BuildSweepPlan(LoadSweepFile(input));
  if (!a.slurm.empty()) return WriteSlurm(plan, a);
  if (a.dry_run) return DryRun(plan, SelectedPoints(plan, a), a.quiet);
  return RunPoints(plan, a);
}

}  // namespace tritsim
