// Runs sweep points as child processes, a bounded number at a time, and
// journals each finished point as one CSV row (sweep_journal.h).
//
// Each point is `TRITSIM run ... --json POINTS_DIR/ID.json -q` in its own
// process (SystemC elaborates once per process). The child's stdout is
// discarded; its stderr goes to POINTS_DIR/ID.stderr, is quoted in the row
// of a failed point and then removed. The child writes its JSON
// atomically, so a JSON file in POINTS_DIR is always complete.
//
// Signals: SIGINT / SIGTERM stop the sweep: running children get SIGTERM,
// only rows of points that completed are kept, and RunSweepPoints throws
// tritsim::Error (kInterrupted). SIGKILL of the sweep leaves the journal
// consistent (whole rows plus at most one torn line, cut on --resume).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "sweep/sweep_journal.h"
#include "sweep/sweep_plan.h"

namespace tritsim {

struct SweepRunOptions {
  std::string tritsim_path;  // the program run for each point (normally /proc/self/exe)
  std::string points_dir;    // folder for per-point JSON; created if missing
  int jobs = 1;              // points running at once, >= 1
  bool progress = false;     // redraw a progress line on stderr (when it is a terminal)
};

struct SweepRunSummary {
  size_t ran = 0;     // points run by this call
  size_t ok = 0;      // of which succeeded
  size_t failed = 0;  // of which failed (recorded with their error)
  double wall_seconds = 0.0;
};

// Runs `todo` (in order, `options.jobs` at a time) and appends one row per
// finished point to `journal`, in completion order. A failing point is
// recorded as failed and does not stop the sweep. Throws tritsim::Error
// (kBadInput) if the points folder cannot be made or the journal cannot be
// written, (kInterrupted) on SIGINT / SIGTERM.
SweepRunSummary RunSweepPoints(const SweepPlan& plan, const std::vector<const SweepPoint*>& todo,
                               const SweepRunOptions& options, SweepJournal& journal);

// The CSV row of one point, up to json_path (the runner appends the
// identity columns, sweep_identity.h), that finished with `wait_status` (as from
// waitpid); `stderr_text` is what the child wrote on stderr. Reads the
// point's JSON when the child succeeded; a missing or unreadable JSON makes
// the row failed.
std::vector<std::string> PointRow(const SweepPoint& point, int wait_status,
                                  const std::string& stderr_text, const std::string& json_path);

}  // namespace tritsim
