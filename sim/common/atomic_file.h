// Output files are written whole or not at all: content goes to a temporary
// name beside the target and is renamed into place, so an interrupted run
// leaves either the old file or the complete new one.
#pragma once

#include <string>

namespace tritsim {

// Writes `content` to `path` atomically. Throws tritsim::Error (exit 3)
// naming the path if the directory is missing or not writable.
void WriteFileAtomically(const std::string& path, const std::string& content);

}  // namespace tritsim
