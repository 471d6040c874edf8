// Up-front output checks. See output_paths.h.
#include "common/output_paths.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>

#include "common/error.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

Error OutputError(const OutputPath& out, const std::string& reason) {
  const char* what = out.kind == OutputKind::kFile ? "output file" : "output folder";
  return Error(ExitCode::kBadInput,
               out.path + ": cannot write " + what + " (" + out.flag + "): " + reason);
}

// The folder an output lands in: the parent of a file; a folder itself if it
// exists, else its parent (where it will be created).
fs::path FolderOf(const OutputPath& out, bool exists) {
  const fs::path p(out.path);
  if (out.kind == OutputKind::kFolder && exists) return p;
  const fs::path parent = p.parent_path();
  return parent.empty() ? fs::path(".") : parent;
}

// Returns "" if a file can be created in `dir`, else the reason.
std::string ProbeFolder(const fs::path& dir) {
  std::error_code ec;
  if (!fs::exists(dir, ec)) {
    return "folder " + dir.string() + " does not exist (tritsim does not create parent folders)";
  }
  if (!fs::is_directory(dir, ec)) return dir.string() + " is not a folder";
  const std::string probe = (dir / (".tritsim-probe." + std::to_string(::getpid()))).string();
  const int fd = ::open(probe.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0600);
  if (fd < 0) return "folder " + dir.string() + " is not writable: " + std::strerror(errno);
  ::close(fd);
  ::unlink(probe.c_str());
  return "";
}

void CheckOne(const OutputPath& out) {
  std::error_code ec;
  const bool exists = fs::exists(out.path, ec);
  const bool is_dir = exists && fs::is_directory(out.path, ec);
  if (out.kind == OutputKind::kFile && is_dir) throw OutputError(out, "it is a folder");
  if (out.kind == OutputKind::kFolder && exists && !is_dir) {
    throw OutputError(out, "it exists and is not a folder");
  }
  const std::string reason = ProbeFolder(FolderOf(out, exists));
  if (!reason.empty()) throw OutputError(out, reason);
}

}  // namespace

void CheckOutputPaths(const std::vector<OutputPath>& outputs) {
  for (const OutputPath& out : outputs) {
    if (!out.path.empty()) CheckOne(out);
  }
}

}  // namespace tritsim
