// The provenance and resolved sections of the run and inspect JSON: what
// built the binary, the command line as given, and every field of the model,
// architecture and workload after presets and --set overrides.
//
// The resolved sections use the key names of the model and architecture
// YAML files (docs/config-reference.md), so `tritsim run --from-report`
// feeds them back through the strict loader (JSON is YAML 1.2) and the
// validation stays in one place. One function per config struct.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "config/arch_config.h"
#include "config/model_config.h"
#include "config/workload_config.h"

namespace tritsim {

// The YAML spelling of an array kind: "ternary", "int8_mac" or "fp16_mac".
const char* ArrayKindName(ArrayKind kind);

// {"version", "commit", "command"}: `command` is the argv as given, with
// argv[0] recorded as "tritsim" (no install path). No wall clock, so the
// output stays byte-deterministic.
nlohmann::ordered_json ProvenanceJson(const std::vector<std::string>& command);

// Every field of the struct, keyed as in the YAML files. energy.dram_pj_per_bit
// is absent when negative (the preset's value applies).
nlohmann::ordered_json ResolvedModelJson(const ModelConfig& model);
nlohmann::ordered_json ResolvedArchJson(const ArchConfig& arch);
// {"prefill", "decode", "context", "batch"}: the sweep file's workload keys.
nlohmann::ordered_json ResolvedWorkloadJson(const WorkloadConfig& workload);

// Everything a run is computed from: the resolved structs, or the trace it
// replays (then `model` is empty and `trace` is the --trace path as given).
struct ResolvedRun {
  ArchConfig arch;
  std::optional<ModelConfig> model;
  WorkloadConfig workload;
  std::string trace;
  bool weights_resident = false;
};

// The resolved section of a run: {"model", "arch", "workload", "trace",
// "weights_resident"} (model and trace are null when not used).
nlohmann::ordered_json ResolvedRunJson(const ResolvedRun& run);

// The run JSON at `path`, parsed; throws tritsim::Error (kBadInput) naming
// the file when it cannot be read, is not JSON or not schema tritsim.run/1.
nlohmann::json ReadRunJsonFile(const std::string& path);

// Reads the resolved section of the run JSON at `path` (schema
// tritsim.run/1) back, the model and architecture through the strict
// loader (messages name "PATH resolved.arch" as the source). Throws
// tritsim::Error (kBadInput) naming the file and key when it is not a run
// JSON or a section is missing or wrong; the workload is checked by the run.
ResolvedRun LoadResolvedRun(const std::string& path);

// `doc` with "provenance" right after "schema" and "resolved" at the end.
nlohmann::ordered_json WithOrigin(const nlohmann::ordered_json& doc,
                                  const nlohmann::ordered_json& provenance,
                                  const nlohmann::ordered_json& resolved);

}  // namespace tritsim
