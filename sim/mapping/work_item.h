// The unit of work the sequencer hands to the hardware: one tile.
//
// The tiler cuts every trace op into a sequence of these; the sequencer's
// issue thread loads each item's operands through the DMA engine into a
// scratchpad slot, and its compute thread runs the item on the tree array or
// the vector unit, then posts the item's stores. Plain data, no SystemC.
#pragma once

#include <cstdint>

#include "trace/trace_op.h"

namespace tritsim {

enum class Unit { kTreeArray, kVectorUnit };

// What a load brings in, for address assignment and statistics.
enum class LoadKind { kNone, kWeights, kActivations, kKvCache };

// The computation of one tile, as the tiler cut it. Plain shape data: which
// cycles and events it costs is the business of the unit that runs it.
struct TileWork {
  bool computes = false;        // false: a load-only item (no compute at all)
  OpKind kind = OpKind::kGemm;  // the op the tile belongs to
  // GEMM tiles: `rows` activation rows of length `k` against a k x n weight tile.
  uint64_t rows = 0;
  uint64_t k = 0;
  uint64_t n = 0;
  double weight_bits = 0.0;   // stored bits per weight (1.6 for base-3 trits)
  uint64_t weight_bytes = 0;  // packed bytes of the weight tile
  bool ternary_weights = false;
  double zero_fraction = 0.0;  // share of zero trits (energy of gated adders)
  uint64_t act_bytes = 1;      // bytes per activation
  // Vector tiles: elements (elementwise ops), scores (softmax) or products
  // (attention) of this tile, and the operand bytes it reads once.
  uint64_t elements = 0;
  uint64_t read_bytes = 0;
  bool drain = false;  // the op's last compute tile: add the unit's pipeline latency
};

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

  // What the tile asks of `unit`; the unit's cost model turns it into
  // cycles and energy events (TreeArray::Cost, VectorUnit::Cost).
  TileWork work;
};

}  // namespace tritsim
