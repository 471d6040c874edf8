// The benchmark's child processes, through the simulator's one way of
// starting a program (sim/common/subprocess.h, posix_spawn): a measured run
// of another binary, and a measurement that must own its process.
#pragma once

#include <string>
#include <vector>

namespace tritsim_bench {

struct ChildMeasurement {
  double wall_seconds = 0.0;  // spawn to reaped exit, steady clock
  double cpu_seconds = 0.0;   // user + system time of the child
  long peak_rss_kib = 0;      // ru_maxrss of the child (Linux: KiB)
  int exit_code = -1;         // exit status, or 128 + signal
};

// Runs argv[0] (a path, not searched on PATH) with `argv`, stdout and stdin
// on /dev/null, stderr inherited. Blocks until the child exits; its own
// rusage (wait4) gives CPU time and peak resident set, so other processes
// never count. Throws std::runtime_error if it cannot be started.
ChildMeasurement RunChild(const std::vector<std::string>& argv);

// Runs this benchmark binary again (/proc/self/exe) as
// `tritsim_bench --child-value MODE ARGUMENT` and returns the number the
// child prints on stdout. For code that must own its process, such as a
// SystemC elaboration. Throws std::runtime_error if the child fails.
double RunSelfForValue(const std::string& mode, long argument);

// In the child: true when argv is such an invocation; then `mode` and
// `argument` are set and the caller prints the value with PrintChildValue.
bool IsChildValueInvocation(int argc, char** argv, std::string& mode, long& argument);
void PrintChildValue(double value);

}  // namespace tritsim_bench
