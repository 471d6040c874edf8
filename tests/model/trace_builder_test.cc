#include "model/trace_builder.h"

#include <gtest/gtest.h>

#include <map>
#include <string>
#include <vector>

#include "model/model_stats.h"

namespace tritsim {
namespace {

// Ops of a decoder block in trace order (docs/trace-format.md).
const std::vector<std::string> kGatedBlock = {
    "attn.norm",      "attn.quant",   "attn.qkv",    "attn.rope",      "attn.kv_append",
    "attn.scores",    "attn.softmax", "attn.values", "attn.out_quant", "attn.out",
    "attn.residual",  "ffn.norm",     "ffn.quant",   "ffn.gate_up",    "ffn.act",
    "ffn.down_quant", "ffn.down",     "ffn.residual"};

// A small grouped-query model: 8 query heads share 2 KV heads.
ModelConfig SmallModel() {
  ModelConfig m;
  m.name = "finch-test";
  m.layers = 3;
  m.width = 256;
  m.heads = 8;
  m.kv_heads = 2;
  m.head_dim = 32;
  m.ffn_width = 704;
  m.vocab = 1000;
  return m;
}

WorkloadConfig Workload(int64_t prefill, int64_t decode, int64_t context, int64_t batch) {
  WorkloadConfig w;
  w.prefill_tokens = prefill;
  w.decode_tokens = decode;
  w.context_tokens = context;
  w.batch = batch;
  return w;
}

// A built trace, drained: steps, and the ops of each step.
struct Drained {
  std::vector<TraceStep> steps;
  std::vector<std::vector<TraceOp>> ops;  // ops[i] belong to steps[i]
};

Drained Drain(const ModelConfig& m, const WorkloadConfig& w) {
  auto source = BuildTrace(m, w);
  Drained d;
  TraceRecord r;
  while (source->next(r)) {
    if (r.is_step) {
      d.steps.push_back(r.step);
      d.ops.emplace_back();
    } else {
      EXPECT_FALSE(d.steps.empty()) << "op before any step: " << r.op.name;
      if (!d.steps.empty()) d.ops.back().push_back(r.op);
    }
  }
  return d;
}

const TraceOp& Find(const std::vector<TraceOp>& ops, const std::string& name, int64_t layer) {
  for (const TraceOp& op : ops) {
    if (op.name == name && op.layer == layer) return op;
  }
  ADD_FAILURE() << "no op " << name << " in layer " << layer;
  static const TraceOp none;
  return none;
}

TEST(TraceBuilder, HeaderNamesModelAndWorkload) {
  auto source = BuildTrace(SmallModel(), Workload(7, 2, 5, 3));
  EXPECT_EQ(source->header().version, 1);
  EXPECT_EQ(source->header().model, "finch-test");
  EXPECT_EQ(source->header().workload.prefill_tokens, 7);
  EXPECT_EQ(source->header().workload.batch, 3);
}

TEST(TraceBuilder, EveryBlockHasTheDocumentedOpsInOrder) {
  const ModelConfig m = SmallModel();
  const Drained d = Drain(m, Workload(0, 1, 0, 1));
  ASSERT_EQ(d.steps.size(), 1u);
  const std::vector<TraceOp>& ops = d.ops[0];
  ASSERT_EQ(ops.size(), 1 + kGatedBlock.size() * size_t(m.layers) + 3);
  EXPECT_EQ(ops.front().name, "embed");
  for (int64_t l = 0; l < m.layers; ++l) {
    for (size_t i = 0; i < kGatedBlock.size(); ++i) {
      const TraceOp& op = ops[1 + size_t(l) * kGatedBlock.size() + i];
      EXPECT_EQ(op.name, kGatedBlock[i]);
      EXPECT_EQ(op.layer, l);
    }
  }
  EXPECT_EQ(ops[ops.size() - 3].name, "final.norm");
  EXPECT_EQ(ops[ops.size() - 2].name, "head.quant");
  EXPECT_EQ(ops.back().name, "head");
  EXPECT_EQ(ops.back().layer, -1);
}

TEST(TraceBuilder, FusedQkvWidthFollowsGroupedQueryHeads) {
  const ModelConfig m = SmallModel();
  const Drained d = Drain(m, Workload(0, 1, 0, 4));
  const TraceOp& qkv = Find(d.ops[0], "attn.qkv", 1);
  EXPECT_EQ(qkv.kind, OpKind::kGemm);
  EXPECT_EQ(qkv.m, 4);                 // batch x 1 token
  EXPECT_EQ(qkv.k, 256);               // width
  EXPECT_EQ(qkv.n, (8 + 2 * 2) * 32);  // q heads plus k and v of the KV heads
  EXPECT_EQ(Find(d.ops[0], "attn.rope", 1).n, (8 + 2) * 32);
  EXPECT_EQ(Find(d.ops[0], "attn.kv_append", 1).n, 2 * 2 * 32);
  const TraceOp& out = Find(d.ops[0], "attn.out", 1);
  EXPECT_EQ(out.k, 8 * 32);
  EXPECT_EQ(out.n, 256);
}

TEST(TraceBuilder, DecodeStepsGrowTheContextByOne) {
  const Drained d = Drain(SmallModel(), Workload(16, 5, 100, 2));
  ASSERT_EQ(d.steps.size(), 6u);
  EXPECT_EQ(d.steps[0].phase, Phase::kPrefill);
  EXPECT_EQ(d.steps[0].tokens, 16);
  EXPECT_EQ(d.steps[0].context, 100);
  for (int64_t s = 0; s < 5; ++s) {
    const TraceStep& step = d.steps[size_t(s) + 1];
    EXPECT_EQ(step.phase, Phase::kDecode);
    EXPECT_EQ(step.step, s);
    EXPECT_EQ(step.tokens, 1);
    EXPECT_EQ(step.context, 100 + 16 + s);
    const TraceOp& scores = Find(d.ops[size_t(s) + 1], "attn.scores", 0);
    EXPECT_EQ(scores.context, 100 + 16 + s + 1);  // the new token attends to itself too
    EXPECT_FALSE(scores.causal);
    EXPECT_EQ(scores.phase, Phase::kDecode);
    EXPECT_EQ(scores.step, s);
  }
}

TEST(TraceBuilder, PrefillIsCausalOverAllPromptRows) {
  const ModelConfig m = SmallModel();
  const Drained d = Drain(m, Workload(16, 0, 100, 2));
  ASSERT_EQ(d.steps.size(), 1u);
  const TraceOp& scores = Find(d.ops[0], "attn.scores", 2);
  EXPECT_TRUE(scores.causal);
  EXPECT_EQ(scores.m, 2 * 16);
  EXPECT_EQ(scores.context, 116);
  EXPECT_EQ(scores.heads, 8);
  EXPECT_EQ(scores.kv_heads, 2);
  EXPECT_EQ(scores.head_dim, 32);
  EXPECT_EQ(Find(d.ops[0], "ffn.down", 2).m, 32);
  // Only the last position of each sequence needs logits.
  EXPECT_EQ(Find(d.ops[0], "head", -1).m, 2);
}

TEST(TraceBuilder, TiedHeadReadsEmbeddingMatrix) {
  ModelConfig m = SmallModel();
  m.tied_embeddings = true;
  m.embedding_weights = WeightFormat::kInt16;
  m.head_weights = WeightFormat::kInt8;
  const Drained d = Drain(m, Workload(0, 1, 0, 1));
  const TraceOp& head = Find(d.ops[0], "head", -1);
  EXPECT_EQ(head.tensor, TensorClass::kHead);
  EXPECT_EQ(head.weights, WeightFormat::kInt16);
  EXPECT_EQ(head.n, 1000);
  EXPECT_EQ(head.zero_fraction, 0.0);
}

TEST(TraceBuilder, PlainFfnHasSeparateUpProjection) {
  ModelConfig m = SmallModel();
  m.ffn_kind = FfnKind::kPlain;
  const Drained plain = Drain(m, Workload(0, 1, 0, 1));
  EXPECT_EQ(Find(plain.ops[0], "ffn.up", 0).n, 704);
  for (const TraceOp& op : plain.ops[0]) EXPECT_NE(op.name, "ffn.gate_up");
  const Drained gated = Drain(SmallModel(), Workload(0, 1, 0, 1));
  EXPECT_EQ(Find(gated.ops[0], "ffn.gate_up", 0).n, 2 * 704);
}

TEST(TraceBuilder, OpsCarryModelPrecisions) {
  ModelConfig m = SmallModel();
  m.activation_bits = 16;
  m.kv_bits = 16;
  m.weight_zero_fraction = 0.25;
  m.head_weights = WeightFormat::kInt8;
  const Drained d = Drain(m, Workload(0, 1, 0, 1));
  for (const TraceOp& op : d.ops[0]) {
    EXPECT_EQ(op.act_bits, 16) << op.name;
    EXPECT_EQ(op.kv_bits, 16) << op.name;
    const bool ternary_gemm = op.kind == OpKind::kGemm && op.weights == WeightFormat::kTernary;
    EXPECT_EQ(op.zero_fraction, ternary_gemm ? 0.25 : 0.0) << op.name;
  }
}

TEST(TraceBuilder, GemmWeightsAddUpToModelParameters) {
  // Cross-check with ComputeModelStats: one step reads every projection and
  // head weight exactly once (k x n per GEMM).
  ModelConfig m = SmallModel();
  std::map<TensorClass, double> weights;
  const Drained d = Drain(m, Workload(0, 1, 0, 1));
  for (const TraceOp& op : d.ops[0]) {
    if (op.kind == OpKind::kGemm) weights[op.tensor] += double(op.k) * double(op.n);
  }
  const ModelStats s = ComputeModelStats(m);
  EXPECT_DOUBLE_EQ(weights[TensorClass::kAttention], s.parameters.attention);
  EXPECT_DOUBLE_EQ(weights[TensorClass::kFfn], s.parameters.ffn);
  EXPECT_DOUBLE_EQ(weights[TensorClass::kHead], s.parameters.head);
}

TEST(TraceBuilder, DecodeWorkMatchesModelStatsOpsPerToken) {
  // Cross-check with ComputeModelStats: at batch 1, the GEMMs of a decode
  // step do 2 m k n ops (one multiply-equivalent plus add per weight use,
  // common practice), and q.k plus p.v add 2 x 2 x heads x head_dim per key.
  const ModelConfig m = SmallModel();
  const int64_t context = 37;
  const Drained d = Drain(m, Workload(0, 1, context, 1));
  double gemm_ops = 0.0, attention_ops = 0.0;
  for (const TraceOp& op : d.ops[0]) {
    if (op.kind == OpKind::kGemm) gemm_ops += 2.0 * double(op.m * op.k * op.n);
    if (op.kind == OpKind::kAttnScores || op.kind == OpKind::kAttnValues) {
      attention_ops += 2.0 * double(op.heads * op.m * op.n * op.k);
    }
  }
  const ModelStats s = ComputeModelStats(m);
  EXPECT_DOUBLE_EQ(gemm_ops, s.ops_per_token);
  EXPECT_DOUBLE_EQ(attention_ops, s.attention_ops_per_context_token * double(context + 1));
}

TEST(TraceBuilder, HundredThousandDecodeStepsStream) {
  // The generator holds one step's templates; draining a long run only
  // counts records (memory use is not measured, the design is the check).
  ModelConfig m = SmallModel();
  m.layers = 1;
  const int64_t steps = 100000;
  auto source = BuildTrace(m, Workload(0, steps, 0, 1));
  TraceRecord r;
  int64_t step_records = 0, op_records = 0, last_context = -1;
  while (source->next(r)) {
    if (r.is_step) {
      ++step_records;
      last_context = r.step.context;
    } else {
      ++op_records;
    }
  }
  EXPECT_EQ(step_records, steps);
  EXPECT_EQ(op_records, steps * int64_t(1 + kGatedBlock.size() + 3));
  EXPECT_EQ(last_context, steps - 1);
  EXPECT_FALSE(source->next(r));  // stays at the end
}

TEST(TraceBuilder, EmptyWorkloadGivesNoSteps) {
  auto source = BuildTrace(SmallModel(), Workload(0, 0, 0, 1));
  TraceRecord r;
  EXPECT_FALSE(source->next(r));
}

}  // namespace
}  // namespace tritsim
