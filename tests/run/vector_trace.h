// A trace held in memory, for engine tests that need hand-made op lists.
#pragma once

#include <utility>
#include <vector>

#include "trace/trace_source.h"

namespace tritsim::testing {

class VectorTrace : public TraceSource {
 public:
  explicit VectorTrace(std::vector<TraceRecord> records) : records_(std::move(records)) {}
  const TraceHeader& header() const override { return header_; }
  bool next(TraceRecord& record) override {
    if (pos_ == records_.size()) return false;
    record = records_[pos_++];
    return true;
  }

  // A decode step of `batch` sequences at `context`, then `ops`.
  static VectorTrace OneStep(const std::vector<TraceOp>& ops, int64_t batch = 1,
                             int64_t context = 0) {
    std::vector<TraceRecord> records;
    TraceRecord step;
    step.is_step = true;
    step.step.phase = Phase::kDecode;
    step.step.batch = batch;
    step.step.context = context;
    records.push_back(step);
    for (const TraceOp& op : ops) {
      TraceRecord r;
      r.op = op;
      records.push_back(r);
    }
    return VectorTrace(std::move(records));
  }

 private:
  TraceHeader header_;
  std::vector<TraceRecord> records_;
  size_t pos_ = 0;
};

// A ternary GEMM [m x k] x [k x n] with a name of its own.
inline TraceOp Gemm(const std::string& name, int64_t m, int64_t n, int64_t k,
                    double zero_fraction = 0.31006) {
  TraceOp op;
  op.name = name;
  op.kind = OpKind::kGemm;
  op.tensor = TensorClass::kFfn;
  op.weights = WeightFormat::kTernary;
  op.m = m;
  op.n = n;
  op.k = k;
  op.zero_fraction = zero_fraction;
  return op;
}

}  // namespace tritsim::testing
