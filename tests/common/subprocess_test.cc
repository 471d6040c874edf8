// The subprocess helper against /bin/sh (POSIX shell): exit codes, signals,
// captured streams, files, working directory, and a child that must stay
// stoppable by SIGINT even when the parent ignores it.
#include "common/subprocess.h"

#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "common/error.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

SpawnRequest Shell(const std::string& script) {
  SpawnRequest r;
  r.argv = {"/bin/sh", "-c", script};
  return r;
}

TEST(Subprocess, ReportsTheExitCode) {
  const ChildResult r = RunChildToEnd(Shell("exit 3"));
  ASSERT_TRUE(WIFEXITED(r.wait_status));
  EXPECT_EQ(ExitCodeOf(r.wait_status), 3);
}

// The shell's convention (POSIX.1-2017, Shell Command Language 2.8.2): a
// command ended by signal N has exit status greater than 128; bash and dash
// use 128 + N.
TEST(Subprocess, ASignalledChildIs128PlusTheSignal) {
  const ChildResult r = RunChildToEnd(Shell("kill -KILL $$"));
  ASSERT_TRUE(WIFSIGNALED(r.wait_status));
  EXPECT_EQ(ExitCodeOf(r.wait_status), 128 + SIGKILL);
}

TEST(Subprocess, CapturesStdoutAndStderrApart) {
  SpawnRequest req = Shell("printf out; printf err >&2; exit 0");
  req.stdout_to = ChildOutput::kCapture;
  req.stderr_to = ChildOutput::kCapture;
  const ChildResult r = RunChildToEnd(req);
  EXPECT_EQ(r.stdout_text, "out");
  EXPECT_EQ(r.stderr_text, "err");
}

// More than a pipe buffer (64 KiB on Linux, pipe(7)) on both streams at
// once: reading one while the child blocks on the other would deadlock.
TEST(Subprocess, CapturesLargeOutputOnBothStreams) {
  SpawnRequest req = Shell(
      "i=0; while [ $i -lt 20000 ]; do echo 0123456789; echo abcdefghij >&2; i=$((i+1)); done");
  req.stdout_to = ChildOutput::kCapture;
  req.stderr_to = ChildOutput::kCapture;
  const ChildResult r = RunChildToEnd(req);
  EXPECT_EQ(r.stdout_text.size(), 20000u * 11);
  EXPECT_EQ(r.stderr_text.size(), 20000u * 11);
}

TEST(Subprocess, StdinIsEmptyAndStderrGoesToAFileInTheWorkingDirectory) {
  const fs::path dir = fs::temp_directory_path() / ("tritsim-spawn-" + std::to_string(::getpid()));
  fs::create_directories(dir);
  SpawnRequest req = Shell("cat; pwd; echo note >&2");
  req.working_dir = dir.string();
  req.stdout_to = ChildOutput::kCapture;
  req.stderr_to = ChildOutput::kFile;
  req.stderr_file = (dir / "err.txt").string();
  const ChildResult r = RunChildToEnd(req);
  EXPECT_EQ(ExitCodeOf(r.wait_status), 0);
  EXPECT_EQ(fs::path(r.stdout_text.substr(0, r.stdout_text.size() - 1)), fs::canonical(dir));
  std::ifstream err(dir / "err.txt");
  std::stringstream text;
  text << err.rdbuf();
  EXPECT_EQ(text.str(), "note\n");
  fs::remove_all(dir);
}

TEST(Subprocess, AMissingProgramCannotStart) {
  SpawnRequest req;
  req.argv = {"tritsim-no-such-program"};
  req.search_path = true;
  try {
    RunChildToEnd(req);
    ADD_FAILURE() << "expected tritsim::Error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kInternal);
    EXPECT_EQ(std::string(e.what()).rfind("cannot start tritsim-no-such-program: ", 0), 0u)
        << e.what();
  }
}

// A parent that ignores SIGINT (a shell's background job) must not pass
// that on: the sweep runner relies on stopping its points.
TEST(Subprocess, ChildTakesSigintAtItsDefaultAction) {
  struct sigaction ignore {
  }, old{};
  ignore.sa_handler = SIG_IGN;
  sigemptyset(&ignore.sa_mask);
  ::sigaction(SIGINT, &ignore, &old);
  SpawnRequest req;
  req.argv = {"/bin/sleep", "30"};
  const pid_t pid = SpawnChild(req);
  ::sigaction(SIGINT, &old, nullptr);
  ::kill(pid, SIGINT);
  const int status = WaitForChild(pid);
  ASSERT_TRUE(WIFSIGNALED(status));
  EXPECT_EQ(WTERMSIG(status), SIGINT);
}

TEST(Subprocess, ReportsTheChildsOwnCpuTime) {
  SpawnRequest req = Shell("i=0; while [ $i -lt 50000 ]; do i=$((i+1)); done");
  const ChildResult r = RunChildToEnd(req);
  const double cpu = double(r.usage.ru_utime.tv_sec) + double(r.usage.ru_utime.tv_usec) * 1e-6 +
                     double(r.usage.ru_stime.tv_sec) + double(r.usage.ru_stime.tv_usec) * 1e-6;
  EXPECT_GT(cpu, 0.0);
  EXPECT_GT(r.usage.ru_maxrss, 0);
}

}  // namespace
}  // namespace tritsim
