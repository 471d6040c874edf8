// Trit decoder: expands base-3 packed weights (5 trits per byte, 3^5 = 243
// <= 256, docs/references.md) into the 2-bit selects the adder trees take,
// at packing.decoder_bytes_per_cycle packed bytes per core cycle. With 2-bit
// packing the trits need no decoding and the decoder is bypassed. Plain C++:
// the tree array asks it how long a weight pass takes to expand.
#pragma once

#include <cstdint>

#include "config/arch_config.h"

namespace tritsim {

class TritDecoder {
 public:
  explicit TritDecoder(const PackingConfig& config) : config_(config) {}

  // Whether weights of this kind pass through the decoder (base-3 trits only).
  bool Expands(bool ternary_weights) const {
    return ternary_weights && config_.format == TritPacking::kBase3;
  }
  // Core cycles to expand `packed_bytes`. REQUIRES: Expands(...) is true.
  uint64_t CyclesFor(uint64_t packed_bytes) const;

 private:
  PackingConfig config_;
};

}  // namespace tritsim
