#include "run/simulation.h"

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

// Passes the records of `inner` through and reports progress on each.
class ProgressSource : public TraceSource {
 public:
  ProgressSource(TraceSource& inner, const std::function<void(const SimProgress&)>& report)
      : inner_(inner), report_(report) {}
  const TraceHeader& header() const override { return inner_.header(); }
  bool next(TraceRecord& record) override {
    if (!inner_.next(record)) return false;
    if (record.is_step) {
      progress_.phase = record.step.phase;
      progress_.step = record.step.step;
    } else {
      ++progress_.ops_started;
    }
    progress_.simulated_seconds = sc_core::sc_time_stamp().to_seconds();
    report_(progress_);
    return true;
  }

 private:
  TraceSource& inner_;
  const std::function<void(const SimProgress&)>& report_;
  SimProgress progress_;
};

RunResult Simulate(const ArchConfig& arch, TraceSource& trace, const SimOptions& given,
                   const RetireProbe* probe) {
  QuietSystemC();
  std::unique_ptr<Accelerator> top;
  SimOptions options = given;
  if (probe) {
    options.on_op_retired = [&top, probe](int64_t index) {
      if (!probe->wants(index)) return;
      RunResult so_far;
      top->Snapshot(so_far);
      probe->measure(index, so_far, top->op_results());
    };
  }
  ProgressSource reporting(trace, options.on_progress);
  TraceSource& source = options.on_progress ? static_cast<TraceSource&>(reporting) : trace;
  try {
    top = std::make_unique<Accelerator>("accelerator", arch, options, source);
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
  result.weights_resident = options.weights_resident;
  top->Collect(result);
  if (top->activity()) WriteFileAtomically(options.vcd_path, top->activity()->ToVcd("accelerator"));
  return result;
}

}  // namespace

// With a DRAM log, the whole run streams into the log's temporary file, so a
// missing or read-only folder fails before simulating (exit 3) and a failed
// run leaves no log.
RunResult RunSimulation(const ArchConfig& arch, TraceSource& trace, const SimOptions& options,
                        const RetireProbe& probe) {
  return Simulate(arch, trace, options, &probe);
}

RunResult RunSimulation(const ArchConfig& arch, TraceSource& trace, const SimOptions& options) {
  if (options.dram_log_path.empty()) return Simulate(arch, trace, options, nullptr);
  RunResult result;
  StreamFileAtomically(options.dram_log_path, [&](std::ostream& out) {
    DramCommandLog log(out, arch.dram, static_cast<uint64_t>(options.dram_log_limit));
    SimOptions logged = options;
    logged.dram_log = &log;
    result = Simulate(arch, trace, logged, nullptr);
    log.Close();
  });
  return result;
}

}  // namespace tritsim
