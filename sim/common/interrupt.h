// Cooperative handling of Ctrl-C (SIGINT).
//
// The first SIGINT only sets a flag; long-running loops poll
// InterruptRequested() at safe points (the sequencer does so once per trace
// op) and unwind by throwing tritsim::Error(ExitCode::kInterrupted), so no
// output file is written and the process exits 130. The handler then restores
// the default action, so a second signal ends the process at once.
#pragma once

#include <string>

namespace tritsim {

// Installs the handler for SIGINT. Call once, early in main, before any
// thread is started. Idempotent. SIGTERM keeps its default action (the
// process ends at once; atomic output writes leave no torn file), so a
// supervisor such as `timeout` or the sweep runner stops a run even when
// one op takes long.
void InstallInterruptHandler();

// True once a SIGINT has arrived since InstallInterruptHandler().
// Async-signal-safe to set, cheap to read (one relaxed atomic load).
bool InterruptRequested();

// The name of the signal that set the flag ("SIGINT"), or "" if none has
// arrived. For the one-line message.
const char* InterruptSignalName();

// Throws tritsim::Error(ExitCode::kInterrupted) with the one-line message
// "interrupted (SIGINT) WHERE; no output written". Call it only after
// InterruptRequested() returned true, so hot loops build no string.
[[noreturn]] void ThrowInterrupted(const std::string& where);

}  // namespace tritsim
