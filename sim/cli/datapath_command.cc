// `tritsim datapath`: random GEMMs through the bit-exact datapath model,
// checked against Eigen (docs/datapath.md).
#include <boost/program_options.hpp>
#include <iostream>

#include "cli/cli_options.h"
#include "cli/commands.h"
#include "common/atomic_file.h"
#include "common/error.h"
#include "datapath/datapath_check.h"
#include "datapath/datapath_report.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

const char* const kUsage =
    "usage: tritsim datapath [--arch FILE] [--set arch.KEY=VALUE] [--m M --k K --n N]\n"
    "                        [--seed S] [--json FILE]\n"
    "\n"
    "Quantizes seeded Gaussian weights (absmean, ternary) and activations (absmax, int8),\n"
    "packs and decodes the weights as the design stores them, reduces K through adder\n"
    "trees of the design's fan-in into its accumulator, and compares every output with an\n"
    "Eigen reference GEMM. Exit 0 when every output is exact or differs only by the\n"
    "accumulator's wrap-around; 1 when the model disagrees with the reference otherwise.";

struct DatapathArgs {
  InputOptions in;  // only arch_path and overrides are used
  DatapathShape shape;
  int64_t seed = 1;
  std::string json_path;
};

void AddOptions(po::options_description& d, DatapathArgs& a) {
  d.add_options()("help,h", "show this help")(
      "arch", po::value(&a.in.arch_path)->value_name("FILE"),
      "architecture / design point (YAML); default: the embedded demo design")(
      "set", po::value(&a.in.overrides)->value_name("arch.KEY=VALUE")->composing(),
      "override one architecture key, e.g. arch.array.accumulator_bits=16 (repeatable)")(
      "m", po::value(&a.shape.m)->value_name("M"), "activation rows (default 8)")(
      "k", po::value(&a.shape.k)->value_name("K"), "reduction depth (default 2048)")(
      "n", po::value(&a.shape.n)->value_name("N"), "output columns (default 256)")(
      "seed", po::value(&a.seed)->value_name("S"), "random seed, >= 0 (default 1)")(
      "json", po::value(&a.json_path)->value_name("FILE"), "write the report as JSON");
}

void Validate(const DatapathArgs& a) {
  for (const std::string& text : a.in.overrides) {
    if (text.rfind("arch.", 0) != 0) {
      throw UsageError("--set " + text + ": tritsim datapath takes only arch.KEY=VALUE");
    }
  }
  if (a.seed < 0) {
    throw UsageError("--seed: must be an integer >= 0, got " + std::to_string(a.seed));
  }
  ValidateDatapathShape(a.shape);
}

}  // namespace

int DatapathCommand(const Args& args) {
  DatapathArgs a;
  po::options_description desc("datapath options");
  AddOptions(desc, a);
  po::variables_map vm;
  ParseCommandLine("datapath", args, desc, vm);
  if (vm.count("help")) {
    std::cout << kUsage << "\n\n" << desc << "\n";
    return 0;
  }
  Validate(a);
  const ArchConfig arch = LoadArch(a.in);
  const DatapathInputs inputs = RandomDatapathInputs(a.shape, uint64_t(a.seed));
  const DatapathResult result = RunDatapath(arch, inputs);
  const DatapathReport report{arch, inputs, uint64_t(a.seed), result};
  if (!a.json_path.empty()) WriteFileAtomically(a.json_path, DatapathJsonText(report));
  PrintDatapath(report, std::cout);
  if (!result.bit_exact() && !result.matches_modulo) {
    throw Error(ExitCode::kInternal,
                "datapath: outputs differ from the Eigen reference beyond accumulator wrap-around");
  }
  return 0;
}

}  // namespace tritsim
