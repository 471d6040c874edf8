// Hand-made trace ops and a planning helper shared by the tiler, unit-cost
// and sequencer tests. Invented shapes only; GEMMs come from run/vector_trace.h.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "mapping/tiler.h"
#include "mapping/work_item.h"
#include "trace/trace_op.h"

namespace tritsim::testing {

// An elementwise (vector-unit) op over `m` rows of `n` elements.
inline TraceOp Elementwise(OpKind kind, const std::string& name, int64_t m, int64_t n) {
  TraceOp op;
  op.name = name;
  op.kind = kind;
  op.m = m;
  op.n = n;
  return op;
}

// An attention op (scores, softmax or values) of `rows` query rows over
// `context` keys.
inline TraceOp Attention(OpKind kind, const std::string& name, int64_t rows, int64_t context,
                         bool causal) {
  constexpr int64_t kHeads = 8, kKvHeads = 2, kHeadDim = 64;
  TraceOp op;
  op.name = name;
  op.kind = kind;
  op.m = rows;
  op.heads = kHeads;
  op.kv_heads = kKvHeads;
  op.head_dim = kHeadDim;
  op.context = context;
  op.causal = causal;
  return op;
}

// A decode step of `batch` sequences, one token each.
inline TraceStep DecodeStep(int64_t batch = 1) {
  TraceStep step;
  step.batch = batch;
  return step;
}

// The items `tiler` cuts `op` (trace position `index`) into.
inline std::vector<WorkItem> PlanOp(Tiler& tiler, const TraceOp& op,
                                    const TraceStep& step = DecodeStep(), int64_t index = 0) {
  std::vector<WorkItem> items;
  tiler.Plan(op, step, index, items);
  return items;
}

}  // namespace tritsim::testing
