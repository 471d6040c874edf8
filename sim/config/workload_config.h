// What the model is asked to do: a prefill and/or a decode run.
#pragma once

#include <cstdint>

namespace tritsim {

struct WorkloadConfig {
  int64_t prefill_tokens = 0;  // P: prompt tokens processed in one prefill step, >= 0
  int64_t decode_tokens = 1;   // S: generated tokens, one decode step each, >= 0
  int64_t context_tokens = 0;  // C: tokens already in the KV cache before the prefill
  int64_t batch = 1;           // B: independent sequences processed together, >= 1
};

}  // namespace tritsim
