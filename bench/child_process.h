// Runs a program as a child process and measures it the way the operating
// system sees it: wall time from fork to exit, and the child's own peak
// resident set (getrusage via wait4, so other processes never count).
#pragma once

#include <string>
#include <vector>

namespace tritsim_bench {

struct ChildMeasurement {
  double wall_seconds = 0.0;  // fork to reaped exit, steady clock
  double cpu_seconds = 0.0;   // user + system time of the child
  long peak_rss_kib = 0;      // ru_maxrss of the child (Linux: KiB)
  int exit_code = -1;         // exit status, or 128 + signal
};

// Runs argv[0] (a path, not searched on PATH) with `argv`, stdout and stdin
// on /dev/null, stderr inherited. Blocks until the child exits. Throws
// std::runtime_error if the process cannot be started.
ChildMeasurement RunChild(const std::vector<std::string>& argv);

// Runs `body` in a forked child (no exec) and returns the double it
// reports through a pipe. For code that must own its process, such as a
// SystemC elaboration. Throws std::runtime_error if the child fails.
double RunForkedForValue(double (*body)(long), long argument);

}  // namespace tritsim_bench
