// Command-line parsing shared by every subcommand: strict option matching
// (no prefixes), "did you mean" for unknown options, integer options that
// say what they expect, the input files, --set overrides and the workload.
// Boost.Program_options stays inside the .cc files of sim/cli.
#pragma once

#include <cstddef>
#include <cstdint>
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

// Adds --NAME N bound to `field` (left untouched when absent). The value
// must be decimal digits (a leading '-' only when min < 0) and at least
// `min`; anything else is refused as "--NAME: expected a non-negative
// integer, got '4k'" (UsageError, exit 2).
void AddIntegerOption(boost::program_options::options_description& desc, const char* name,
                      int64_t min, int64_t& field, const char* help);
void AddIntegerOption(boost::program_options::options_description& desc, const char* name,
                      int64_t min, int& field, const char* help);
void AddIntegerOption(boost::program_options::options_description& desc, const char* name,
                      int64_t min, size_t& field, const char* help);

// "KEY=VALUE" with blanks around KEY and VALUE trimmed, split into the file
// kind's override ("arch." or "model." removed). Throws UsageError naming
// the --set text when there is no '=', KEY or VALUE is empty, or KEY has
// another prefix.
void SplitOverrides(const std::vector<std::string>& raw, ConfigOverrides& arch,
                    ConfigOverrides& model);

// Loads (or takes the embedded default) and applies the --set overrides.
ModelConfig LoadModel(const InputOptions& inputs);
ArchConfig LoadArch(const InputOptions& inputs);

// Parses argv with `desc`. `positional`, when given, names the option that
// takes up to `max_positional` positional arguments (-1: any number).
// Prefixes of option names are not accepted. Throws UsageError
// "COMMAND: unrecognised option '--x'; did you mean '--y'? (see tritsim
// COMMAND --help)" on any parse error.
void ParseCommandLine(const std::string& command, const std::vector<std::string>& args,
                      const boost::program_options::options_description& desc,
                      boost::program_options::variables_map& vm, const char* positional = nullptr,
                      int max_positional = 1);

// True when `args` holds --help or -h (anywhere: help wins over errors).
bool WantsHelp(const std::vector<std::string>& args);
// Prints "USAGE\n\nOPTIONS\n" to stdout.
void PrintHelp(const std::string& usage, const boost::program_options::options_description& desc);

// The command line as recorded in provenance.command: "tritsim", the
// subcommand, then `args` as given.
std::vector<std::string> RecordedCommand(const std::string& command,
                                         const std::vector<std::string>& args);

// The path of the running tritsim binary (/proc/self/exe), for the
// processes sweeps and studies start.
std::string SelfPath();

}  // namespace tritsim
