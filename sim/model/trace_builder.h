// Turns a model description and a workload into the layer trace: per step
// and layer, every op in execution order with its shapes. Generates lazily,
// one record at a time, so memory does not grow with the decode length.
#pragma once

#include <memory>
#include <vector>

#include "config/model_config.h"
#include "config/workload_config.h"
#include "trace/trace_source.h"

namespace tritsim {

// REQUIRES: model and workload validated (ValidateWorkload).
std::unique_ptr<TraceSource> BuildTrace(const ModelConfig& model, const WorkloadConfig& workload);

// One mixed step (trace format version 2): the sequences of `mix` (at least
// one) share the projections as one GEMM of all their new tokens; attention
// and the KV append run per group of sequences with equal new tokens and
// context, each over its own caches. REQUIRES: model validated; every
// span's tokens >= 1 and context >= 0.
// The builder's phase of a mixed step: prefill when any sequence brings more
// than one token or starts an empty cache, else decode.
Phase PhaseOfMix(const std::vector<SequenceSpan>& mix);

std::unique_ptr<TraceSource> BuildMixedStepTrace(const ModelConfig& model, Phase phase,
                                                 const std::vector<SequenceSpan>& mix);

}  // namespace tritsim
