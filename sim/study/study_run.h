// Runs a study's variants: one `tritsim run` process each, `jobs` at a
// time, through the sweep runner and its append-only CSV journal
// (sweep_runner.h, sweep_journal.h). Resumable: a variant whose row is
// already in the journal with status ok (and its JSON present) is not run
// again; a failed, stale (its id changed) or missing one is.
//
// Layout of the output folder DIR:
//   DIR/runs.csv        the journal: one sweep-CSV row per finished variant,
//                       axis column "variant"
//   DIR/runs/ID.json    each variant's run JSON (schema tritsim.run/1)
#pragma once

#include <cstddef>
#include <string>

#include "study/study_plan.h"

namespace tritsim {

struct StudyRunOptions {
  std::string tritsim_path;  // the program run for each variant (normally /proc/self/exe)
  std::string out_dir;       // DIR; created if missing
  int jobs = 1;              // variants running at once, >= 1
  bool progress = false;     // progress line on stderr
};

struct StudyRunSummary {
  size_t ran = 0;     // variants run by this call
  size_t ok = 0;      // of which succeeded
  size_t failed = 0;  // of which failed
  size_t reused = 0;  // variants already done in DIR/runs.csv
  double wall_seconds = 0.0;
};

std::string StudyRunsCsv(const std::string& out_dir);                           // DIR/runs.csv
std::string StudyRunJson(const std::string& out_dir, const SweepPoint& point);  // DIR/runs/ID.json

// Runs the variants not yet done. Before opening the journal, rewrites it
// (atomically) without rows of failed, stale or JSON-less variants, so those
// run again. Throws tritsim::Error as RunSweepPoints does (kBadInput for an
// unwritable folder or a journal of another layout, kInterrupted on
// SIGINT / SIGTERM).
StudyRunSummary RunStudy(const StudyPlan& plan, const StudyRunOptions& options);

}  // namespace tritsim
