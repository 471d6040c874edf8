// What this binary was built from, for the provenance section of every JSON
// output. Kept out of widely included headers: a new commit recompiles only
// the generated build_commit.cc (cmake/build_commit.cmake).
#pragma once

namespace tritsim {

// The git commit (40 hex digits) HEAD pointed to when the binary was built,
// or "unknown" when built outside a git tree.
extern const char* const kBuildCommit;

// The release version (CMake's PROJECT_VERSION), e.g. "0.1.0".
const char* BuildVersion();

}  // namespace tritsim
