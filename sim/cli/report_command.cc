// `tritsim report INPUT --out DIR`: the report page of a run JSON or a
// sweep CSV, DIR/index.html (report/run_page.h, sweep/sweep_page.h;
// docs/report-page.md).
#include <algorithm>
#include <boost/program_options.hpp>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <nlohmann/json.hpp>
#include <system_error>

#include "cli/cli_options.h"
#include "cli/commands.h"
#include "common/atomic_file.h"
#include "common/csv.h"
#include "common/error.h"
#include "common/output_paths.h"
#include "report/resolved_config.h"
#include "report/run_page.h"
#include "sweep/sweep_page.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

const char* const kUsage =
    "usage: tritsim report RUN.json --out DIR\n"
    "       tritsim report SWEEP.csv --out DIR\n"
    "\n"
    "Writes DIR/index.html, one self-contained page (inline SVG, no network): for a run JSON\n"
    "(tritsim run --json) the headline per phase, the binding resources, stall and energy\n"
    "breakdowns, a roofline per phase, the top ops and the provenance; for a sweep CSV\n"
    "(tritsim sweep --out) the Pareto fronts, a plot per axis and the sortable table of\n"
    "points. DIR is created if missing (its parent must exist). See docs/report-page.md.";

constexpr const char* kPageName = "index.html";

// The first byte that is not white space, or 0 for an empty file.
char FirstByte(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {
    throw InputError(path, 0, "", "is a folder, not a run JSON or a sweep CSV");
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, 0, "", "cannot open (expected a run JSON or a sweep CSV)");
  char c = 0;
  while (in.get(c)) {
    if (c != ' ' && c != '\t' && c != '\r' && c != '\n') return c;
  }
  return 0;
}

std::string PageOf(const std::string& path) {
  if (FirstByte(path) == '{') {
    const nlohmann::json run = ReadRunJsonFile(path);
    try {
      return RunReportPage(run, path);
    } catch (const nlohmann::json::exception& e) {
      throw InputError(path, 0, "", std::string("unexpected run JSON layout: ") + e.what());
    }
  }
  const CsvTable table = ReadCsvFile(path);
  if (!IsSweepTable(table)) {
    throw InputError(path, 0, "",
                     "not a run JSON (schema tritsim.run/1, from tritsim run --json) nor a sweep "
                     "CSV (header starting with id, with a status column, from tritsim sweep "
                     "--out)");
  }
  return SweepReportPage(table, path);
}

}  // namespace

int ReportCommand(const Args& args) {
  std::vector<std::string> inputs;
  std::string out_dir;
  po::options_description desc("report options");
  desc.add_options()("help,h", "show this help")(
      "out", po::value(&out_dir)->value_name("DIR"),
      "folder to write index.html into (required; created if missing)");
  if (std::find(args.begin(), args.end(), "--help") != args.end() ||
      std::find(args.begin(), args.end(), "-h") != args.end()) {
    std::cout << kUsage << "\n\n" << desc << "\n";
    return 0;
  }
  po::options_description all;
  all.add(desc);
  all.add_options()("input", po::value(&inputs)->composing(), "the run JSON or sweep CSV");
  po::variables_map vm;
  ParseCommandLine("report", args, all, vm, "input", -1);
  if (inputs.size() != 1) {
    throw UsageError("report: expected one input, a run JSON or a sweep CSV, got " +
                     std::to_string(inputs.size()) + " (see tritsim report --help)");
  }
  if (out_dir.empty())
    throw UsageError("report: --out DIR is required (see tritsim report --help)");
  CheckOutputPaths({{"--out", out_dir, OutputKind::kFolder}});
  // The whole page is built before anything is written: bad input leaves no folder or file.
  const std::string page = PageOf(inputs[0]);
  std::error_code ec;
  std::filesystem::create_directory(out_dir, ec);
  if (ec) {
    throw Error(ExitCode::kBadInput,
                out_dir + ": cannot write output folder (--out): " + ec.message());
  }
  const std::string target = (std::filesystem::path(out_dir) / kPageName).string();
  WriteFileAtomically(target, page);
  std::cerr << "tritsim report: wrote " << target << "\n";
  return 0;
}

}  // namespace tritsim
