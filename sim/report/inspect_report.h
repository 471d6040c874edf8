// `tritsim inspect`: what a model and a design point imply before any
// simulation (parameters, storage, KV bytes, ops, peak rates, ridge point).
#pragma once

#include <ostream>

#include <nlohmann/json_fwd.hpp>

#include "config/arch_config.h"
#include "config/model_config.h"
#include "config/workload_config.h"

namespace tritsim {

inline constexpr const char* kInspectSchema = "tritsim.inspect/1";

struct InspectInputs {
  const ModelConfig& model;
  const ArchConfig& arch;
  const WorkloadConfig& workload;
};

nlohmann::ordered_json InspectJson(const InspectInputs& in);
void PrintInspect(const InspectInputs& in, std::ostream& out);

// Bytes of all the model's weights as stored on this design (the "weight
// bytes" of `tritsim inspect`): ternary tensors under the packing on a
// ternary array, every tensor at its native width on a MAC baseline.
double WeightBytesOnArch(const ModelConfig& model, const ArchConfig& arch);

// Peak array ops/s of a design: 2 ops per weight use, T x F uses per cycle.
double PeakOpsPerSecond(const ArchConfig& arch);

}  // namespace tritsim
