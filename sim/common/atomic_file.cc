#include "common/atomic_file.h"

#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <fstream>

#include "common/error.h"

namespace tritsim {

void WriteFileAtomically(const std::string& path, const std::string& content) {
  const std::string temp = path + ".tmp." + std::to_string(::getpid());
  {
    std::ofstream out(temp, std::ios::binary | std::ios::trunc);
    if (!out) {
      throw Error(ExitCode::kBadInput,
                  path + ": cannot write output file: " + std::strerror(errno));
    }
    out << content;
    out.flush();
    if (!out) {
      std::remove(temp.c_str());
      throw Error(ExitCode::kBadInput, path + ": write failed: " + std::strerror(errno));
    }
  }
  if (std::rename(temp.c_str(), path.c_str()) != 0) {
    int err = errno;
    std::remove(temp.c_str());
    throw Error(ExitCode::kBadInput,
                path + ": cannot rename output into place: " + std::strerror(err));
  }
}

}  // namespace tritsim
