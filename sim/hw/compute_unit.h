// What the sequencer's compute thread sees of a compute unit: run one work
// item to completion, blocking the calling SC_THREAD for its cycles (the
// timing style of TLM-2.0 blocking transport).
#pragma once

#include <cstdint>

#include <systemc>

#include "engine/work_item.h"

namespace tritsim {

class ComputeUnitIf : public virtual sc_core::sc_interface {
 public:
  // REQUIRES: called from an SC_THREAD at a core-clock edge, with the item's
  // operands in the scratchpad. Returns the cycles lost to scratchpad bank
  // conflicts (already included in the time waited).
  virtual uint64_t Execute(const WorkItem& item) = 0;
};

}  // namespace tritsim
