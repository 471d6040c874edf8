// Names and limits shared by the trace reader, the trace writer and the
// report layer: the text spelling of every trace enum, and the caps the
// reader enforces (docs/trace-format.md).
//
// Names are lowercase snake case and stable: they appear in trace files,
// JSON and CSV reports, so renaming one breaks stored files.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "config/model_config.h"
#include "trace/trace_op.h"

namespace tritsim {

// First token of the first line of every trace file, followed by the version.
inline constexpr const char* kTraceMagic = "tritsim-trace";
// Format versions this build reads and writes: 1 (uniform steps) and 2
// (adds mixed steps and the ops' `sequences` field). The writer keeps a
// source's version, so a version-1 trace is written back byte for byte.
inline constexpr int kTraceVersion = 1;
inline constexpr int kTraceVersionMixed = 2;

// Reader limits. They reject corrupt numbers early; none is a hardware limit.
// Each is above what the builder can emit for a workload the config loader
// accepts (e.g. contexts reach C + P + S = 2^24 + 2^20 + 2^20 < 2^25 there,
// rows reach batch x prompt = 2^12 x 2^20 = 2^32).
inline constexpr int64_t kTraceMaxDim = int64_t{1} << 32;      // m, n, k
inline constexpr int64_t kTraceMaxContext = int64_t{1} << 25;  // contexts, step tokens
inline constexpr int64_t kTraceMaxHeads = int64_t{1} << 16;    // heads, kv_heads, head_dim
inline constexpr int64_t kTraceMaxLayer = int64_t{1} << 16;    // layer index is < this
inline constexpr int64_t kTraceMaxBatch = int64_t{1} << 20;    // batch
inline constexpr int64_t kTraceMaxSteps = int64_t{1} << 31;    // decode steps
inline constexpr size_t kTraceMaxLineChars = 4096;             // characters per line, without '\n'

// Text names of enum values, e.g. OpKindName(OpKind::kAttnScores) ==
// "attn_scores". Never null; the pointers are static.
const char* OpKindName(OpKind kind);
const char* PhaseName(Phase phase);
const char* TensorClassName(TensorClass tensor);
const char* WeightFormatName(WeightFormat format);

// Spelling of the `weights` field of an op whose tensor class is kNone (it
// reads no weights, so its TraceOp::weights is left at the default).
inline constexpr const char* kNoWeightsName = "none";

// Inverse of the above: true and `*out` set if `text` is a known name.
bool ParseOpKind(std::string_view text, OpKind* out);
bool ParsePhase(std::string_view text, Phase* out);
bool ParseTensorClass(std::string_view text, TensorClass* out);
bool ParseWeightFormat(std::string_view text, WeightFormat* out);

// The allowed names for error messages, e.g. "prefill | decode".
std::string AllowedOpKinds();
std::string AllowedPhases();
std::string AllowedTensorClasses();
std::string AllowedWeightFormats();

// Parses a mixed step's sequences, "T@C,T@C,..." (TOKENS 1 to
// kTraceMaxContext new tokens at CONTEXT 0 to kTraceMaxContext cached ones;
// at most kTraceMaxBatch entries) into `out`. Returns "" or what is wrong.
std::string ParseMixText(std::string_view text, std::vector<SequenceSpan>& out);

// Shortest decimal text that reads back to exactly `value` (std::to_chars),
// so read -> write of a trace is byte-identical.
std::string FormatTraceDouble(double value);

}  // namespace tritsim
