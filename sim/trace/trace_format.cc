#include "trace/trace_format.h"

#include <algorithm>
#include <charconv>
#include <iterator>

namespace tritsim {
namespace {

// One enum value and its spelling.
template <typename E>
struct NameEntry {
  E value;
  const char* name;
};

constexpr NameEntry<OpKind> kOpKindNames[] = {
    {OpKind::kEmbed, "embed"},
    {OpKind::kNorm, "norm"},
    {OpKind::kQuantize, "quantize"},
    {OpKind::kGemm, "gemm"},
    {OpKind::kRope, "rope"},
    {OpKind::kKvAppend, "kv_append"},
    {OpKind::kAttnScores, "attn_scores"},
    {OpKind::kSoftmax, "softmax"},
    {OpKind::kAttnValues, "attn_values"},
    {OpKind::kActivation, "activation"},
    {OpKind::kResidual, "residual"},
};

constexpr NameEntry<Phase> kPhaseNames[] = {
    {Phase::kPrefill, "prefill"},
    {Phase::kDecode, "decode"},
};

constexpr NameEntry<TensorClass> kTensorClassNames[] = {
    {TensorClass::kNone, "none"}, {TensorClass::kAttention, "attention"},
    {TensorClass::kFfn, "ffn"},   {TensorClass::kEmbedding, "embedding"},
    {TensorClass::kHead, "head"}, {TensorClass::kNorm, "norm"},
};

constexpr NameEntry<WeightFormat> kWeightFormatNames[] = {
    {WeightFormat::kTernary, "ternary"},
    {WeightFormat::kInt8, "int8"},
    {WeightFormat::kInt16, "int16"},
    {WeightFormat::kFp16, "fp16"},  // added later: older traces never name it
};

template <typename E, size_t N>
const char* NameOf(const NameEntry<E> (&table)[N], E value) {
  for (const auto& entry : table) {
    if (entry.value == value) return entry.name;
  }
  return "invalid";  // only reachable with a value cast from an out-of-range int
}

template <typename E, size_t N>
bool ValueOf(const NameEntry<E> (&table)[N], std::string_view text, E* out) {
  for (const auto& entry : table) {
    if (text == entry.name) {
      *out = entry.value;
      return true;
    }
  }
  return false;
}

template <typename E, size_t N>
std::string AllowedNames(const NameEntry<E> (&table)[N]) {
  std::string text;
  for (const auto& entry : table) {
    if (!text.empty()) text += " | ";
    text += entry.name;
  }
  return text;
}

}  // namespace

const char* OpKindName(OpKind kind) { return NameOf(kOpKindNames, kind); }
const char* PhaseName(Phase phase) { return NameOf(kPhaseNames, phase); }
const char* TensorClassName(TensorClass tensor) { return NameOf(kTensorClassNames, tensor); }
const char* WeightFormatName(WeightFormat format) { return NameOf(kWeightFormatNames, format); }

bool ParseOpKind(std::string_view text, OpKind* out) { return ValueOf(kOpKindNames, text, out); }
bool ParsePhase(std::string_view text, Phase* out) { return ValueOf(kPhaseNames, text, out); }
bool ParseTensorClass(std::string_view text, TensorClass* out) {
  return ValueOf(kTensorClassNames, text, out);
}
bool ParseWeightFormat(std::string_view text, WeightFormat* out) {
  return ValueOf(kWeightFormatNames, text, out);
}

std::string AllowedOpKinds() { return AllowedNames(kOpKindNames); }
std::string AllowedPhases() { return AllowedNames(kPhaseNames); }
std::string AllowedTensorClasses() { return AllowedNames(kTensorClassNames); }
std::string AllowedWeightFormats() { return AllowedNames(kWeightFormatNames); }

std::string FormatTraceDouble(double value) {
  char buffer[64];  // shortest round-trip form of any double fits in 32 chars
  auto result = std::to_chars(std::begin(buffer), std::end(buffer), value);
  return std::string(buffer, result.ptr);
}

namespace {

// A whole number in [min, max], or false.
bool MixNumber(std::string_view text, int64_t min, int64_t max, int64_t& value) {
  const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
  return ec == std::errc() && end == text.data() + text.size() && !text.empty() && value >= min &&
         value <= max;
}

}  // namespace

std::string ParseMixText(std::string_view text, std::vector<SequenceSpan>& out) {
  out.clear();
  size_t start = 0;
  while (start <= text.size()) {
    const size_t comma = std::min(text.find(',', start), text.size());
    const std::string_view entry = text.substr(start, comma - start);
    const size_t at = entry.find('@');
    SequenceSpan span;
    if (at == std::string_view::npos ||
        !MixNumber(entry.substr(0, at), 1, kTraceMaxContext, span.tokens) ||
        !MixNumber(entry.substr(at + 1), 0, kTraceMaxContext, span.context)) {
      return "'" + std::string(entry) + "' is not TOKENS@CONTEXT (TOKENS 1 to " +
             std::to_string(kTraceMaxContext) + ", CONTEXT 0 to " +
             std::to_string(kTraceMaxContext) + "), in a list like 512@0,1@700";
    }
    if (int64_t(out.size()) == kTraceMaxBatch) {
      return "more than " + std::to_string(kTraceMaxBatch) + " sequences";
    }
    out.push_back(span);
    start = comma + 1;
  }
  return "";
}

}  // namespace tritsim
