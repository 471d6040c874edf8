// The unit of work the sequencer hands to the hardware: one tile.
//
// The tiler cuts every trace op into a sequence of these; the sequencer's
// issue thread loads each item's operands through the DMA engine into a
// scratchpad slot, and its compute thread runs the item on the tree array or
// the vector unit, then posts the item's stores. Plain data, no SystemC.
#pragma once

#include <cstdint>

#include "results/run_result.h"

namespace tritsim {

enum class Unit { kTreeArray, kVectorUnit };

// What a load brings in, for address assignment and statistics.
enum class LoadKind { kNone, kWeights, kActivations, kKvCache };

struct WorkItem {
  int64_t op_index = 0;  // position of the op in the trace
  bool first_of_op = false;
  bool last_of_op = false;
  Unit unit = Unit::kTreeArray;

  // Operands from DRAM into the scratchpad slot before compute may start.
  LoadKind load_kind = LoadKind::kNone;
  uint64_t load_address = 0;
  uint64_t load_bytes = 0;
  // The load reads data the previous op stored to DRAM: it may not start
  // until every store of earlier ops has completed.
  bool load_after_stores = false;

  // Results from the scratchpad back to DRAM after compute.
  uint64_t store_address = 0;
  uint64_t store_bytes = 0;

  // Compute on `unit`, in core cycles, excluding scratchpad conflicts.
  uint64_t compute_cycles = 0;
  // Scratchpad bank accesses the unit makes while computing (for conflicts).
  uint64_t sram_read_accesses = 0;

  // Arithmetic and decoder events this item causes in its unit (the
  // scratchpad and DRAM fields stay zero: the sequencer derives those from
  // the item's accesses and transfers).
  EventCounts events;
};

}  // namespace tritsim
