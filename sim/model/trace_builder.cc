#include "model/trace_builder.h"

#include <algorithm>
#include <utility>
#include <vector>

#include "trace/trace_format.h"

namespace tritsim {
namespace {

// Shapes of one step, fixed while its ops are emitted.
struct StepShape {
  TraceStep step;
  int64_t rows = 0;  // m of per-token ops: every new token of the step
};

// Sequences of a step that share new tokens and context: attention runs
// once per group over their own caches.
struct AttentionGroup {
  int64_t sequences = 0;  // 0: the step's batch (a uniform step)
  int64_t tokens = 1;
  int64_t context = 0;  // tokens in each cache before the step
  int64_t rows(const TraceStep& step) const {
    return (sequences ? sequences : step.batch) * tokens;
  }
  int64_t keys() const { return context + tokens; }  // attended by the last row
};

// One group for a uniform step; one per distinct (tokens, context) of a
// mixed step, in order of first appearance.
std::vector<AttentionGroup> GroupsOf(const TraceStep& step) {
  if (!step.mixed()) return {AttentionGroup{0, step.tokens, step.context}};
  std::vector<AttentionGroup> groups;
  for (const SequenceSpan& span : step.mix) {
    auto same = [&](const AttentionGroup& g) {
      return g.tokens == span.tokens && g.context == span.context;
    };
    auto it = std::find_if(groups.begin(), groups.end(), same);
    if (it == groups.end()) {
      groups.push_back(AttentionGroup{1, span.tokens, span.context});
    } else {
      ++it->sequences;
    }
  }
  return groups;
}

// The op every other op of a step starts from: phase, step, precisions.
TraceOp BaseOp(const ModelConfig& model, const StepShape& shape, const char* name, OpKind kind,
               int64_t n) {
  TraceOp op;
  op.phase = shape.step.phase;
  op.step = shape.step.step;
  op.name = name;
  op.kind = kind;
  op.m = shape.rows;
  op.n = n;
  op.act_bits = model.activation_bits;
  op.kv_bits = model.kv_bits;
  return op;
}

WeightFormat NormFormat(const ModelConfig& model) {
  return model.norm_bits == 8 ? WeightFormat::kInt8 : WeightFormat::kInt16;
}

TraceOp NormOp(const ModelConfig& model, const StepShape& shape, const char* name, int64_t rows) {
  TraceOp op = BaseOp(model, shape, name, OpKind::kNorm, model.width);
  op.m = rows;
  op.tensor = TensorClass::kNorm;
  op.weights = NormFormat(model);
  return op;
}

// A GEMM [m x k] x [k x n] reading weights of `tensor` stored as `format`.
TraceOp GemmOp(const ModelConfig& model, const StepShape& shape, const char* name,
               TensorClass tensor, WeightFormat format, int64_t k, int64_t n) {
  TraceOp op = BaseOp(model, shape, name, OpKind::kGemm, n);
  op.k = k;
  op.tensor = tensor;
  op.weights = format;
  op.zero_fraction = format == WeightFormat::kTernary ? model.weight_zero_fraction : 0.0;
  return op;
}

// An attention op of one group over its caches. Per head: scores are
// [m x head_dim] x [head_dim x keys], values are [m x keys] x [keys x head_dim].
TraceOp AttentionOp(const ModelConfig& model, const StepShape& shape, const AttentionGroup& group,
                    const char* name, OpKind kind, int64_t n, int64_t k) {
  TraceOp op = BaseOp(model, shape, name, kind, n);
  op.m = group.rows(shape.step);
  op.k = k;
  op.heads = model.heads;
  op.kv_heads = model.kv_heads;
  op.head_dim = model.head_dim;
  op.context = group.keys();
  op.causal = group.tokens > 1;
  op.sequences = group.sequences;
  return op;
}

// This step's keys and values of one group, written into its caches.
TraceOp KvAppendOp(const ModelConfig& model, const StepShape& shape, const AttentionGroup& group,
                   int64_t n) {
  TraceOp op = BaseOp(model, shape, "attn.kv_append", OpKind::kKvAppend, n);
  op.m = group.rows(shape.step);
  if (group.sequences > 0) {  // a mixed step's group: where its caches end
    op.context = group.context;
    op.sequences = group.sequences;
  }
  return op;
}

void AppendAttention(const ModelConfig& m, const StepShape& s, std::vector<TraceOp>& ops) {
  const int64_t q_width = m.heads * m.head_dim;
  const int64_t kv_width = m.kv_heads * m.head_dim;
  ops.push_back(NormOp(m, s, "attn.norm", s.rows));
  ops.push_back(BaseOp(m, s, "attn.quant", OpKind::kQuantize, m.width));
  ops.push_back(GemmOp(m, s, "attn.qkv", TensorClass::kAttention, m.attention_weights, m.width,
                       q_width + 2 * kv_width));
  ops.push_back(BaseOp(m, s, "attn.rope", OpKind::kRope, q_width + kv_width));
  const std::vector<AttentionGroup> groups = GroupsOf(s.step);
  for (const AttentionGroup& g : groups) ops.push_back(KvAppendOp(m, s, g, 2 * kv_width));
  for (const AttentionGroup& g : groups) {
    ops.push_back(AttentionOp(m, s, g, "attn.scores", OpKind::kAttnScores, g.keys(), m.head_dim));
    ops.push_back(AttentionOp(m, s, g, "attn.softmax", OpKind::kSoftmax, g.keys(), 0));
    ops.push_back(AttentionOp(m, s, g, "attn.values", OpKind::kAttnValues, m.head_dim, g.keys()));
  }
  ops.push_back(BaseOp(m, s, "attn.out_quant", OpKind::kQuantize, q_width));
  ops.push_back(
      GemmOp(m, s, "attn.out", TensorClass::kAttention, m.attention_weights, q_width, m.width));
  ops.push_back(BaseOp(m, s, "attn.residual", OpKind::kResidual, m.width));
}

void AppendFfn(const ModelConfig& m, const StepShape& s, std::vector<TraceOp>& ops) {
  const bool gated = m.ffn_kind == FfnKind::kGated;
  ops.push_back(NormOp(m, s, "ffn.norm", s.rows));
  ops.push_back(BaseOp(m, s, "ffn.quant", OpKind::kQuantize, m.width));
  ops.push_back(GemmOp(m, s, gated ? "ffn.gate_up" : "ffn.up", TensorClass::kFfn, m.ffn_weights,
                       m.width, gated ? 2 * m.ffn_width : m.ffn_width));
  ops.push_back(BaseOp(m, s, "ffn.act", OpKind::kActivation, m.ffn_width));
  ops.push_back(BaseOp(m, s, "ffn.down_quant", OpKind::kQuantize, m.ffn_width));
  ops.push_back(GemmOp(m, s, "ffn.down", TensorClass::kFfn, m.ffn_weights, m.ffn_width, m.width));
  ops.push_back(BaseOp(m, s, "ffn.residual", OpKind::kResidual, m.width));
}

// Ops after the last block. Only the last position of each sequence yields
// next-token logits, so they run on `batch` rows even in the prefill.
void AppendHead(const ModelConfig& m, const StepShape& s, std::vector<TraceOp>& ops) {
  const int64_t rows = s.step.batch;
  const WeightFormat head_format = m.tied_embeddings ? m.embedding_weights : m.head_weights;
  TraceOp quant = BaseOp(m, s, "head.quant", OpKind::kQuantize, m.width);
  TraceOp head = GemmOp(m, s, "head", TensorClass::kHead, head_format, m.width, m.vocab);
  quant.m = rows;
  head.m = rows;
  ops.push_back(NormOp(m, s, "final.norm", rows));
  ops.push_back(quant);
  ops.push_back(head);
}

// Generates the trace one record at a time. Holds the op templates of the
// current step (a few dozen ops), never the steps already emitted.
class BuiltTrace : public TraceSource {
 public:
  BuiltTrace(const ModelConfig& model, const WorkloadConfig& workload) : model_(model) {
    header_.version = kTraceVersion;
    header_.model = model.name;
    header_.workload = workload;
    total_steps_ = (workload.prefill_tokens > 0 ? 1 : 0) + workload.decode_tokens;
  }

  // One mixed step (trace version 2). The header's workload summarises it:
  // the longest prompt chunk as the prefill, or one decode step; the
  // shortest context; the sequences as the batch.
  BuiltTrace(const ModelConfig& model, Phase phase, const std::vector<SequenceSpan>& mix)
      : model_(model) {
    header_.version = kTraceVersionMixed;
    header_.model = model.name;
    mixed_.phase = phase;
    mixed_.batch = int64_t(mix.size());
    mixed_.tokens = 0;
    mixed_.context = 0;
    mixed_.mix = mix;
    WorkloadConfig& w = header_.workload;
    w.batch = mixed_.batch;
    w.context_tokens = mix.front().context;
    int64_t longest = 0;
    for (const SequenceSpan& span : mix) {
      longest = std::max(longest, span.tokens);
      w.context_tokens = std::min(w.context_tokens, span.context);
    }
    w.prefill_tokens = phase == Phase::kPrefill ? longest : 0;
    w.decode_tokens = phase == Phase::kDecode ? 1 : 0;
    total_steps_ = 1;
  }

  const TraceHeader& header() const override { return header_; }

  bool next(TraceRecord& record) override {
    if (op_index_ >= ops_in_step_) {
      if (step_index_ >= total_steps_) return false;
      StartStep(step_index_++);
      record.is_step = true;
      record.step = shape_.step;
      return true;
    }
    record.is_step = false;
    record.op = CurrentOp();
    ++op_index_;
    return true;
  }

 private:
  // Steps are numbered 0.. across the run; the prefill, if any, is number 0.
  TraceStep StepAt(int64_t index) const {
    if (mixed_.mixed()) return mixed_;
    const WorkloadConfig& w = header_.workload;
    const bool has_prefill = w.prefill_tokens > 0;
    TraceStep step;
    step.batch = w.batch;
    if (has_prefill && index == 0) {
      step.phase = Phase::kPrefill;
      step.step = 0;
      step.tokens = w.prefill_tokens;
      step.context = w.context_tokens;
      return step;
    }
    const int64_t decode_index = has_prefill ? index - 1 : index;
    step.phase = Phase::kDecode;
    step.step = decode_index;
    step.tokens = 1;
    step.context = w.context_tokens + w.prefill_tokens + decode_index;
    return step;
  }

  void StartStep(int64_t index) {
    shape_.step = StepAt(index);
    shape_.rows = shape_.step.new_tokens();
    prologue_.clear();
    block_.clear();
    epilogue_.clear();
    TraceOp embed = BaseOp(model_, shape_, "embed", OpKind::kEmbed, model_.width);
    embed.tensor = TensorClass::kEmbedding;
    embed.weights = model_.embedding_weights;
    prologue_.push_back(embed);
    AppendAttention(model_, shape_, block_);
    AppendFfn(model_, shape_, block_);
    AppendHead(model_, shape_, epilogue_);
    op_index_ = 0;
    ops_in_step_ = int64_t(prologue_.size()) + model_.layers * int64_t(block_.size()) +
                   int64_t(epilogue_.size());
  }

  // The op at op_index_ of the current step: prologue, blocks, epilogue.
  TraceOp CurrentOp() const {
    const int64_t pro = int64_t(prologue_.size());
    const int64_t per_block = int64_t(block_.size());
    const int64_t blocks_end = pro + model_.layers * per_block;
    if (op_index_ < pro) return prologue_[size_t(op_index_)];
    if (op_index_ >= blocks_end) return epilogue_[size_t(op_index_ - blocks_end)];
    const int64_t in_blocks = op_index_ - pro;
    TraceOp op = block_[size_t(in_blocks % per_block)];
    op.layer = in_blocks / per_block;
    return op;
  }

  ModelConfig model_;
  TraceHeader header_;
  int64_t total_steps_ = 0;
  int64_t step_index_ = 0;   // next step to start
  int64_t op_index_ = 0;     // next op within the current step
  int64_t ops_in_step_ = 0;  // 0 before the first step
  TraceStep mixed_;          // the one step of a mixed trace; mix empty otherwise
  StepShape shape_;
  std::vector<TraceOp> prologue_;  // embed
  std::vector<TraceOp> block_;     // one decoder block, layer field unset
  std::vector<TraceOp> epilogue_;  // final norm and head
};

}  // namespace

std::unique_ptr<TraceSource> BuildTrace(const ModelConfig& model, const WorkloadConfig& workload) {
  return std::make_unique<BuiltTrace>(model, workload);
}

Phase PhaseOfMix(const std::vector<SequenceSpan>& mix) {
  for (const SequenceSpan& s : mix) {
    if (s.tokens > 1 || s.context == 0) return Phase::kPrefill;
  }
  return Phase::kDecode;
}

std::unique_ptr<TraceSource> BuildMixedStepTrace(const ModelConfig& model, Phase phase,
                                                 const std::vector<SequenceSpan>& mix) {
  return std::make_unique<BuiltTrace>(model, phase, mix);
}

}  // namespace tritsim
