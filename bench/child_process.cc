#include "child_process.h"

#include <fcntl.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstring>
#include <stdexcept>

namespace tritsim_bench {
namespace {

constexpr int kExecFailedExit = 127;  // shell convention for "cannot run"
constexpr int kSignalExitBase = 128;  // shell convention for "killed by signal"

double Seconds(const timeval& t) { return double(t.tv_sec) + double(t.tv_usec) * 1e-6; }

int ExitCodeOf(int status) {
  if (WIFEXITED(status)) return WEXITSTATUS(status);
  if (WIFSIGNALED(status)) return kSignalExitBase + WTERMSIG(status);
  return -1;
}

// Child side of RunChild: never returns.
[[noreturn]] void ExecChild(const std::vector<std::string>& argv) {
  const int null_fd = ::open("/dev/null", O_RDWR);
  if (null_fd >= 0) {
    ::dup2(null_fd, STDIN_FILENO);
    ::dup2(null_fd, STDOUT_FILENO);
  }
  std::vector<char*> args;
  for (const std::string& a : argv) args.push_back(const_cast<char*>(a.c_str()));
  args.push_back(nullptr);
  ::execv(args[0], args.data());
  ::_exit(kExecFailedExit);
}

int WaitForChild(pid_t pid, rusage& usage) {
  int status = 0;
  while (::wait4(pid, &status, 0, &usage) < 0) {
    if (errno != EINTR) throw std::runtime_error(std::string("wait4: ") + std::strerror(errno));
  }
  return status;
}

}  // namespace

ChildMeasurement RunChild(const std::vector<std::string>& argv) {
  if (argv.empty()) throw std::runtime_error("RunChild: empty command");
  const auto start = std::chrono::steady_clock::now();
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error(std::string("fork: ") + std::strerror(errno));
  if (pid == 0) ExecChild(argv);
  rusage usage{};
  const int status = WaitForChild(pid, usage);
  const auto end = std::chrono::steady_clock::now();
  ChildMeasurement m;
  m.wall_seconds = std::chrono::duration<double>(end - start).count();
  m.cpu_seconds = Seconds(usage.ru_utime) + Seconds(usage.ru_stime);
  m.peak_rss_kib = usage.ru_maxrss;
  m.exit_code = ExitCodeOf(status);
  return m;
}

double RunForkedForValue(double (*body)(long), long argument) {
  int fds[2];
  if (::pipe(fds) != 0) throw std::runtime_error(std::string("pipe: ") + std::strerror(errno));
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error(std::string("fork: ") + std::strerror(errno));
  if (pid == 0) {
    ::close(fds[0]);
    const double value = body(argument);
    const bool sent = ::write(fds[1], &value, sizeof value) == ssize_t(sizeof value);
    ::_exit(sent ? 0 : 1);
  }
  ::close(fds[1]);
  double value = 0.0;
  const bool received = ::read(fds[0], &value, sizeof value) == ssize_t(sizeof value);
  ::close(fds[0]);
  rusage usage{};
  const int status = WaitForChild(pid, usage);
  if (!received || ExitCodeOf(status) != 0) throw std::runtime_error("forked measurement failed");
  return value;
}

}  // namespace tritsim_bench
