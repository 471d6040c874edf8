#include "hw/trit_decoder.h"

#include "common/int_math.h"

namespace tritsim {

uint64_t TritDecoder::CyclesFor(uint64_t packed_bytes) const {
  return CeilDiv(packed_bytes, uint64_t(config_.decoder_bytes_per_cycle));
}

}  // namespace tritsim
