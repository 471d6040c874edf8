#include "report/gnuplot.h"

#include <fcntl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <filesystem>
#include <system_error>

#include "common/atomic_file.h"
#include "common/error.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr size_t kMaxErrorChars = 300;  // gnuplot stderr quoted in an error message

Error PlotError(const std::string& dir, const std::string& what) {
  return Error(ExitCode::kBadInput, "--plots " + dir + ": " + what);
}

// Reads everything from `fd` until EOF.
std::string ReadAll(int fd) {
  std::string out;
  char buf[4096];
  ssize_t n;
  while ((n = ::read(fd, buf, sizeof buf)) > 0) out.append(buf, static_cast<size_t>(n));
  return out;
}

// gnuplot's stderr as one line: newlines joined with "; ", cut short.
std::string Condense(std::string text) {
  while (!text.empty() && (text.back() == '\n' || text.back() == ' ')) text.pop_back();
  std::string out;
  for (char c : text) {
    if (c == '\n') {
      out += "; ";
    } else if (c != '\r') {
      out += c;
    }
  }
  if (out.size() > kMaxErrorChars) out = out.substr(0, kMaxErrorChars) + "...";
  return out.empty() ? "no message" : out;
}

// Child side: working directory `dir`, stderr to `err_fd`, stdin and stdout
// to /dev/null, then exec gnuplot. Only async-signal-safe calls.
[[noreturn]] void ExecGnuplot(const char* dir, const char* outfile_arg, const char* script,
                              int err_fd) {
  const int null_fd = ::open("/dev/null", O_RDWR);
  if (null_fd >= 0) {
    ::dup2(null_fd, STDIN_FILENO);
    ::dup2(null_fd, STDOUT_FILENO);
  }
  ::dup2(err_fd, STDERR_FILENO);
  if (::chdir(dir) != 0) {
    static const char kMsg[] = "cannot enter the plot directory\n";
    (void)!::write(STDERR_FILENO, kMsg, sizeof kMsg - 1);
    ::_exit(127);
  }
  ::execlp("gnuplot", "gnuplot", "-e", outfile_arg, script, static_cast<char*>(nullptr));
  static const char kMsg[] = "gnuplot not found on PATH (Debian package gnuplot-nox)\n";
  (void)!::write(STDERR_FILENO, kMsg, sizeof kMsg - 1);
  ::_exit(127);
}

// Runs gnuplot on `script` in `dir` writing `out`. Returns "" on success,
// else what went wrong (one line).
std::string RunGnuplot(const std::string& dir, const std::string& script, const std::string& out) {
  const std::string outfile_arg = "outfile=\"" + out + "\"";
  int pipe_fds[2];
  if (::pipe(pipe_fds) != 0) return "cannot create a pipe";
  const pid_t pid = ::fork();
  if (pid < 0) {
    ::close(pipe_fds[0]);
    ::close(pipe_fds[1]);
    return "cannot fork";
  }
  if (pid == 0) {
    ::close(pipe_fds[0]);
    ExecGnuplot(dir.c_str(), outfile_arg.c_str(), script.c_str(), pipe_fds[1]);
  }
  ::close(pipe_fds[1]);
  const std::string err = ReadAll(pipe_fds[0]);
  ::close(pipe_fds[0]);
  int status = 0;
  while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {
  }
  if (WIFEXITED(status) && WEXITSTATUS(status) == 0) return "";
  return Condense(err);
}

void WriteInPlotDir(const std::string& dir, const std::string& path, const std::string& content) {
  try {
    WriteFileAtomically(path, content);
  } catch (const Error& e) {
    throw PlotError(dir, e.what());
  }
}

}  // namespace

void RenderGnuplot(const std::string& dir, const std::string& name, const std::string& data,
                   const std::string& script) {
  std::error_code ec;
  fs::create_directories(dir, ec);
  if (ec) throw PlotError(dir, "cannot create the directory: " + ec.message());
  const fs::path base = fs::path(dir) / name;
  WriteInPlotDir(dir, base.string() + ".dat", data);
  WriteInPlotDir(dir, base.string() + ".gp", script);
  const std::string svg_tmp = name + ".svg.tmp";
  const fs::path tmp_path = fs::path(dir) / svg_tmp;
  std::string failure = RunGnuplot(dir, name + ".gp", svg_tmp);
  if (failure.empty() && (!fs::exists(tmp_path, ec) || fs::file_size(tmp_path, ec) == 0)) {
    failure = name + ".svg: gnuplot wrote no output";
  }
  if (failure.empty()) {
    fs::rename(tmp_path, base.string() + ".svg", ec);
    if (ec) failure = name + ".svg: cannot rename into place: " + ec.message();
  }
  if (!failure.empty()) {
    fs::remove(tmp_path, ec);
    throw PlotError(dir, "gnuplot failed: " + failure);
  }
}

}  // namespace tritsim
