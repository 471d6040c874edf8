#include "timed_wait_loop.h"

#include <chrono>

#include <systemc>

namespace tritsim_bench {
namespace {

// One thread that only waits: each iteration is one timed-event
// notification, one trip through the scheduler and one context switch.
class WaitLoop : public sc_core::sc_module {
 public:
  SC_HAS_PROCESS(WaitLoop);
  WaitLoop(sc_core::sc_module_name name, long waits) : sc_core::sc_module(name), waits_(waits) {
    SC_THREAD(Run);
  }

 private:
  void Run() {
    for (long i = 0; i < waits_; ++i) sc_core::wait(1, sc_core::SC_NS);
    sc_core::sc_stop();
  }
  long waits_;
};

}  // namespace

double TimedWaitNs(long waits) {
  sc_core::sc_report_handler::set_actions("/OSCI/SystemC", sc_core::SC_DO_NOTHING);
  WaitLoop loop("wait_loop", waits);
  const auto start = std::chrono::steady_clock::now();
  sc_core::sc_start();
  const auto end = std::chrono::steady_clock::now();
  return std::chrono::duration<double, std::nano>(end - start).count() / double(waits);
}

}  // namespace tritsim_bench
