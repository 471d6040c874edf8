#include "report/gnuplot.h"

#include <filesystem>
#include <system_error>

#include "common/atomic_file.h"
#include "common/error.h"
#include "common/subprocess.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

constexpr size_t kMaxErrorChars = 300;  // gnuplot stderr quoted in an error message

Error PlotError(const std::string& dir, const std::string& what) {
  return Error(ExitCode::kBadInput, "--plots " + dir + ": " + what);
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

// Runs gnuplot on `script` in `dir` writing `out`. Returns "" on success,
// else what went wrong (one line).
std::string RunGnuplot(const std::string& dir, const std::string& script, const std::string& out) {
  SpawnRequest request;
  request.argv = {"gnuplot", "-e", "outfile=\"" + out + "\"", script};
  request.search_path = true;
  request.working_dir = dir;
  request.stderr_to = ChildOutput::kCapture;
  ChildResult result;
  try {
    result = RunChildToEnd(request);
  } catch (const Error& e) {
    return std::string(e.what()) + " (Debian package gnuplot-nox)";
  }
  if (ExitCodeOf(result.wait_status) == 0) return "";
  return Condense(result.stderr_text);
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
