// The only code that reads YAML: converts model and architecture files into
// the plain config structs, strictly.
//
// Unknown keys are errors that suggest the nearest known key; wrong types,
// out-of-range values and inconsistent combinations are errors naming the
// file, line, key path, value and what is allowed. Nothing is clamped.
// File failures throw tritsim::Error with ExitCode::kBadInput (exit 3);
// workload failures (command-line flags) with ExitCode::kUsage (exit 2).
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "config/arch_config.h"
#include "config/model_config.h"
#include "config/workload_config.h"

namespace tritsim {

// One command-line or sweep override: a dotted key path inside the file
// (e.g. "array.trees", "dram.timing.tRCD") and its value as YAML text.
struct ConfigOverride {
  std::string key;
  std::string value;
};
using ConfigOverrides = std::vector<ConfigOverride>;

// Loads a file. Overrides are applied to the parsed document before
// validation, so they are checked exactly like keys in the file; an override
// naming a key that does not exist is an error with a suggestion.
ModelConfig LoadModelFile(const std::string& path, const ConfigOverrides& overrides = {});
ArchConfig LoadArchFile(const std::string& path, const ConfigOverrides& overrides = {});

// Same, from text; `source_name` stands in for the file name in messages.
ModelConfig LoadModelText(const std::string& text, const std::string& source_name,
                          const ConfigOverrides& overrides = {});
ArchConfig LoadArchText(const std::string& text, const std::string& source_name,
                        const ConfigOverrides& overrides = {});

// The embedded defaults (config/embedded_defaults.h), with overrides.
ModelConfig DefaultModel(const ConfigOverrides& overrides = {});
ArchConfig DefaultArch(const ConfigOverrides& overrides = {});

// Checks a workload against a model (ranges, and that counters cannot
// overflow). Messages name the command-line flag (e.g. "--decode").
void ValidateWorkload(const WorkloadConfig& workload, const ModelConfig& model);

// The DRAM preset's fields (organisation, timing, ideal parameters) written
// into `dram`. Throws for an unknown preset name, listing the allowed ones.
void ApplyDramPreset(const std::string& preset, DramConfig& dram);

}  // namespace tritsim
