#include "run/simulation.h"

#include <memory>

#include <systemc>

#include "common/atomic_file.h"
#include "common/error.h"
#include "hw/accelerator.h"

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

}  // namespace

RunResult RunSimulation(const ArchConfig& arch, TraceSource& trace, const SimOptions& options) {
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

}  // namespace tritsim
