// Output files are written whole or not at all: content goes to a temporary
// name beside the target, is flushed to disk, and is renamed into place, so
// an interrupted run leaves either the old file or the complete new one
// (a kill during the write may leave the temporary, never a torn target).
#pragma once

#include <functional>
#include <ostream>
#include <string>

namespace tritsim {

// Writes `content` to `path` atomically. Throws tritsim::Error (exit 3)
// naming the path if the directory is missing or not writable.
void WriteFileAtomically(const std::string& path, const std::string& content);

// Streams into `path` atomically: `write` fills the stream (it may throw;
// then the temporary is removed and the target left untouched). For outputs
// too large to hold in memory, such as long traces.
void StreamFileAtomically(const std::string& path, const std::function<void(std::ostream&)>& write);

}  // namespace tritsim
