// Starting child programs: the one way tritsim spawns a process (the sweep
// runner's points, gnuplot for the plots, the benchmark's runs).
//
// Children start with posix_spawn (POSIX.1-2008), never fork: no copy of a
// large parent's page tables, no code of ours between fork and exec. The
// child gets SIGINT and SIGTERM at their default action and an empty signal
// mask, whatever the parent installed or inherited (a shell's background job
// ignores SIGINT; the sweep runner catches both), so a supervisor can always
// stop it. The child's stdin is /dev/null.
#pragma once

#include <sys/resource.h>
#include <sys/types.h>

#include <string>
#include <vector>

namespace tritsim {

// Where one of the child's output streams goes.
enum class ChildOutput {
  kNull,     // /dev/null
  kInherit,  // the parent's stream
  kCapture,  // a pipe read into ChildResult (RunChildToEnd only)
  kFile      // a file, created or truncated (SpawnRequest::*_file)
};

struct SpawnRequest {
  std::vector<std::string> argv;  // argv[0] is the program: a path, or a name with search_path
  bool search_path = false;       // look argv[0] up on PATH (posix_spawnp)
  std::string working_dir;        // the child's working directory; empty: the parent's
  ChildOutput stdout_to = ChildOutput::kNull;
  ChildOutput stderr_to = ChildOutput::kInherit;
  std::string stdout_file;  // with ChildOutput::kFile
  std::string stderr_file;
};

// How a child ended, what it wrote where captured, and what it used.
struct ChildResult {
  int wait_status = 0;  // as from waitpid
  std::string stdout_text;
  std::string stderr_text;
  rusage usage{};  // the child's own (wait4), not its siblings'
};

// Starts the child and returns its pid without waiting. Only kNull,
// kInherit and kFile outputs. Throws tritsim::Error
// (kInternal) "cannot start PROGRAM: REASON" when it cannot be started
// (program missing or not executable, an output file that cannot be opened):
// posix_spawn reports exec failures to the parent (glibc >= 2.24).
pid_t SpawnChild(const SpawnRequest& request);

// Starts the child, collects its captured streams, and waits
// for it (retrying on EINTR). Throws as SpawnChild.
ChildResult RunChildToEnd(const SpawnRequest& request);

// Waits for `pid` (retrying on EINTR) and fills `usage` when not null.
// Returns the wait status. Throws tritsim::Error (kInternal) on other errors.
int WaitForChild(pid_t pid, rusage* usage = nullptr);

// The whole file at `path` ("" when it cannot be read): a child's captured
// stream or report.
std::string ReadFileText(const std::string& path);

// The last non-blank line of a child's stderr text, cut to `max_chars`
// (then "..." is appended); "no message" when there is none.
std::string LastStderrLine(const std::string& text, size_t max_chars = 300);

// A wait status as one number: the exit code, or 128 + signal number for a
// child killed by a signal (the shell's convention), -1 otherwise.
int ExitCodeOf(int wait_status);

}  // namespace tritsim
