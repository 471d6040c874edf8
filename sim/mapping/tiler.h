// Maps trace ops onto the hardware: cuts each op into tiles that fit the
// scratchpad, decides what stays on chip and what spills to DRAM, and lays
// the tensors out in DRAM. Each tile says what it computes (TileWork); the
// unit that runs it decides the cycles and events. Plain C++; the sequencer
// module drives it.
//
// Scratchpad split (a fixed policy, documented in docs/engine.md): half the
// capacity holds the live activations of the current op; the other half is
// two equal slots, so the DMA fills one slot while a unit drains the other
// (double buffering).
#pragma once

#include <cstdint>
#include <map>
#include <string>
#include <tuple>
#include <vector>

#include "config/arch_config.h"
#include "mapping/sim_options.h"
#include "mapping/work_item.h"
#include "trace/trace_op.h"

namespace tritsim {

// Derived hardware rates every unit agrees on.
struct HardwareRates {
  uint64_t core_period_ps = 1000;   // core clock period, rounded to 1 ps
  uint64_t slot_bytes = 0;          // one double-buffer slot
  uint64_t activation_bytes = 0;    // activation region
  double array_ops_per_cycle = 0;   // 2 T F (one add per weight use counts as 2 ops)
  double vector_ops_per_cycle = 0;  // 2 L
  double dram_bytes_per_cycle = 0;  // peak DRAM bandwidth per core cycle
};

HardwareRates ComputeRates(const ArchConfig& arch);

class Tiler {
 public:
  Tiler(const ArchConfig& arch, const SimOptions& options);

  // Appends the items of `op` (trace position `op_index`) to `out`, the
  // first marked first_of_op and the last last_of_op (an op always yields at
  // least one item). Throws SimError (exit 4) when even the smallest tile
  // does not fit, naming the op, the bytes needed and the capacity.
  void Plan(const TraceOp& op, const TraceStep& step, int64_t op_index, std::vector<WorkItem>& out);

  // Arithmetic ops of an op (2 per multiply-equivalent plus add, common
  // practice; 1 per elementwise or special-function result).
  static uint64_t OpOps(const TraceOp& op, const TraceStep& step);

  // Which unit runs `op` on this design.
  Unit UnitFor(const TraceOp& op) const;

  const HardwareRates& rates() const { return rates_; }

 private:
  struct ActivationPlan {
    uint64_t rows_per_tile = 0;
    bool input_from_dram = false;
    bool output_to_dram = false;
  };
  ActivationPlan PlanActivations(const TraceOp& op, uint64_t in_bytes_per_row,
                                 uint64_t out_bytes_per_row);
  void PlanGemm(const TraceOp& op, int64_t op_index, std::vector<WorkItem>& out);
  void PlanAttention(const TraceOp& op, const TraceStep& step, int64_t op_index,
                     std::vector<WorkItem>& out);
  void PlanElementwise(const TraceOp& op, const TraceStep& step, int64_t op_index,
                       std::vector<WorkItem>& out);
  static uint64_t ElementwiseCount(const TraceOp& op, const TraceStep& step);
  void PlanElementwiseTransfers(const TraceOp& op, const TraceStep& step, WorkItem& item);
  void CheckTileFits(const TraceOp& op, uint64_t needed_bytes, uint64_t capacity_bytes,
                     const char* what) const;
  uint64_t WeightAddress(const TraceOp& op, uint64_t bytes);
  uint64_t KvAddress(const TraceOp& op) const;

  ArchConfig arch_;
  SimOptions options_;
  HardwareRates rates_;
  bool activations_in_dram_ = false;  // the previous op's output was spilled
  // DRAM layout: weight tensors packed one after another from 0; KV cache
  // and activation spill areas above them.
  std::map<std::tuple<int64_t, std::string>, uint64_t> weight_base_;
  uint64_t next_weight_address_ = 0;
};

}  // namespace tritsim
