// Child processes through posix_spawn. See subprocess.h.
#include "common/subprocess.h"

#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "common/error.h"

extern char** environ;  // POSIX: the environment handed to posix_spawn

namespace tritsim {
namespace {

constexpr int kSignalExitBase = 128;  // shell convention for "killed by signal N"
constexpr mode_t kFileMode = 0644;    // output files: rw-r--r-- before the umask

Error StartError(const SpawnRequest& request, const std::string& reason) {
  const std::string program = request.argv.empty() ? "(no program)" : request.argv[0];
  return Error(ExitCode::kInternal, "cannot start " + program + ": " + reason);
}

// Owns the posix_spawn attribute and file-action objects.
class SpawnSetup {
 public:
  SpawnSetup() {
    ::posix_spawn_file_actions_init(&actions_);
    ::posix_spawnattr_init(&attr_);
    // SIGINT and SIGTERM at their default action, no signal blocked.
    sigset_t defaults, empty;
    sigemptyset(&defaults);
    sigaddset(&defaults, SIGINT);
    sigaddset(&defaults, SIGTERM);
    sigemptyset(&empty);
    ::posix_spawnattr_setsigdefault(&attr_, &defaults);
    ::posix_spawnattr_setsigmask(&attr_, &empty);
    ::posix_spawnattr_setflags(&attr_, POSIX_SPAWN_SETSIGDEF | POSIX_SPAWN_SETSIGMASK);
  }
  ~SpawnSetup() {
    ::posix_spawn_file_actions_destroy(&actions_);
    ::posix_spawnattr_destroy(&attr_);
  }
  SpawnSetup(const SpawnSetup&) = delete;
  SpawnSetup& operator=(const SpawnSetup&) = delete;

  posix_spawn_file_actions_t* actions() { return &actions_; }
  const posix_spawnattr_t* attr() const { return &attr_; }

 private:
  posix_spawn_file_actions_t actions_;
  posix_spawnattr_t attr_;
};

// A pipe whose ends the parent closes when done; both ends close on exec,
// so only the stream the child's dup2 makes survives in the child.
struct Pipe {
  int read_fd = -1;
  int write_fd = -1;
  ~Pipe() {
    if (read_fd >= 0) ::close(read_fd);
    if (write_fd >= 0) ::close(write_fd);
  }
};

// Adds the file action that routes `fd` (1 or 2) as `to` asks.
void RouteOutput(const SpawnRequest& request, SpawnSetup& setup, int fd, ChildOutput to,
                 const std::string& file, Pipe& pipe) {
  switch (to) {
    case ChildOutput::kNull:
      ::posix_spawn_file_actions_addopen(setup.actions(), fd, "/dev/null", O_WRONLY, 0);
      return;
    case ChildOutput::kInherit:
      return;
    case ChildOutput::kFile:
      ::posix_spawn_file_actions_addopen(setup.actions(), fd, file.c_str(),
                                         O_WRONLY | O_CREAT | O_TRUNC, kFileMode);
      return;
    case ChildOutput::kCapture: {
      int fds[2];
      if (::pipe2(fds, O_CLOEXEC) != 0) {
        throw StartError(request, std::string("pipe: ") + std::strerror(errno));
      }
      pipe.read_fd = fds[0];
      pipe.write_fd = fds[1];
      ::posix_spawn_file_actions_adddup2(setup.actions(), pipe.write_fd, fd);
      return;
    }
  }
}

pid_t Spawn(const SpawnRequest& request, Pipe& out, Pipe& err) {
  if (request.argv.empty()) throw StartError(request, "empty command");
  SpawnSetup setup;
  ::posix_spawn_file_actions_addopen(setup.actions(), STDIN_FILENO, "/dev/null", O_RDONLY, 0);
  RouteOutput(request, setup, STDOUT_FILENO, request.stdout_to, request.stdout_file, out);
  RouteOutput(request, setup, STDERR_FILENO, request.stderr_to, request.stderr_file, err);
  if (!request.working_dir.empty()) {
    ::posix_spawn_file_actions_addchdir_np(setup.actions(), request.working_dir.c_str());
  }
  std::vector<char*> argv;
  for (const std::string& a : request.argv) argv.push_back(const_cast<char*>(a.c_str()));
  argv.push_back(nullptr);
  pid_t pid = -1;
  const int rc =
      request.search_path
          ? ::posix_spawnp(&pid, argv[0], setup.actions(), setup.attr(), argv.data(), environ)
          : ::posix_spawn(&pid, argv[0], setup.actions(), setup.attr(), argv.data(), environ);
  if (rc != 0) {
    const std::string reason = std::strerror(rc);
    throw StartError(request,
                     rc == ENOENT && request.search_path ? reason + " (not on PATH)" : reason);
  }
  // The child holds its own copies of the write ends now.
  for (Pipe* p : {&out, &err}) {
    if (p->write_fd >= 0) ::close(p->write_fd);
    p->write_fd = -1;
  }
  return pid;
}

// Reads both captured streams until each reaches EOF (poll, so a child that
// fills one pipe while we block on the other cannot deadlock).
void ReadCaptured(Pipe& out, Pipe& err, ChildResult& result) {
  struct Stream {
    int fd;
    std::string* text;
  } streams[] = {{out.read_fd, &result.stdout_text}, {err.read_fd, &result.stderr_text}};
  char buf[4096];
  for (;;) {
    pollfd fds[2];
    nfds_t n = 0;
    Stream* live[2];
    for (Stream& s : streams) {
      if (s.fd < 0) continue;
      fds[n] = pollfd{s.fd, POLLIN, 0};
      live[n++] = &s;
    }
    if (n == 0) return;
    if (::poll(fds, n, -1) < 0) {
      if (errno == EINTR) continue;
      return;
    }
    for (nfds_t i = 0; i < n; ++i) {
      if (fds[i].revents == 0) continue;
      const ssize_t got = ::read(live[i]->fd, buf, sizeof buf);
      if (got > 0) {
        live[i]->text->append(buf, static_cast<size_t>(got));
      } else if (got == 0 || errno != EINTR) {
        live[i]->fd = -1;  // EOF or a broken pipe: this stream is done
      }
    }
  }
}

}  // namespace

pid_t SpawnChild(const SpawnRequest& request) {
  if (request.stdout_to == ChildOutput::kCapture || request.stderr_to == ChildOutput::kCapture) {
    throw Error(ExitCode::kInternal, "SpawnChild: capture needs RunChildToEnd");
  }
  Pipe out, err;
  return Spawn(request, out, err);
}

ChildResult RunChildToEnd(const SpawnRequest& request) {
  Pipe out, err;
  const pid_t pid = Spawn(request, out, err);
  ChildResult result;
  ReadCaptured(out, err, result);
  result.wait_status = WaitForChild(pid, &result.usage);
  return result;
}

int WaitForChild(pid_t pid, rusage* usage) {
  int status = 0;
  rusage ignored{};
  while (::wait4(pid, &status, 0, usage ? usage : &ignored) < 0) {
    if (errno != EINTR) {
      throw Error(ExitCode::kInternal,
                  "waiting for process " + std::to_string(pid) + ": " + std::strerror(errno));
    }
  }
  return status;
}

int ExitCodeOf(int wait_status) {
  if (WIFEXITED(wait_status)) return WEXITSTATUS(wait_status);
  if (WIFSIGNALED(wait_status)) return kSignalExitBase + WTERMSIG(wait_status);
  return -1;
}

std::string ReadFileText(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

std::string LastStderrLine(const std::string& text, size_t max_chars) {
  std::istringstream in(text);
  std::string line, last;
  while (std::getline(in, line)) {
    if (line.find_first_not_of(" \t\r") != std::string::npos) last = line;
  }
  if (last.size() > max_chars) last = last.substr(0, max_chars) + "...";
  return last.empty() ? "no message" : last;
}

}  // namespace tritsim
