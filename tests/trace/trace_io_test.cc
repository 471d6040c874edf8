#include <gtest/gtest.h>
#include <unistd.h>

#include <charconv>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/config_loader.h"
#include "model/trace_builder.h"
#include "trace/trace_format.h"
#include "trace/trace_reader.h"
#include "trace/trace_writer.h"

namespace tritsim {
namespace {

const std::string kSourceDir = TRITSIM_SOURCE_DIR;
const std::string kBadDir = kSourceDir + "/tests/bad_inputs/trace/";

// A small grouped-query model with a tied 16-bit head.
ModelConfig SmallModel() {
  ModelConfig m;
  m.name = "finch 2-layer test";  // spaces are allowed in the model name
  m.layers = 2;
  m.width = 128;
  m.heads = 4;
  m.kv_heads = 2;
  m.head_dim = 32;
  m.ffn_width = 352;
  m.vocab = 500;
  m.tied_embeddings = true;
  m.embedding_weights = WeightFormat::kInt16;
  m.weight_zero_fraction = 0.1 + 0.2;  // not a short decimal: exercises round-trip printing
  return m;
}

WorkloadConfig PrefillAndDecode() {
  WorkloadConfig w;
  w.prefill_tokens = 9;
  w.decode_tokens = 3;
  w.context_tokens = 40;
  w.batch = 2;
  return w;
}

std::string WriteToString(TraceSource& source) {
  std::ostringstream out;
  WriteTrace(source, out);
  return out.str();
}

// Fixture: a private scratch file per test.
class TraceIo : public ::testing::Test {
 protected:
  void TearDown() override { std::remove(path_.c_str()); }

  const std::string& WriteFile(const std::string& text) {
    path_ = ::testing::TempDir() + "tritsim_trace_io_" + std::to_string(getpid()) + "_" +
            ::testing::UnitTest::GetInstance()->current_test_info()->name() + ".trace";
    std::ofstream(path_, std::ios::binary) << text;
    return path_;
  }

  std::string RewriteFile(const std::string& text) {
    auto source = OpenTraceFile(WriteFile(text));
    return WriteToString(*source);
  }

  std::string path_;
};

std::string BuiltText() {
  auto built = BuildTrace(SmallModel(), PrefillAndDecode());
  return WriteToString(*built);
}

void ExpectSameOp(const TraceOp& a, const TraceOp& b) {
  EXPECT_EQ(a.phase, b.phase);
  EXPECT_EQ(a.step, b.step);
  EXPECT_EQ(a.layer, b.layer);
  EXPECT_EQ(a.name, b.name);
  EXPECT_EQ(a.kind, b.kind);
  EXPECT_EQ(a.tensor, b.tensor);
  EXPECT_EQ(a.weights, b.weights);
  EXPECT_EQ(a.m, b.m);
  EXPECT_EQ(a.n, b.n);
  EXPECT_EQ(a.k, b.k);
  EXPECT_EQ(a.heads, b.heads);
  EXPECT_EQ(a.kv_heads, b.kv_heads);
  EXPECT_EQ(a.head_dim, b.head_dim);
  EXPECT_EQ(a.context, b.context);
  EXPECT_EQ(a.causal, b.causal);
  EXPECT_EQ(a.act_bits, b.act_bits);
  EXPECT_EQ(a.kv_bits, b.kv_bits);
  EXPECT_EQ(a.zero_fraction, b.zero_fraction);  // exact: shortest round-trip text
}

TEST_F(TraceIo, WriteReadWriteIsByteIdentical) {
  const std::string first = BuiltText();
  EXPECT_EQ(RewriteFile(first), first);
}

TEST_F(TraceIo, ReaderGivesBackTheBuilderRecords) {
  auto built = BuildTrace(SmallModel(), PrefillAndDecode());
  auto read = OpenTraceFile(WriteFile(BuiltText()));
  EXPECT_EQ(read->header().version, 1);
  EXPECT_EQ(read->header().model, "finch 2-layer test");
  EXPECT_EQ(read->header().workload.context_tokens, 40);
  EXPECT_EQ(read->header().workload.batch, 2);
  TraceRecord a, b;
  int64_t records = 0;
  while (built->next(a)) {
    ASSERT_TRUE(read->next(b)) << "reader ended early at record " << records;
    ASSERT_EQ(a.is_step, b.is_step);
    if (a.is_step) {
      EXPECT_EQ(a.step.phase, b.step.phase);
      EXPECT_EQ(a.step.step, b.step.step);
      EXPECT_EQ(a.step.tokens, b.step.tokens);
      EXPECT_EQ(a.step.batch, b.step.batch);
      EXPECT_EQ(a.step.context, b.step.context);
    } else {
      ExpectSameOp(a.op, b.op);
    }
    ++records;
  }
  EXPECT_FALSE(read->next(b));
  EXPECT_EQ(records, 4 * (1 + 1 + 18 * 2 + 3));  // 4 steps of step line + ops
}

// Trace format version 2: one mixed step (serving with continuous
// batching). Sequences of equal new tokens and context share one group of
// attention ops; the projections see every new token.
std::vector<SequenceSpan> Mix() { return {{9, 0}, {1, 40}, {1, 40}, {1, 77}}; }

TEST_F(TraceIo, MixedStepWriteReadWriteIsByteIdentical) {
  auto built = BuildMixedStepTrace(SmallModel(), Phase::kPrefill, Mix());
  const std::string first = WriteToString(*built);
  EXPECT_EQ(first.substr(0, 16), "tritsim-trace 2\n");
  EXPECT_NE(first.find("step phase=prefill index=0 batch=4 mix=9@0,1@40,1@40,1@77\n"),
            std::string::npos);
  EXPECT_EQ(RewriteFile(first), first);
}

TEST_F(TraceIo, MixedStepGroupsAttentionByTokensAndContext) {
  auto built = BuildMixedStepTrace(SmallModel(), Phase::kPrefill, Mix());
  TraceRecord r;
  ASSERT_TRUE(built->next(r));
  ASSERT_TRUE(r.is_step);
  EXPECT_EQ(r.step.new_tokens(), 12);
  EXPECT_EQ(built->header().workload.prefill_tokens, 9);  // the longest chunk
  EXPECT_EQ(built->header().workload.batch, 4);
  std::vector<TraceOp> scores;
  while (built->next(r)) {
    if (r.op.layer != 0) continue;
    if (r.op.kind == OpKind::kGemm) {
      EXPECT_EQ(r.op.m, 12) << r.op.name;
    }
    if (r.op.kind == OpKind::kAttnScores) scores.push_back(r.op);
  }
  ASSERT_EQ(scores.size(), 3u);  // 9@0, 2 x 1@40, 1@77
  EXPECT_EQ(scores[0].m, 9);
  EXPECT_EQ(scores[0].context, 9);
  EXPECT_TRUE(scores[0].causal);
  EXPECT_EQ(scores[1].sequences, 2);
  EXPECT_EQ(scores[1].m, 2);
  EXPECT_EQ(scores[1].context, 41);
  EXPECT_FALSE(scores[1].causal);
  EXPECT_EQ(scores[2].context, 78);
}

TEST_F(TraceIo, LargestWorkloadsReadBack) {
  // The reader's caps must admit every trace the builder writes for a
  // workload within ValidateWorkload's limits (prompt and decode 2^20,
  // context 2^24, batch 4096 in sim/config/config_loader.cc).
  ModelConfig m = SmallModel();
  m.layers = 1;
  WorkloadConfig w;
  w.prefill_tokens = int64_t{1} << 20;
  w.decode_tokens = 2;
  w.context_tokens = int64_t{1} << 24;
  // Batch 256 rather than the 4096 maximum: at 4096 the attention of this
  // op alone would exceed the 4e18 products the reader admits per op (the
  // engine's 64-bit counters), which the reader rightly refuses.
  w.batch = 256;
  auto built = BuildTrace(m, w);
  const std::string text = WriteToString(*built);
  EXPECT_EQ(RewriteFile(text), text);
}

TEST_F(TraceIo, CommentsBlankLinesAndCrlfAreIgnored) {
  const std::string clean = BuiltText();
  std::string edited;
  std::istringstream lines(clean);
  std::string line;
  for (int i = 0; std::getline(lines, line); ++i) {
    edited += line + (i % 3 == 0 ? "\r\n" : "\n");
    if (i % 5 == 1) edited += "   # a note added by hand\n\n\t\n";
  }
  EXPECT_EQ(RewriteFile(edited), clean);
}

TEST_F(TraceIo, FieldsMayComeInAnyOrder) {
  std::string text = BuiltText();
  const std::string from = "step phase=decode index=1 tokens=1 batch=2 context=50\n";
  const std::string to = "step  context=50 batch=2\ttokens=1 index=1 phase=decode\n";
  const size_t at = text.find(from);
  ASSERT_NE(at, std::string::npos);
  const std::string clean = text;
  text.replace(at, from.size(), to);
  EXPECT_EQ(RewriteFile(text), clean);
}

TEST_F(TraceIo, LastLineWithoutNewlineIsAcceptedWhenComplete) {
  std::string text = BuiltText();
  ASSERT_EQ(text.substr(text.size() - 4), "end\n");
  text.pop_back();
  EXPECT_EQ(RewriteFile(text), BuiltText());
}

TEST_F(TraceIo, ExampleTraceInRepositoryRoundTrips) {
  const std::string path = kSourceDir + "/traces/wren-0.7b-decode4.trace";
  std::ifstream in(path, std::ios::binary);
  ASSERT_TRUE(in) << path;
  const std::string content((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  auto source = OpenTraceFile(path);
  EXPECT_EQ(source->header().model, "wren-0.7b");
  EXPECT_EQ(source->header().workload.decode_tokens, 4);
  EXPECT_EQ(WriteToString(*source), content);
}

TEST_F(TraceIo, ExampleTraceIsCurrentForItsModelFile) {
  // traces/wren-0.7b-decode4.trace must be what the builder makes from
  // models/wren-0.7b.yaml; if either changes, regenerate the trace.
  const std::string path = kSourceDir + "/traces/wren-0.7b-decode4.trace";
  auto stored = OpenTraceFile(path);
  const ModelConfig model = LoadModelFile(kSourceDir + "/models/wren-0.7b.yaml");
  auto built = BuildTrace(model, stored->header().workload);
  EXPECT_EQ(WriteToString(*built), WriteToString(*stored));
}

TEST_F(TraceIo, MissingFileIsNamed) {
  const std::string path = kBadDir + "no-such-file.trace";
  try {
    OpenTraceFile(path);
    FAIL() << "no error for a missing file";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    EXPECT_EQ(std::string(e.what()), path + ": cannot open trace file");
  }
}

TEST_F(TraceIo, WriterRefusesOpNameThatCannotBeRead) {
  // A source whose op name holds a space would produce an unreadable line.
  class OneOp : public TraceSource {
   public:
    const TraceHeader& header() const override { return header_; }
    bool next(TraceRecord& r) override {
      r = TraceRecord();
      r.is_step = index_ == 0;
      r.op.name = "two words";
      return index_++ < 2;
    }
    TraceHeader header_;
    int index_ = 0;
  } source;
  source.header_.model = "m";
  std::ostringstream out;
  try {
    WriteTrace(source, out);
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kInternal);
    EXPECT_NE(std::string(e.what()).find("two words"), std::string::npos);
  }
}

TEST_F(TraceIo, EnumNamesAreSnakeCaseAndParseBack) {
  EXPECT_STREQ(OpKindName(OpKind::kGemm), "gemm");
  EXPECT_STREQ(OpKindName(OpKind::kAttnScores), "attn_scores");
  EXPECT_STREQ(OpKindName(OpKind::kKvAppend), "kv_append");
  EXPECT_STREQ(PhaseName(Phase::kPrefill), "prefill");
  EXPECT_STREQ(PhaseName(Phase::kDecode), "decode");
  EXPECT_STREQ(TensorClassName(TensorClass::kAttention), "attention");
  EXPECT_STREQ(TensorClassName(TensorClass::kNone), "none");
  EXPECT_STREQ(WeightFormatName(WeightFormat::kInt16), "int16");
  for (int i = 0; i <= int(OpKind::kResidual); ++i) {
    OpKind kind{};
    EXPECT_TRUE(ParseOpKind(OpKindName(OpKind(i)), &kind));
    EXPECT_EQ(kind, OpKind(i));
  }
  for (int i = 0; i <= int(TensorClass::kNorm); ++i) {
    TensorClass tensor{};
    EXPECT_TRUE(ParseTensorClass(TensorClassName(TensorClass(i)), &tensor));
    EXPECT_EQ(tensor, TensorClass(i));
  }
  OpKind unused{};
  EXPECT_FALSE(ParseOpKind("GEMM", &unused));  // names are case-sensitive
}

TEST_F(TraceIo, DoublesPrintShortestAndReadBackExactly) {
  for (double value : {0.0, 0.31006, 0.1 + 0.2, 1.0 / 3.0, 0.5, 1e-9}) {
    const std::string text = FormatTraceDouble(value);
    double back = -1.0;
    std::from_chars(text.data(), text.data() + text.size(), back);
    EXPECT_EQ(back, value) << text;
  }
  EXPECT_EQ(FormatTraceDouble(0.31006), "0.31006");
  EXPECT_EQ(FormatTraceDouble(0.0), "0");
}

// One malformed file, where its error must point, and what it must say.
struct BadTrace {
  const char* file;
  int line;             // 0: no line (the file as a whole)
  const char* message;  // substring of the error
};

const BadTrace kBadTraces[] = {
    {"truncated_record.trace", 6, "truncated record"},
    {"unknown_kind.trace", 5, "op.kind: 'matmul' is not allowed, allowed embed | norm"},
    {"negative_m.trace", 6, "op.m: -5 is out of range, allowed 1 to 4294967296"},
    {"op_before_step.trace", 5, "op before any step line"},
    {"decode_out_of_order.trace", 6, "decode step 2 out of order, expected 1"},
    {"bad_magic.trace", 1, "not a tritsim trace"},
    {"unsupported_version.trace", 1, "unsupported trace version 3, supported 1 | 2"},
    {"garbage_bytes.trace", 5, "NUL byte at column 3"},
    {"compressed_file.trace", 1, "control byte 31 at column 1"},
    {"invalid_utf8.trace", 4, "invalid UTF-8 at column 6"},
    {"missing_field.trace", 5, "op.zero_fraction: missing field"},
    {"unknown_field.trace", 5, "op.flops: unknown field, allowed layer name"},
    {"long_line.trace", 5, "line longer than 4096 characters"},
    {"prefill_not_first.trace", 6, "prefill allowed only as the first step"},
    {"missing_end.trace", 5, "file ends without the 'end' line"},
    {"none_tensor_with_weights.trace", 5, "op.weights: 'int8' is not allowed with tensor=none"},
    {"bad_bits.trace", 5, "op.act_bits: 4 is not allowed, allowed 8 | 16"},
    {"context_too_large.trace", 5, "op.context: 40000000 is out of range, allowed 0 to 33554432"},
    {"kv_heads_not_dividing.trace", 5, "op.kv_heads: 4 does not divide heads=6"},
    {"decode_count_mismatch.trace", 6, "header says decode=2 but the trace has 1 decode steps"},
    {"batch_mismatch.trace", 4, "step.batch: 2 differs from the header's batch=1"},
    {"not_a_number.trace", 5, "op.n: '19x2' is not an integer"},
    {"bad_causal.trace", 5, "op.causal: 'yes' is not allowed, allowed true | false"},
    {"zero_fraction_one.trace", 5, "op.zero_fraction: '1' is not allowed"},
    {"record_after_end.trace", 7, "record after the 'end' line"},
    {"unknown_record.trace", 5, "unknown record 'layer', allowed step | op | end"},
    {"empty.trace", 0, "empty file, expected a tritsim trace"},
    {"header_cut.trace", 2, "file ends inside the header"},
    {"step_before_workload.trace", 3, "workload: missing header line before 'step'"},
    {"model_twice.trace", 3, "model: given twice"},
    {"mix_count_mismatch.trace", 4, "step.mix: has 2 entries, batch=3"},
    {"mix_and_tokens.trace", 4, "step.mix: a mixed step gives mix instead of tokens and context"},
    {"mix_bad_entry.trace", 4, "step.mix: '0@20' is not TOKENS@CONTEXT"},
    {"sequences_in_uniform_step.trace", 5, "op.sequences: only ops of a mixed step"},
    {"v2_op_without_sequences.trace", 5, "op.sequences: missing field"},
};

// Opens and drains `path`; returns the error text, or "" if it read cleanly.
std::string ReadError(const std::string& path, ExitCode* code) {
  try {
    auto source = OpenTraceFile(path);
    TraceRecord record;
    while (source->next(record)) {
    }
  } catch (const Error& e) {
    *code = e.code();
    return e.what();
  }
  return "";
}

TEST_F(TraceIo, EveryBadFileIsRejectedAtItsLine) {
  for (const BadTrace& bad : kBadTraces) {
    SCOPED_TRACE(bad.file);
    const std::string path = kBadDir + bad.file;
    ExitCode code = ExitCode::kOk;
    const std::string error = ReadError(path, &code);
    EXPECT_EQ(code, ExitCode::kBadInput);
    // Line 0: the file as a whole (InputError then omits the line number).
    const std::string where =
        bad.line > 0 ? path + ":" + std::to_string(bad.line) + ": " : path + ": ";
    EXPECT_EQ(error.substr(0, where.size()), where) << error;
    EXPECT_NE(error.find(bad.message), std::string::npos) << error;
    EXPECT_EQ(error.find('\n'), std::string::npos) << "message must be one line";
  }
}

}  // namespace
}  // namespace tritsim
