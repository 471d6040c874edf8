// Options shared by the subcommands that take a model: input files, config
// overrides and the workload. Boost.Program_options stays inside the .cc.
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "config/arch_config.h"
#include "config/config_loader.h"
#include "config/model_config.h"
#include "config/workload_config.h"

namespace boost {
namespace program_options {
class options_description;
class variables_map;
}  // namespace program_options
}  // namespace boost

namespace tritsim {

struct InputOptions {
  std::string model_path;              // empty: the embedded default model
  std::string arch_path;               // empty: the embedded default design point
  std::vector<std::string> overrides;  // --set arch.KEY=VALUE / model.KEY=VALUE
  WorkloadConfig workload;
  bool workload_given = false;  // any workload flag on the command line
};

// Adds --model, --arch, --set and the workload flags (--prefill, --decode,
// --context, --batch) bound to `inputs`.
void AddInputOptions(boost::program_options::options_description& desc, InputOptions& inputs,
                     bool with_arch);
// Call after notify(): records which workload flags were given.
void FinishInputOptions(const boost::program_options::variables_map& vm, InputOptions& inputs);

// Loads (or takes the embedded default) and applies the --set overrides.
ModelConfig LoadModel(const InputOptions& inputs);
ArchConfig LoadArch(const InputOptions& inputs);

// Parses argv with `desc` (no positionals unless `positional` names one).
// Throws UsageError with the command name on any parse error.
void ParseCommandLine(const std::string& command, const std::vector<std::string>& args,
                      const boost::program_options::options_description& desc,
                      boost::program_options::variables_map& vm, const char* positional = nullptr);

}  // namespace tritsim
