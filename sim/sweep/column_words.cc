// Words with units for sweep CSV columns. See column_words.h.
#include "sweep/column_words.h"

#include <map>

namespace tritsim {

std::string ColumnWords(const std::string& column) {
  static const std::map<std::string, std::string> kWords = {
      // Metric columns (sweep_csv.h MetricColumns, docs/sweeps.md).
      {"tokens_per_second", "throughput, whole run (tokens per second)"},
      {"time_to_first_token_seconds", "time to first token (seconds)"},
      {"time_per_output_token_seconds", "time per output token (seconds)"},
      {"joules_per_token", "energy per generated token (joules)"},
      {"picojoules_per_op", "energy per op (picojoules)"},
      {"area_mm2", "area (mm\u00b2)"},
      {"memory_bound_share", "memory-bound share of op cycles (fraction)"},
      {"dram_bandwidth_utilization", "DRAM bandwidth used (fraction of peak)"},
      {"busy_share", "tree array busy (fraction of cycles)"},
      {"dram_wait_share", "waiting for DRAM (fraction of cycles)"},
      {"sram_conflict_share", "scratchpad conflicts (fraction of cycles)"},
      {"vector_wait_share", "waiting for the vector unit (fraction of cycles)"},
      {"idle_share", "idle (fraction of cycles)"},
      {"cycles", "run time (core cycles)"},
      {"prefill_tokens_per_second", "prefill throughput (tokens per second)"},
      {"decode_tokens_per_second", "decode throughput (tokens per second)"},
      {"decode_joules_per_token", "decode energy per token (joules)"},
      {"watts", "average power (watts)"},
      // Axis keys of the example sweeps and the usual design knobs.
      {"arch.array.trees", "adder trees (count)"},
      {"arch.array.fan_in", "adder tree fan-in (inputs)"},
      {"arch.array.kind", "array kind"},
      {"arch.sram.capacity_kib", "scratchpad capacity (KiB)"},
      {"arch.sram.banks", "scratchpad banks (count)"},
      {"arch.sram.ports", "scratchpad ports per bank (count)"},
      {"arch.dram.preset", "DRAM preset"},
      {"arch.dram.channels", "DRAM channels (count)"},
      {"arch.packing.format", "trit packing format"},
      {"arch.packing.decoder_bytes_per_cycle", "trit decoder rate (bytes per cycle)"},
      {"arch.clock.core_mhz", "core clock (MHz)"},
      {"arch.vector.lanes", "vector lanes (count)"},
      {"arch.dma.max_outstanding", "DMA requests in flight (count)"},
      {"workload.batch", "batch (sequences)"},
      {"workload.prefill", "prompt length (tokens)"},
      {"workload.decode", "generated tokens per sequence"},
      {"workload.context", "context before the run (tokens)"},
      {"model.layers", "model layers (count)"},
  };
  auto it = kWords.find(column);
  if (it != kWords.end()) return it->second;
  // "arch.vector.lanes" -> "vector lanes (arch.vector.lanes)".
  std::string words = column;
  for (const char* prefix : {"arch.", "model.", "workload."}) {
    if (words.rfind(prefix, 0) == 0) words = words.substr(std::string(prefix).size());
  }
  for (char& c : words) {
    if (c == '_' || c == '.') c = ' ';
  }
  return words == column ? words : words + " (" + column + ")";
}

}  // namespace tritsim
