// Slurm scripts. See slurm_script.h.
#include "sweep/slurm_script.h"

#include <sys/stat.h>

#include <cctype>
#include <filesystem>
#include <sstream>

#include "common/atomic_file.h"
#include "common/error.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

std::string Job(const SlurmOptions& o, const std::string& suffix) {
  std::string name;
  for (char c : o.sweep_name) name += std::isalnum(static_cast<unsigned char>(c)) ? c : '-';
  return "tritsim-" + name + suffix;
}

// #SBATCH lines shared by both scripts.
std::string CommonDirectives(const SlurmOptions& o) {
  std::ostringstream s;
  if (!o.partition.empty()) s << "#SBATCH --partition=" << o.partition << "\n";
  if (!o.time_limit.empty()) s << "#SBATCH --time=" << o.time_limit << "\n";
  if (!o.mem_per_task.empty()) s << "#SBATCH --mem=" << o.mem_per_task << "\n";
  s << "#SBATCH --ntasks=1\n#SBATCH --cpus-per-task=1\n";
  return s.str();
}

}  // namespace

std::string ShellQuote(const std::string& s) {
  std::string out = "'";
  for (char c : s) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return out + "'";
}

std::string SlurmArrayScript(const SlurmOptions& o) {
  std::ostringstream s;
  s << "#!/bin/bash\n"
    << "# tritsim sweep as a Slurm job array: task I runs shard I of " << o.tasks
    << " (points whose index mod " << o.tasks << " is I).\n"
    << "# Written by `tritsim sweep --slurm`; edit freely. Submit with submit.sh (it also\n"
    << "# queues the merge), or alone with: sbatch sweep.sbatch\n"
    << "#SBATCH --job-name=" << Job(o, "") << "\n"
    << "#SBATCH --array=0-" << o.tasks - 1 << "\n"
    << "#SBATCH --output=" << (fs::path(o.dir) / "logs" / "shard-%a.out").string() << "\n"
    << CommonDirectives(o) << "set -euo pipefail\n"
    << "TRITSIM=" << ShellQuote(o.tritsim_path) << "\n"
    << "SWEEP=" << ShellQuote(o.sweep_path) << "\n"
    << "OUT=" << ShellQuote(o.dir) << "\n"
    << "TASKS=" << o.tasks << "\n"
    << "# --resume: a requeued task continues its shard instead of starting over.\n"
    << "exec \"$TRITSIM\" sweep \"$SWEEP\" --shard \"$SLURM_ARRAY_TASK_ID/$TASKS\" \\\n"
    << "  --out \"$OUT/shard-$SLURM_ARRAY_TASK_ID.csv\" --jobs 1 --resume --quiet\n";
  return s.str();
}

std::string SlurmMergeScript(const SlurmOptions& o) {
  std::ostringstream s;
  s << "#!/bin/bash\n"
    << "# Merges the shard CSVs of the tritsim sweep job array into one CSV, checking that\n"
    << "# every point is there exactly once. Queued by submit.sh after the array succeeds.\n"
    << "#SBATCH --job-name=" << Job(o, "-merge") << "\n"
    << "#SBATCH --output=" << (fs::path(o.dir) / "logs" / "merge.out").string() << "\n"
    << CommonDirectives(o) << "set -euo pipefail\n"
    << "TRITSIM=" << ShellQuote(o.tritsim_path) << "\n"
    << "SWEEP=" << ShellQuote(o.sweep_path) << "\n"
    << "OUT=" << ShellQuote(o.dir) << "\n"
    << "exec \"$TRITSIM\" sweep merge \"$SWEEP\" --out \"$OUT/sweep.csv\"";
  for (size_t i = 0; i < o.tasks; ++i) s << " \\\n  \"$OUT/shard-" << i << ".csv\"";
  s << "\n";
  return s.str();
}

std::string SlurmSubmitScript(const SlurmOptions& o) {
  std::ostringstream s;
  s << "#!/bin/bash\n"
    << "# Submits the sweep job array, then the merge job to run after every array task\n"
    << "# succeeded (afterok). Prints the two job ids. Result: "
    << (fs::path(o.dir) / "sweep.csv").string() << "\n"
    << "set -euo pipefail\n"
    << "cd " << ShellQuote(o.dir) << "\n"
    << "array_job=$(sbatch --parsable sweep.sbatch)\n"
    << "array_job=${array_job%%;*}  # --parsable may append ;CLUSTER\n"
    << "merge_job=$(sbatch --parsable --dependency=afterok:\"$array_job\" merge.sbatch)\n"
    << "merge_job=${merge_job%%;*}\n"
    << "echo \"array job $array_job, merge job $merge_job\"\n";
  return s.str();
}

void WriteSlurmScripts(const SlurmOptions& o) {
  std::error_code ec;
  fs::create_directories(fs::path(o.dir) / "logs", ec);
  if (ec) throw Error(ExitCode::kBadInput, "--slurm " + o.dir + ": cannot create: " + ec.message());
  WriteFileAtomically((fs::path(o.dir) / "sweep.sbatch").string(), SlurmArrayScript(o));
  WriteFileAtomically((fs::path(o.dir) / "merge.sbatch").string(), SlurmMergeScript(o));
  const std::string submit = (fs::path(o.dir) / "submit.sh").string();
  WriteFileAtomically(submit, SlurmSubmitScript(o));
  if (::chmod(submit.c_str(), 0755) != 0) {
    throw Error(ExitCode::kBadInput, submit + ": cannot make executable");
  }
}

}  // namespace tritsim
