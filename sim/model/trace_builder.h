// Turns a model description and a workload into the layer trace: per step
// and layer, every op in execution order with its shapes. Generates lazily,
// one record at a time, so memory does not grow with the decode length.
#pragma once

#include <memory>

#include "config/model_config.h"
#include "config/workload_config.h"
#include "trace/trace_source.h"

namespace tritsim {

// REQUIRES: model and workload validated (ValidateWorkload).
std::unique_ptr<TraceSource> BuildTrace(const ModelConfig& model, const WorkloadConfig& workload);

}  // namespace tritsim
