// Slurm job-array scripts for a sweep: plain, commented files the user can
// read, edit and submit.
//
// DIR/sweep.sbatch  a job array of `tasks` tasks; task I runs
//                   TRITSIM sweep FILE --shard I/TASKS --out DIR/shard-I.csv --jobs 1 --resume
//                   (--resume makes a requeued task continue its shard)
// DIR/merge.sbatch  TRITSIM sweep merge FILE --out DIR/sweep.csv DIR/shard-0.csv ...
// DIR/submit.sh     submits sweep.sbatch, then merge.sbatch with
//                   --dependency=afterok:ARRAY_JOB_ID; prints both job ids
// Logs go to DIR/logs/. All paths in the scripts are absolute.
#pragma once

#include <cstddef>
#include <string>

namespace tritsim {

struct SlurmOptions {
  std::string dir;           // where the scripts, shard CSVs and logs go (absolute)
  std::string tritsim_path;  // absolute path of the tritsim binary the tasks run
  std::string sweep_path;    // absolute path of the sweep file
  std::string sweep_name;    // the sweep's name, for the job name
  size_t tasks = 1;          // array tasks (shards), 1 .. number of points
  std::string partition;     // --partition; "" = the cluster's default
  std::string time_limit;    // --time per task, Slurm syntax (e.g. "01:00:00"); "" = default
  std::string mem_per_task;  // --mem per task, Slurm syntax (e.g. "2G"); "" = default
};

// The three scripts' text.
std::string SlurmArrayScript(const SlurmOptions& options);
std::string SlurmMergeScript(const SlurmOptions& options);
std::string SlurmSubmitScript(const SlurmOptions& options);

// Writes DIR/sweep.sbatch, DIR/merge.sbatch and DIR/submit.sh (executable)
// atomically, creating DIR and DIR/logs. Throws tritsim::Error (kBadInput)
// if DIR cannot be written.
void WriteSlurmScripts(const SlurmOptions& options);

// Shell-quotes `s` in single quotes (for paths in the scripts).
std::string ShellQuote(const std::string& s);

}  // namespace tritsim
