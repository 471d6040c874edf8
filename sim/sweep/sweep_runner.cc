// Child-process sweep runner. See sweep_runner.h.
#include "sweep/sweep_runner.h"

#include <signal.h>
#include <sys/wait.h>
#include <nlohmann/json.hpp>

#include <fmt/core.h>
#include <cerrno>
#include <chrono>
#include <csignal>
#include <cstdio>
#include <cstring>
#include <deque>
#include <filesystem>
#include <map>

#include "common/error.h"
#include "common/subprocess.h"
#include "sweep/sweep_csv.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;

constexpr size_t kMaxErrorChars = 300;  // child stderr quoted in a row

volatile std::sig_atomic_t g_stop_signal = 0;

extern "C" void OnStopSignal(int sig) { g_stop_signal = sig; }

// Installs SIGINT / SIGTERM handlers for the lifetime of the object (no
// SA_RESTART, so a blocked waitpid returns EINTR), restoring the old ones.
class StopSignals {
 public:
  StopSignals() {
    g_stop_signal = 0;
    struct sigaction sa;
    std::memset(&sa, 0, sizeof sa);
    sa.sa_handler = OnStopSignal;
    sigemptyset(&sa.sa_mask);
    ::sigaction(SIGINT, &sa, &old_int_);
    ::sigaction(SIGTERM, &sa, &old_term_);
    // An inherited SIG_IGN for SIGCHLD would reap children behind waitpid's back.
    struct sigaction child;
    std::memset(&child, 0, sizeof child);
    child.sa_handler = SIG_DFL;
    sigemptyset(&child.sa_mask);
    ::sigaction(SIGCHLD, &child, &old_child_);
  }
  ~StopSignals() {
    ::sigaction(SIGINT, &old_int_, nullptr);
    ::sigaction(SIGTERM, &old_term_, nullptr);
    ::sigaction(SIGCHLD, &old_child_, nullptr);
  }

 private:
  struct sigaction old_int_, old_term_, old_child_;
};

struct Running {
  const SweepPoint* point = nullptr;
  std::string json_path;
  std::string stderr_path;
};

pid_t Spawn(const SweepRunOptions& options, const std::vector<std::string>& args,
            const std::string& stderr_path) {
  SpawnRequest request;
  request.argv = {options.tritsim_path};
  request.argv.insert(request.argv.end(), args.begin(), args.end());
  request.stderr_to = ChildOutput::kFile;
  request.stderr_file = stderr_path;
  return SpawnChild(request);
}

std::string FormatSeconds(double s) { return fmt::format(s < 100 ? "{:.1f} s" : "{:.0f} s", s); }

void DrawProgress(size_t done, size_t total, size_t failed, double elapsed) {
  const double eta = done > 0 ? elapsed / double(done) * double(total - done) : 0.0;
  std::fprintf(stderr, "\r\033[Ksweep: %zu/%zu done, %zu failed, %s elapsed, ETA %s", done, total,
               failed, FormatSeconds(elapsed).c_str(), done > 0 ? FormatSeconds(eta).c_str() : "?");
  std::fflush(stderr);
}

// Ends running children after a stop signal: SIGTERM each by pid, reap.
void StopChildren(std::map<pid_t, Running>& running) {
  for (const auto& entry : running) ::kill(entry.first, SIGTERM);
  for (const auto& entry : running) {
    int status = 0;
    while (::waitpid(entry.first, &status, 0) < 0 && errno == EINTR) {
    }
    std::error_code ec;
    fs::remove(entry.second.stderr_path, ec);
  }
  running.clear();
}

// A row of a failed point: empty metrics and json_path.
std::vector<std::string> FailedRow(const SweepPoint& point, const std::string& error) {
  std::vector<std::string> row = {point.id};
  row.insert(row.end(), point.values.begin(), point.values.end());
  row.insert(row.end(), {kStatusFailed, error});
  row.resize(row.size() + MetricColumns().size() + 1);
  return row;
}

}  // namespace

std::vector<std::string> PointRow(const SweepPoint& point, int wait_status,
                                  const std::string& stderr_text, const std::string& json_path) {
  if (WIFSIGNALED(wait_status)) {
    return FailedRow(point, "killed by signal " + std::to_string(WTERMSIG(wait_status)));
  }
  const int code = WIFEXITED(wait_status) ? WEXITSTATUS(wait_status) : -1;
  if (code != 0) {
    return FailedRow(
        point, "exit " + std::to_string(code) + ": " + LastStderrLine(stderr_text, kMaxErrorChars));
  }
  std::vector<std::string> metrics;
  try {
    metrics = MetricsFromRunJson(nlohmann::json::parse(ReadFileText(json_path)));
  } catch (const std::exception& e) {
    return FailedRow(point, json_path + ": " + e.what());
  }
  std::vector<std::string> row = {point.id};
  row.insert(row.end(), point.values.begin(), point.values.end());
  row.insert(row.end(), {kStatusOk, ""});
  row.insert(row.end(), metrics.begin(), metrics.end());
  row.push_back(json_path);
  return row;
}

SweepRunSummary RunSweepPoints(const SweepPlan& plan, const std::vector<const SweepPoint*>& todo,
                               const SweepRunOptions& options, SweepJournal& journal) {
  std::error_code ec;
  fs::create_directories(options.points_dir, ec);
  if (ec) throw Error(ExitCode::kBadInput, options.points_dir + ": cannot create: " + ec.message());
  const StopSignals signals;
  const Clock::time_point start = Clock::now();
  std::deque<const SweepPoint*> pending(todo.begin(), todo.end());
  std::map<pid_t, Running> running;
  SweepRunSummary summary;
  const auto elapsed = [&] { return std::chrono::duration<double>(Clock::now() - start).count(); };
  if (options.progress) DrawProgress(0, todo.size(), 0, 0.0);
  // Starts points until `jobs` run or none is left.
  const auto fill = [&] {
    while (!g_stop_signal && int(running.size()) < options.jobs && !pending.empty()) {
      Running r;
      r.point = pending.front();
      pending.pop_front();
      r.json_path = (fs::path(options.points_dir) / (r.point->id + ".json")).string();
      r.stderr_path = (fs::path(options.points_dir) / (r.point->id + ".stderr")).string();
      running[Spawn(options, PointRunArgs(plan, *r.point, r.json_path), r.stderr_path)] = r;
    }
  };
  fill();
  while (!running.empty()) {
    int status = 0;
    const pid_t pid = g_stop_signal ? -1 : ::waitpid(-1, &status, 0);
    if (pid < 0 && errno == ECHILD && !g_stop_signal) {
      throw Error(ExitCode::kInternal, "sweep: lost track of the point processes (ECHILD)");
    }
    if (g_stop_signal) {
      if (pid > 0) running.erase(pid);  // reaped during the stop: not recorded
      StopChildren(running);
      if (options.progress) std::fputs("\n", stderr);
      throw Error(ExitCode::kInterrupted,
                  "sweep interrupted by signal " + std::to_string(g_stop_signal) + " after " +
                      std::to_string(summary.ran) +
                      " points; finished rows are kept, rerun with --resume to continue");
    }
    auto it = pid > 0 ? running.find(pid) : running.end();
    if (it == running.end()) continue;  // EINTR, or a child that is not ours
    const Running done = it->second;
    running.erase(it);
    fill();  // the next point starts before this row is synced to disk
    std::vector<std::string> row =
        PointRow(*done.point, status, ReadFileText(done.stderr_path), done.json_path);
    const std::vector<std::string> identity = IdentityFields(plan, *done.point);
    row.insert(row.end(), identity.begin(), identity.end());
    fs::remove(done.stderr_path, ec);
    journal.Append(row);
    ++summary.ran;
    (row[1 + plan.axis_keys.size()] == kStatusOk ? summary.ok : summary.failed) += 1;
    if (options.progress) DrawProgress(summary.ran, todo.size(), summary.failed, elapsed());
  }
  if (options.progress) std::fputs("\n", stderr);
  summary.wall_seconds = elapsed();
  return summary;
}

}  // namespace tritsim
