#include "common/atomic_file.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <fstream>

#include "common/error.h"

namespace tritsim {
namespace {

Error WriteError(const std::string& path, const std::string& what, int err) {
  return Error(ExitCode::kBadInput, path + ": " + what + ": " + std::strerror(err));
}

// Flushes the file's data to disk before it is renamed into place.
bool SyncFile(const std::string& path) {
  const int fd = ::open(path.c_str(), O_RDONLY);
  if (fd < 0) return false;
  const bool ok = ::fsync(fd) == 0;
  ::close(fd);
  return ok;
}

}  // namespace

void StreamFileAtomically(const std::string& path,
                          const std::function<void(std::ostream&)>& write) {
  const std::string temp = path + ".tmp." + std::to_string(::getpid());
  try {
    std::ofstream out(temp, std::ios::binary | std::ios::trunc);
    if (!out) throw WriteError(path, "cannot write output file", errno);
    write(out);
    out.flush();
    if (!out) throw WriteError(path, "write failed", errno);
  } catch (...) {
    std::remove(temp.c_str());
    throw;
  }
  if (!SyncFile(temp)) {
    const int err = errno;
    std::remove(temp.c_str());
    throw WriteError(path, "cannot flush output file", err);
  }
  if (std::rename(temp.c_str(), path.c_str()) != 0) {
    const int err = errno;
    std::remove(temp.c_str());
    throw WriteError(path, "cannot rename output into place", err);
  }
}

void WriteFileAtomically(const std::string& path, const std::string& content) {
  StreamFileAtomically(path, [&content](std::ostream& out) { out << content; });
}

}  // namespace tritsim
