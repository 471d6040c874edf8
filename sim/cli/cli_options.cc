#include "cli/cli_options.h"

#include <boost/program_options.hpp>

#include "common/error.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

// Splits "--set arch.array.trees=128" into the file kind and the override.
void SplitOverrides(const std::vector<std::string>& raw, ConfigOverrides& arch,
                    ConfigOverrides& model) {
  for (const std::string& text : raw) {
    const size_t eq = text.find('=');
    if (eq == std::string::npos || eq == 0) {
      throw UsageError("--set " + text + ": expected KEY=VALUE, e.g. arch.array.trees=128");
    }
    const std::string key = text.substr(0, eq);
    const std::string value = text.substr(eq + 1);
    if (key.rfind("arch.", 0) == 0) {
      arch.push_back({key.substr(5), value});
    } else if (key.rfind("model.", 0) == 0) {
      model.push_back({key.substr(6), value});
    } else {
      throw UsageError("--set " + text + ": KEY must start with 'arch.' or 'model.'");
    }
  }
}

}  // namespace

void AddInputOptions(po::options_description& desc, InputOptions& in, bool with_arch) {
  desc.add_options()("model", po::value(&in.model_path)->value_name("FILE"),
                     "model description (YAML); default: the embedded demo model");
  if (with_arch) {
    desc.add_options()("arch", po::value(&in.arch_path)->value_name("FILE"),
                       "architecture / design point (YAML); default: the embedded demo design");
  }
  desc.add_options()(
      "set", po::value(&in.overrides)->value_name("KEY=VALUE")->composing(),
      "override one config key, e.g. arch.array.trees=128 or model.layers=2 (repeatable)")(
      "prefill", po::value(&in.workload.prefill_tokens)->value_name("N"),
      "prompt tokens processed in one prefill step (default 0)")(
      "decode", po::value(&in.workload.decode_tokens)->value_name("N"),
      "generated tokens, one decode step each (default 1)")(
      "context", po::value(&in.workload.context_tokens)->value_name("N"),
      "tokens already in the KV cache before the run (default 0)")(
      "batch", po::value(&in.workload.batch)->value_name("N"),
      "independent sequences processed together (default 1)");
}

void FinishInputOptions(const po::variables_map& vm, InputOptions& in) {
  in.workload_given =
      vm.count("prefill") || vm.count("decode") || vm.count("context") || vm.count("batch");
}

ModelConfig LoadModel(const InputOptions& in) {
  ConfigOverrides arch, model;
  SplitOverrides(in.overrides, arch, model);
  return in.model_path.empty() ? DefaultModel(model) : LoadModelFile(in.model_path, model);
}

ArchConfig LoadArch(const InputOptions& in) {
  ConfigOverrides arch, model;
  SplitOverrides(in.overrides, arch, model);
  return in.arch_path.empty() ? DefaultArch(arch) : LoadArchFile(in.arch_path, arch);
}

void ParseCommandLine(const std::string& command, const std::vector<std::string>& args,
                      const po::options_description& desc, po::variables_map& vm,
                      const char* positional) {
  try {
    po::positional_options_description pos;
    if (positional) pos.add(positional, 1);
    po::store(po::command_line_parser(args).options(desc).positional(pos).run(), vm);
    po::notify(vm);
  } catch (const po::error& e) {
    throw UsageError("tritsim " + command + ": " + e.what() + " (see tritsim " + command +
                     " --help)");
  }
}

}  // namespace tritsim
