// Running a study's variants. See study_run.h.
#include "study/study_run.h"

#include <filesystem>
#include <set>

#include "common/atomic_file.h"
#include "common/error.h"
#include "sweep/sweep_csv.h"
#include "sweep/sweep_journal.h"
#include "sweep/sweep_runner.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr size_t kStatusColumn = 2;  // id, variant, status (SweepCsvHeader with one axis)

std::string RunsDir(const std::string& out_dir) { return (fs::path(out_dir) / "runs").string(); }

// Ids of variants whose run is complete: an ok row and its JSON on disk.
bool Reusable(const StudyPlan& plan, const std::vector<std::string>& row,
              const std::string& out_dir) {
  for (const SweepPoint& p : plan.runs.points) {
    if (p.id == row.front()) {
      return row[kStatusColumn] == kStatusOk && fs::exists(StudyRunJson(out_dir, p));
    }
  }
  return false;  // stale: the variant changed or left the study
}

// Keeps only reusable rows of an existing journal of this layout.
void CompactJournal(const StudyPlan& plan, const std::string& out_dir,
                    const std::vector<std::string>& header) {
  const std::string path = StudyRunsCsv(out_dir);
  if (!fs::exists(path)) return;
  const CsvTable table = ReadCsvFile(path);
  if (table.header != header) return;  // SweepJournal reports the mismatch
  std::string text = CsvLine(header);
  for (const std::vector<std::string>& row : table.rows) {
    if (Reusable(plan, row, out_dir)) text += CsvLine(row);
  }
  WriteFileAtomically(path, text);
}

}  // namespace

std::string StudyRunsCsv(const std::string& out_dir) {
  return (fs::path(out_dir) / "runs.csv").string();
}

std::string StudyRunJson(const std::string& out_dir, const SweepPoint& point) {
  return (fs::path(RunsDir(out_dir)) / (point.id + ".json")).string();
}

StudyRunSummary RunStudy(const StudyPlan& plan, const StudyRunOptions& options) {
  std::error_code ec;
  fs::create_directories(options.out_dir, ec);
  if (ec) throw Error(ExitCode::kBadInput, options.out_dir + ": cannot create: " + ec.message());
  const std::vector<std::string> header = SweepCsvHeader(plan.runs.axis_keys);
  CompactJournal(plan, options.out_dir, header);
  std::set<std::string> ids;
  for (const SweepPoint& p : plan.runs.points) ids.insert(p.id);
  SweepJournal journal(StudyRunsCsv(options.out_dir), header, ids, true);
  std::vector<const SweepPoint*> todo;
  for (const SweepPoint& p : plan.runs.points) {
    if (!journal.done().count(p.id)) todo.push_back(&p);
  }
  SweepRunOptions run;
  run.tritsim_path = options.tritsim_path;
  run.points_dir = RunsDir(options.out_dir);
  run.jobs = options.jobs;
  run.progress = options.progress;
  const SweepRunSummary s = RunSweepPoints(plan.runs, todo, run, journal);
  StudyRunSummary out;
  out.ran = s.ran;
  out.ok = s.ok;
  out.failed = s.failed;
  out.reused = plan.runs.points.size() - todo.size();
  out.wall_seconds = s.wall_seconds;
  return out;
}

}  // namespace tritsim
