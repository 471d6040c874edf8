#include "engine/simulation.h"

#include <memory>

#include <systemc>

#include "common/atomic_file.h"
#include "common/error.h"
#include "hw/accelerator.h"
#include "hw/dram_command_log.h"

namespace tritsim {

namespace {

void QuietSystemC() {
  using sc_core::sc_report_handler;
  sc_report_handler::set_actions("/OSCI/SystemC", sc_core::SC_DO_NOTHING);
  sc_report_handler::set_actions(sc_core::SC_INFO, sc_core::SC_DO_NOTHING);
  sc_report_handler::set_actions(sc_core::SC_WARNING, sc_core::SC_DO_NOTHING);
  sc_report_handler::set_actions(sc_core::SC_ERROR, sc_core::SC_THROW);
  sc_report_handler::set_actions(sc_core::SC_FATAL, sc_core::SC_THROW);
}

RunResult Simulate(const ArchConfig& arch, TraceSource& trace, const SimOptions& options) {
  QuietSystemC();
  std::unique_ptr<Accelerator> top;
  try {
    top = std::make_unique<Accelerator>("accelerator", arch, options, trace);
    sc_core::sc_start();
  } catch (const Error&) {
    throw;
  } catch (const sc_core::sc_report& report) {
    throw Error(ExitCode::kInternal, std::string("SystemC: ") + report.what());
  }
  top->RethrowIfFailed();
  if (!top->finished()) {
    throw SimError("watchdog: the simulation stopped making progress: " + top->WaitState());
  }
  RunResult result;
  result.arch_name = arch.name;
  result.model_name = trace.header().model;
  top->Collect(result);
  if (top->activity()) WriteFileAtomically(options.vcd_path, top->activity()->ToVcd("accelerator"));
  return result;
}

}  // namespace

// With a DRAM log, the whole run streams into the log's temporary file, so a
// missing or read-only folder fails before simulating (exit 3) and a failed
// run leaves no log.
RunResult RunSimulation(const ArchConfig& arch, TraceSource& trace, const SimOptions& options) {
  if (options.dram_log_path.empty()) return Simulate(arch, trace, options);
  RunResult result;
  StreamFileAtomically(options.dram_log_path, [&](std::ostream& out) {
    DramCommandLog log(out, arch.dram, static_cast<uint64_t>(options.dram_log_limit));
    SimOptions logged = options;
    logged.dram_log = &log;
    result = Simulate(arch, trace, logged);
    log.Close();
  });
  return result;
}

}  // namespace tritsim
