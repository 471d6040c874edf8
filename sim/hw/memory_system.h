// The DRAM side of the accelerator: one or more interleaved channels, each
// with bank groups, banks, open rows, JEDEC timing, all-bank refresh, and a
// first-ready / first-come scheduler over a bounded queue; or an ideal
// fixed-latency, fixed-bandwidth memory.
//
// Plain C++ (no SystemC): the DMA engine hands it a whole tile transfer and
// waits once for the returned completion time, so no SystemC context switch
// is paid per DRAM request. Requests are modelled one by one, in picoseconds,
// so the result is exact under the model's rules (temporal decoupling that
// keeps results exact: only the DMA engine talks to memory, in order).
#pragma once

#include <cstdint>
#include <memory>

#include "config/arch_config.h"
#include "hw/dram_channel.h"
#include "hw/dram_command_log.h"
#include "results/run_result.h"

namespace tritsim {

class MemorySystem {
 public:
  virtual ~MemorySystem() = default;

  // Moves [address, address + bytes) as bursts of burst_bytes(), issued in
  // address order, none before `start_ps`, with at most `max_outstanding`
  // requests in flight (issued but data not yet returned). Returns the time,
  // in ps, when the last data beat has been transferred.
  // REQUIRES: start_ps is not earlier than the start_ps of the previous call.
  virtual uint64_t Transfer(uint64_t address, uint64_t bytes, bool is_write, uint64_t start_ps,
                            int64_t max_outstanding) = 0;

  // Accounts refreshes and bus time up to `end_ps` (end of the run).
  virtual void Finish(uint64_t end_ps) = 0;

  // Sends every DRAM command from now on to `log` (Release-d as the run
  // goes, everything by the end of Finish); the caller Closes it after
  // Finish. Results are the same with and without a log. The ideal memory
  // issues no commands. REQUIRES: before the first Transfer.
  virtual void SetCommandLog(DramCommandLog* /*log*/) {}

  // Requests moved over in steady runs instead of simulated one by one
  // (counted in stats() all the same); 0 for the ideal memory.
  virtual uint64_t skipped_requests() const { return 0; }

  virtual const DramStats& stats() const = 0;
  virtual uint64_t burst_bytes() const = 0;          // bytes per request, all channels alike
  virtual double peak_bytes_per_second() const = 0;  // all channels, no refresh
};

// Whether a transfer's steady runs of row hits are moved over a whole
// number of periods at once (kSkip, the default: the same results, exactly,
// in far fewer steps; see memory_system.cc) or simulated request by request
// (kSimulate: for the tests that prove the two agree).
enum class SteadyRuns : uint8_t { kSkip, kSimulate };

// REQUIRES: `dram` validated by the config loader (preset applied).
// `opening` is for tests that compare against in-order row opening; the
// simulator always opens rows ahead.
std::unique_ptr<MemorySystem> MakeMemorySystem(const DramConfig& dram,
                                               RowOpening opening = RowOpening::kAhead,
                                               SteadyRuns steady = SteadyRuns::kSkip);

}  // namespace tritsim
