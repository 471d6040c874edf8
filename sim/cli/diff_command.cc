// `tritsim diff A.json B.json [--json FILE]`: two run reports side by side
// (report/run_diff.h; docs/report-format.md).
#include <algorithm>
#include <boost/program_options.hpp>
#include <iostream>

#include "cli/cli_options.h"
#include "cli/commands.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "common/output_paths.h"
#include "report/resolved_config.h"
#include "report/run_diff.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

constexpr int kRunCount = 2;  // A and B

const char* const kUsage =
    "usage: tritsim diff A.json B.json [--json FILE]\n"
    "\n"
    "Compares two run JSONs (tritsim run --json): the totals, each phase and each op class\n"
    "(layers grouped by kind/tensor) side by side with the ratio B/A, and the resolved\n"
    "configuration keys that differ. See docs/report-format.md.";

struct DiffArgs {
  std::vector<std::string> inputs;
  std::string json_path;
};

void Parse(const Args& args, DiffArgs& a, po::options_description& desc) {
  desc.add_options()("help,h", "show this help")(
      "json", po::value(&a.json_path)->value_name("FILE"), "write the comparison as JSON");
  po::options_description all;
  all.add(desc);
  all.add_options()("input", po::value(&a.inputs)->composing(), "the two run JSONs");
  po::variables_map vm;
  ParseCommandLine("diff", args, all, vm, "input", -1);
  if (a.inputs.size() != kRunCount) {
    throw UsageError("diff: expected two run JSONs A.json B.json, got " +
                     std::to_string(a.inputs.size()) + " (see tritsim diff --help)");
  }
}

nlohmann::ordered_json Compare(const std::vector<std::string>& paths) {
  const nlohmann::json a = ReadRunJsonFile(paths[0]);
  const nlohmann::json b = ReadRunJsonFile(paths[1]);
  try {
    return DiffJson(a, b, paths[0], paths[1]);
  } catch (const nlohmann::json::exception&) {
    throw InputError(paths[0] + " or " + paths[1], 0, "layers",
                     "unexpected layout (each layer needs kind, tensor and numeric figures)");
  }
}

}  // namespace

int DiffCommand(const Args& args) {
  DiffArgs a;
  po::options_description desc("diff options");
  if (std::find(args.begin(), args.end(), "--help") != args.end() ||
      std::find(args.begin(), args.end(), "-h") != args.end()) {
    Parse({}, a, desc);
    std::cout << kUsage << "\n\n" << desc << "\n";
    return 0;
  }
  Parse(args, a, desc);
  CheckOutputPaths({{"--json", a.json_path, OutputKind::kFile}});
  nlohmann::ordered_json diff = Compare(a.inputs);
  if (!a.json_path.empty()) {
    nlohmann::ordered_json doc;
    doc["schema"] = diff["schema"];
    doc["provenance"] = ProvenanceJson(RecordedCommand("diff", args));
    for (auto it = diff.begin(); it != diff.end(); ++it) doc[it.key()] = it.value();
    WriteFileAtomically(a.json_path, doc.dump(2) + "\n");
  }
  PrintDiff(diff, std::cout);
  return 0;
}

}  // namespace tritsim
