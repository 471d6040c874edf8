#include "common/interrupt.h"

#include <atomic>
#include <csignal>
#include <string>

#include "common/error.h"

namespace tritsim {
namespace {

// The signal number that arrived, 0 for none. A lock-free atomic is
// async-signal-safe to store from a handler (C++17 [support.signal]).
std::atomic<int> g_signal{0};
static_assert(std::atomic<int>::is_always_lock_free, "handler needs a lock-free flag");

extern "C" void OnInterrupt(int signal_number) {
  g_signal.store(signal_number, std::memory_order_relaxed);
  // A second signal takes the default action (terminate) at once.
  std::signal(signal_number, SIG_DFL);
}

}  // namespace

void InstallInterruptHandler() { std::signal(SIGINT, OnInterrupt); }

bool InterruptRequested() { return g_signal.load(std::memory_order_relaxed) != 0; }

const char* InterruptSignalName() {
  switch (g_signal.load(std::memory_order_relaxed)) {
    case SIGINT:
      return "SIGINT";
    case 0:
      return "";
    default:
      return "signal";
  }
}

void ThrowInterrupted(const std::string& where) {
  throw Error(ExitCode::kInterrupted, std::string("interrupted (") + InterruptSignalName() + ") " +
                                          where + "; no output written");
}

}  // namespace tritsim
