// The raw cost of one SystemC timed wait on this machine: the yardstick the
// simulator's per-DRAM-request cost is compared with (docs/performance.md).
#pragma once

namespace tritsim_bench {

// Elaborates one module whose SC_THREAD does `waits` times wait(1, SC_NS),
// runs it, and returns the wall nanoseconds per wait (sc_start only, not
// elaboration). SystemC elaborates once per process: call at most once per
// process (the driver runs it in a child process of its own binary).
// REQUIRES: waits > 0.
double TimedWaitNs(long waits);

}  // namespace tritsim_bench
