// Output paths checked before any work starts, so a long run is never lost
// at its end to a typo in an output path.
//
// Policy (docs/reliability.md, "Outputs"): tritsim never creates a missing
// parent folder. A file output needs an existing, writable parent folder and
// must not be a folder itself; a folder output (--plots DIR, a sweep's
// CSV.points/) may be missing, and is then created, but its parent must exist
// and be writable. Writing itself stays atomic (common/atomic_file.h).
#pragma once

#include <string>
#include <vector>

namespace tritsim {

enum class OutputKind { kFile, kFolder };

struct OutputPath {
  std::string flag;  // the option that named it, e.g. "--json"; shown in messages
  std::string path;  // empty: the output is not wanted, nothing to check
  OutputKind kind = OutputKind::kFile;
};

// Checks every non-empty path in order. Writability is probed by creating
// and removing a file in the folder (access(2) says yes to root even on a
// read-only mount). Throws tritsim::Error (exit 3) on the first problem, one
// line: "PATH: cannot write output file (FLAG): REASON".
void CheckOutputPaths(const std::vector<OutputPath>& outputs);

}  // namespace tritsim
