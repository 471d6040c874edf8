#include "trace/trace_reader.h"

#include <algorithm>
#include <charconv>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "common/error.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

// A problem found in one line; the reader adds the file and line number.
struct LineError {
  std::string key;           // e.g. "op.m"; empty when the line as a whole is bad
  std::string message;       // bad value and what is allowed
  bool about_bytes = false;  // bad bytes or length: never reported as a truncated record
};

// Bits allowed for activations and KV entries (as in the model description).
constexpr int64_t kAllowedBits[] = {8, 16};

// ---------------------------------------------------------------- bytes ----

// Length of the UTF-8 sequence starting at `s[i]`, or 0 if it is invalid.
size_t Utf8SequenceLength(std::string_view s, size_t i) {
  const unsigned char lead = static_cast<unsigned char>(s[i]);
  size_t length = 0;
  unsigned char min_second = 0x80, max_second = 0xbf;
  if (lead < 0x80) return 1;
  if (lead >= 0xc2 && lead <= 0xdf)
    length = 2;
  else if (lead >= 0xe0 && lead <= 0xef)
    length = 3;
  else if (lead >= 0xf0 && lead <= 0xf4)
    length = 4;
  else
    return 0;
  if (lead == 0xe0) min_second = 0xa0;  // no overlong forms
  if (lead == 0xed) max_second = 0x9f;  // no surrogates
  if (lead == 0xf0) min_second = 0x90;
  if (lead == 0xf4) max_second = 0x8f;  // nothing above U+10FFFF
  if (i + length > s.size()) return 0;
  for (size_t k = 1; k < length; ++k) {
    const unsigned char c = static_cast<unsigned char>(s[i + k]);
    const unsigned char lo = k == 1 ? min_second : 0x80, hi = k == 1 ? max_second : 0xbf;
    if (c < lo || c > hi) return 0;
  }
  return length;
}

// A bad byte at 0-based `index` of a line.
LineError BadByte(const std::string& what, size_t index) {
  return LineError{"", what + " at column " + std::to_string(index + 1) + " (binary data?)", true};
}

// Rejects NUL and other control bytes (tab allowed) and invalid UTF-8.
void CheckText(std::string_view line) {
  for (size_t i = 0; i < line.size();) {
    const unsigned char c = static_cast<unsigned char>(line[i]);
    if (c == 0) throw BadByte("NUL byte", i);
    if ((c < ' ' && c != '\t') || c == 0x7f) throw BadByte("control byte " + std::to_string(c), i);
    const size_t length = Utf8SequenceLength(line, i);
    if (length == 0) throw BadByte("invalid UTF-8", i);
    i += length;
  }
}

bool IsBlank(char c) { return c == ' ' || c == '\t'; }

// Splits on runs of spaces and tabs.
std::vector<std::string_view> SplitWords(std::string_view line) {
  std::vector<std::string_view> words;
  size_t i = 0;
  while (i < line.size()) {
    while (i < line.size() && IsBlank(line[i])) ++i;
    const size_t start = i;
    while (i < line.size() && !IsBlank(line[i])) ++i;
    if (i > start) words.push_back(line.substr(start, i - start));
  }
  return words;
}

// --------------------------------------------------------------- fields ----

// The key=value fields of one record line, checked against the allowed keys.
class Fields {
 public:
  // `allowed` must outlive the Fields (the key lists below are static).
  Fields(const char* record, const std::vector<std::string_view>& words,
         const std::vector<const char*>& allowed)
      : record_(record), allowed_(allowed) {
    for (size_t i = 1; i < words.size(); ++i) Add(words[i]);
  }

  bool Has(const char* key) const {
    for (const auto& field : fields_) {
      if (field.first == key) return true;
    }
    return false;
  }

  std::string_view Text(const char* key) const {
    for (const auto& [k, v] : fields_) {
      if (k == key) return v;
    }
    throw LineError{
        Path(key), "missing field (" + std::string(record_) + " lines need " + AllowedKeys() + ")"};
  }

  // An integer in [min, max].
  int64_t Int(const char* key, int64_t min, int64_t max) const {
    const std::string_view text = Text(key);
    int64_t value = 0;
    const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    const bool whole = ec == std::errc() && end == text.data() + text.size();
    if (!whole && ec != std::errc::result_out_of_range) {
      throw LineError{Path(key), "'" + std::string(text) + "' is not an integer"};
    }
    if (!whole || value < min || value > max) {
      throw LineError{Path(key), std::string(text) + " is out of range, allowed " +
                                     std::to_string(min) + " to " + std::to_string(max)};
    }
    return value;
  }

  // An integer from a short list, e.g. bits.
  template <size_t N>
  int OneOf(const char* key, const int64_t (&allowed)[N]) const {
    const int64_t value = Int(key, INT64_MIN, INT64_MAX);
    std::string list;
    for (int64_t a : allowed) {
      if (a == value) return int(value);
      list += (list.empty() ? "" : " | ") + std::to_string(a);
    }
    throw LineError{Path(key), std::to_string(value) + " is not allowed, allowed " + list};
  }

  bool Bool(const char* key) const {
    const std::string_view text = Text(key);
    if (text == "true") return true;
    if (text == "false") return false;
    throw LineError{Path(key), "'" + std::string(text) + "' is not allowed, allowed true | false"};
  }

  // A number in [0, 1).
  double Fraction(const char* key) const {
    const std::string_view text = Text(key);
    double value = 0.0;
    const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    const bool whole = ec == std::errc() && end == text.data() + text.size();
    if (!whole || !(value >= 0.0 && value < 1.0)) {
      throw LineError{Path(key),
                      "'" + std::string(text) + "' is not allowed, allowed a number in [0, 1)"};
    }
    return value;
  }

  // An enum spelled by name; `parse` is one of the Parse* functions.
  template <typename E>
  E Enum(const char* key, bool (*parse)(std::string_view, E*), const std::string& allowed) const {
    const std::string_view text = Text(key);
    E value{};
    if (!parse(text, &value)) {
      throw LineError{Path(key), "'" + std::string(text) + "' is not allowed, allowed " + allowed};
    }
    return value;
  }

  std::string Path(const char* key) const { return std::string(record_) + "." + key; }

 private:
  void Add(std::string_view word) {
    const size_t eq = word.find('=');
    if (eq == std::string_view::npos || eq == 0) {
      throw LineError{record_, "'" + std::string(word) + "' is not a key=value field"};
    }
    const std::string_view key = word.substr(0, eq);
    bool known = false;
    for (const char* a : allowed_) known = known || key == a;
    if (!known) {
      throw LineError{Path(std::string(key).c_str()), "unknown field, allowed " + AllowedKeys()};
    }
    for (const auto& field : fields_) {
      if (field.first == key) throw LineError{Path(std::string(key).c_str()), "field given twice"};
    }
    fields_.emplace_back(key, word.substr(eq + 1));
  }

  std::string AllowedKeys() const {
    std::string list;
    for (const char* a : allowed_) list += (list.empty() ? "" : " ") + std::string(a);
    return list;
  }

  const char* record_;                       // record type, e.g. "op"
  const std::vector<const char*>& allowed_;  // keys this record type takes
  std::vector<std::pair<std::string_view, std::string_view>> fields_;
};

// --------------------------------------------------------------- records ---

WorkloadConfig ParseWorkload(const std::vector<std::string_view>& words) {
  static const std::vector<const char*> kKeys = {"prefill", "decode", "context", "batch"};
  const Fields f("workload", words, kKeys);
  WorkloadConfig w;
  w.prefill_tokens = f.Int("prefill", 0, kTraceMaxContext);
  w.decode_tokens = f.Int("decode", 0, kTraceMaxSteps);
  w.context_tokens = f.Int("context", 0, kTraceMaxContext);
  w.batch = f.Int("batch", 1, kTraceMaxBatch);
  return w;
}

// "T@C,T@C,...", one entry per sequence.
std::vector<SequenceSpan> ParseMix(std::string_view text, int64_t batch) {
  std::vector<SequenceSpan> mix;
  const std::string error = ParseMixText(text, mix);
  if (!error.empty()) throw LineError{"step.mix", error};
  if (int64_t(mix.size()) != batch) {
    throw LineError{"step.mix", "has " + std::to_string(mix.size()) + " entries, batch=" +
                                    std::to_string(batch) + " (one TOKENS@CONTEXT per sequence)"};
  }
  return mix;
}

// Version 2 steps are uniform (tokens, context) or mixed (mix), not both.
TraceStep ParseStep(const std::vector<std::string_view>& words, int version) {
  static const std::vector<const char*> kKeys = {"phase", "index", "tokens", "batch", "context"};
  static const std::vector<const char*> kKeysV2 = {"phase", "index",   "tokens",
                                                   "batch", "context", "mix"};
  const Fields f("step", words, version >= kTraceVersionMixed ? kKeysV2 : kKeys);
  TraceStep s;
  s.phase = f.Enum("phase", ParsePhase, AllowedPhases());
  s.step = f.Int("index", 0, kTraceMaxSteps);
  s.batch = f.Int("batch", 1, kTraceMaxBatch);
  if (f.Has("mix")) {
    if (f.Has("tokens") || f.Has("context")) {
      throw LineError{"step.mix", "a mixed step gives mix instead of tokens and context"};
    }
    s.mix = ParseMix(f.Text("mix"), s.batch);
    s.tokens = 0;
    s.context = 0;
    return s;
  }
  s.tokens = f.Int("tokens", 1, kTraceMaxContext);
  s.context = f.Int("context", 0, kTraceMaxContext);
  return s;
}

bool IsAttention(OpKind kind) {
  return kind == OpKind::kAttnScores || kind == OpKind::kSoftmax || kind == OpKind::kAttnValues;
}

// Checks that span fields: what a kind of op needs to be computable.
void CheckOpConsistency(const TraceOp& op) {
  if (op.name.find_first_of("=#") != std::string::npos) {
    throw LineError{"op.name", "'" + op.name + "' contains '=' or '#'"};
  }
  if (op.kind == OpKind::kGemm && op.k < 1) {
    throw LineError{"op.k",
                    "0 is not allowed for a gemm, allowed 1 to " + std::to_string(kTraceMaxDim)};
  }
  if (op.kind == OpKind::kGemm &&
      (op.tensor == TensorClass::kNone || op.tensor == TensorClass::kNorm)) {
    throw LineError{"op.tensor", std::string(TensorClassName(op.tensor)) +
                                     " is not allowed for a gemm, allowed attention | ffn | "
                                     "embedding | head"};
  }
  if (IsAttention(op.kind)) {
    if (op.heads < 1 || op.kv_heads < 1 || op.head_dim < 1 || op.context < 1) {
      throw LineError{"op", "an attention op needs heads, kv_heads, head_dim and context >= 1"};
    }
    if (op.heads % op.kv_heads != 0) {
      throw LineError{"op.kv_heads", std::to_string(op.kv_heads) +
                                         " does not divide heads=" + std::to_string(op.heads)};
    }
  }
}

// An op works on the rows of its step: batch x tokens, or one row per
// sequence (the output head and its norm look at the last position only).
void CheckRowsMatchStep(const TraceOp& op, const TraceStep& step) {
  if (op.sequences > step.batch) {
    throw LineError{"op.sequences",
                    std::to_string(op.sequences) +
                        " is more than the step's batch=" + std::to_string(step.batch)};
  }
  if (op.sequences > 0 && !step.mixed()) {
    throw LineError{"op.sequences", "only ops of a mixed step name their sequences; 0 here"};
  }
  const int64_t all_rows = step.new_tokens();
  if (op.m == all_rows || op.m == step.batch) return;
  if (op.sequences > 0 && op.m <= all_rows) return;  // a group of a mixed step
  throw LineError{"op.m", std::to_string(op.m) + " does not match its step (batch " +
                              std::to_string(step.batch) + " x tokens " +
                              std::to_string(step.tokens) + " = " + std::to_string(all_rows) +
                              ", or batch " + std::to_string(step.batch) + ")"};
}

// The engine counts an op's products and bytes in 64-bit integers; an op
// whose products would not fit (with headroom for summing a long run) is
// rejected here rather than wrapping later.
void CheckCountersFit(const TraceOp& op) {
  // Per op; ops count 2 per product and 2^64 is 1.8e19. The config loader caps
  // a whole workload at 1e18 ops, so every trace it allows passes.
  constexpr long double kMaxProducts = 4e18L;
  const long double rows = static_cast<long double>(op.m);
  long double products =
      rows * static_cast<long double>(op.n) * static_cast<long double>(std::max<int64_t>(op.k, 1));
  if (IsAttention(op.kind)) {
    products = rows * static_cast<long double>(op.heads) * static_cast<long double>(op.head_dim) *
               static_cast<long double>(op.context);
  }
  if (products <= kMaxProducts) return;
  throw LineError{"op",
                  "m x n x k (or heads x head_dim x context per row) would overflow the "
                  "engine's 64-bit counters; at most 4e18 products per op"};
}

// Parses an op line; phase and step come from the enclosing step.
TraceOp ParseOp(const std::vector<std::string_view>& words, const TraceStep& step, int version) {
  static const std::vector<const char*> kKeys = {
      "layer",  "name",     "kind",    "tensor",       "weights",  "m",
      "n",      "k",        "heads",   "kv_heads",     "head_dim", "context",
      "causal", "act_bits", "kv_bits", "zero_fraction"};
  static const std::vector<const char*> kKeysV2 = {
      "layer",  "name",     "kind",    "tensor",        "weights",  "m",
      "n",      "k",        "heads",   "kv_heads",      "head_dim", "context",
      "causal", "act_bits", "kv_bits", "zero_fraction", "sequences"};
  const bool v2 = version >= kTraceVersionMixed;
  const Fields f("op", words, v2 ? kKeysV2 : kKeys);
  TraceOp op;
  op.phase = step.phase;
  op.step = step.step;
  op.layer = f.Int("layer", -1, kTraceMaxLayer - 1);
  op.name = std::string(f.Text("name"));
  op.kind = f.Enum("kind", ParseOpKind, AllowedOpKinds());
  op.tensor = f.Enum("tensor", ParseTensorClass, AllowedTensorClasses());
  if (op.tensor == TensorClass::kNone) {
    if (f.Text("weights") != kNoWeightsName) {
      throw LineError{"op.weights", "'" + std::string(f.Text("weights")) +
                                        "' is not allowed with tensor=none, allowed none"};
    }
  } else {
    op.weights = f.Enum("weights", ParseWeightFormat, AllowedWeightFormats());
  }
  op.m = f.Int("m", 1, kTraceMaxDim);
  op.n = f.Int("n", 1, kTraceMaxDim);
  op.k = f.Int("k", 0, kTraceMaxDim);
  op.heads = f.Int("heads", 0, kTraceMaxHeads);
  op.kv_heads = f.Int("kv_heads", 0, kTraceMaxHeads);
  op.head_dim = f.Int("head_dim", 0, kTraceMaxHeads);
  op.context = f.Int("context", 0, kTraceMaxContext);
  op.causal = f.Bool("causal");
  op.act_bits = f.OneOf("act_bits", kAllowedBits);
  op.kv_bits = f.OneOf("kv_bits", kAllowedBits);
  op.zero_fraction = f.Fraction("zero_fraction");
  if (v2) op.sequences = f.Int("sequences", 0, kTraceMaxBatch);
  CheckOpConsistency(op);
  CheckRowsMatchStep(op, step);
  CheckCountersFit(op);
  return op;
}

int ParseMagic(std::string_view line) {
  const std::vector<std::string_view> words = SplitWords(line);
  const std::string expected = std::string(kTraceMagic) + " " + std::to_string(kTraceVersion) +
                               "' or '" + kTraceMagic + " " + std::to_string(kTraceVersionMixed);
  if (words.empty() || words[0] != kTraceMagic) {
    throw LineError{"", "not a tritsim trace: the first line must be '" + expected + "'"};
  }
  int version = 0;
  const std::string_view text = words.size() == 2 ? words[1] : std::string_view();
  const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), version);
  if (ec != std::errc() || end != text.data() + text.size() || text.empty()) {
    throw LineError{"version", "'" + std::string(line) + "' is not a version line, expected '" +
                                   expected + "'"};
  }
  if (version != kTraceVersion && version != kTraceVersionMixed) {
    throw LineError{"version", "unsupported trace version " + std::to_string(version) +
                                   ", supported " + std::to_string(kTraceVersion) + " | " +
                                   std::to_string(kTraceVersionMixed)};
  }
  return version;
}

// ---------------------------------------------------------------- reader ---

// Reads a trace file line by line; holds one line and the current step.
class TraceFileReader : public TraceSource {
 public:
  explicit TraceFileReader(const std::string& path) : path_(path), in_(path, std::ios::binary) {
    std::error_code ec;
    if (std::filesystem::is_directory(path_, ec)) {
      throw InputError(path_, 0, "", "is a directory, not a trace file");
    }
    if (!in_) throw InputError(path_, 0, "", "cannot open trace file");
    Guard([this] { ReadHeader(); });
  }

  const TraceHeader& header() const override { return header_; }

  bool next(TraceRecord& record) override {
    bool more = false;
    Guard([&] { more = NextRecord(record); });
    return more;
  }

 private:
  // Runs `body`, turning a LineError into "FILE:LINE: key: message".
  template <typename Body>
  void Guard(Body body) {
    try {
      body();
    } catch (const LineError& e) {
      std::string message = e.message;
      if (!had_newline_ && !e.about_bytes)
        message = "truncated record (file ends mid-line): " + message;
      throw InputError(path_, LineNumber(), e.key, message);
    }
  }

  int LineNumber() const { return line_number_ > INT32_MAX ? INT32_MAX : int(line_number_); }

  // Reads the next raw line into line_ (at most kTraceMaxLineChars bytes,
  // without '\n' and a trailing '\r'). False at the end of the file.
  bool ReadRawLine() {
    std::streambuf& buf = *in_.rdbuf();
    line_.clear();
    int c = buf.sbumpc();
    if (c == std::char_traits<char>::eof()) return false;  // nothing cut short
    had_newline_ = false;
    ++line_number_;
    for (; c != std::char_traits<char>::eof(); c = buf.sbumpc()) {
      if (c == '\n') {
        had_newline_ = true;
        break;
      }
      if (line_.size() == kTraceMaxLineChars) {
        throw LineError{
            "", "line longer than " + std::to_string(kTraceMaxLineChars) + " characters", true};
      }
      line_.push_back(char(c));
    }
    if (!line_.empty() && line_.back() == '\r') line_.pop_back();
    CheckText(line_);
    return true;
  }

  // Next line that is neither blank nor a '#' comment, split into words.
  bool ReadRecordLine() {
    while (ReadRawLine()) {
      words_ = SplitWords(line_);
      if (!words_.empty() && words_[0][0] != '#') return true;
    }
    return false;
  }

  void ReadHeader() {
    if (!ReadRawLine()) throw LineError{"", "empty file, expected a tritsim trace"};
    header_.version = ParseMagic(line_);
    bool have_model = false, have_workload = false;
    while (!(have_model && have_workload)) {
      if (!ReadRecordLine()) throw LineError{"", "file ends inside the header"};
      if (words_[0] == "model") {
        header_.model = ParseModelName(have_model);
        have_model = true;
      } else if (words_[0] == "workload") {
        if (have_workload) throw LineError{"workload", "given twice"};
        header_.workload = ParseWorkload(words_);
        have_workload = true;
      } else {
        throw LineError{have_model ? "workload" : "model",
                        "missing header line before '" + std::string(words_[0]) + "'"};
      }
    }
  }

  // The model name is the rest of the line after "model ".
  std::string ParseModelName(bool seen) const {
    if (seen) throw LineError{"model", "given twice"};
    if (words_.size() < 2) throw LineError{"model", "missing model name"};
    const size_t start = size_t(words_[1].data() - line_.data());
    const std::string_view last = words_.back();
    return line_.substr(start, size_t(last.data() + last.size() - line_.data()) - start);
  }

  bool NextRecord(TraceRecord& record) {
    if (ended_) return false;
    if (!ReadRecordLine()) {
      throw LineError{"end", "file ends without the 'end' line (truncated trace?)"};
    }
    const std::string_view type = words_[0];
    if (type == "step") {
      record.is_step = true;
      record.step = ParseStep(words_, header_.version);
      CheckStepOrder(record.step);
      return true;
    }
    if (type == "op") {
      if (!in_step_) throw LineError{"op", "op before any step line"};
      record.is_step = false;
      record.op = ParseOp(words_, step_, header_.version);
      return true;
    }
    if (type == "end") return End();
    if (type == "model" || type == "workload") {
      throw LineError{std::string(type), "header line after the first step"};
    }
    throw LineError{
        "", "unknown record '" + std::string(type) + "', allowed step | op | end (or # comments)"};
  }

  // Prefill: only as the first step, index 0, header's prompt length.
  // Decode: indices 0, 1, 2, ... up to the header's count. Batch as header
  // (a mixed step: at most the header's batch).
  void CheckStepOrder(const TraceStep& s) {
    const WorkloadConfig& w = header_.workload;
    if (s.mixed() ? s.batch > w.batch : s.batch != w.batch) {
      throw LineError{"step.batch", std::to_string(s.batch) + " differs from the header's batch=" +
                                        std::to_string(w.batch)};
    }
    if (s.phase == Phase::kPrefill) {
      CheckPrefillStep(s);
    } else if (s.step != decode_steps_) {
      throw LineError{"step.index", "decode step " + std::to_string(s.step) +
                                        " out of order, expected " + std::to_string(decode_steps_)};
    } else if (decode_steps_ >= w.decode_tokens) {
      throw LineError{"step.index",
                      "decode step " + std::to_string(s.step) +
                          " beyond the header's decode=" + std::to_string(w.decode_tokens)};
    } else {
      ++decode_steps_;
    }
    in_step_ = true;
    step_ = s;
  }

  void CheckPrefillStep(const TraceStep& s) {
    const WorkloadConfig& w = header_.workload;
    if (in_step_) throw LineError{"step.phase", "prefill allowed only as the first step"};
    if (s.step != 0) {
      throw LineError{"step.index",
                      std::to_string(s.step) + " is not allowed, a prefill is step 0"};
    }
    // A mixed prefill's longest prompt chunk stands for the header's prefill.
    int64_t tokens = s.tokens;
    for (const SequenceSpan& span : s.mix) tokens = std::max(tokens, span.tokens);
    if (tokens != w.prefill_tokens) {
      throw LineError{s.mixed() ? "step.mix" : "step.tokens",
                      std::to_string(tokens) +
                          " differs from the header's prefill=" + std::to_string(w.prefill_tokens)};
    }
    saw_prefill_ = true;
  }

  // The 'end' line: the steps seen must be those the header announced.
  bool End() {
    const WorkloadConfig& w = header_.workload;
    if (words_.size() != 1) throw LineError{"end", "the end line takes no fields"};
    if (saw_prefill_ != (w.prefill_tokens > 0)) {
      throw LineError{"end", std::string("header says prefill=") +
                                 std::to_string(w.prefill_tokens) + " but the trace has " +
                                 (saw_prefill_ ? "a" : "no") + " prefill step"};
    }
    if (decode_steps_ != w.decode_tokens) {
      throw LineError{"end", "header says decode=" + std::to_string(w.decode_tokens) +
                                 " but the trace has " + std::to_string(decode_steps_) +
                                 " decode steps"};
    }
    if (ReadRecordLine()) throw LineError{"", "record after the 'end' line"};
    ended_ = true;
    return false;
  }

  std::string path_;
  std::ifstream in_;
  TraceHeader header_;
  std::string line_;                     // current line, without '\n'
  std::vector<std::string_view> words_;  // words of line_
  int64_t line_number_ = 0;
  bool had_newline_ = true;   // line_ ended with '\n'
  bool in_step_ = false;      // a step line has been read
  TraceStep step_;            // the current step
  int64_t decode_steps_ = 0;  // decode steps read so far
  bool saw_prefill_ = false;
  bool ended_ = false;  // the 'end' line has been read
};

}  // namespace

std::unique_ptr<TraceSource> OpenTraceFile(const std::string& path) {
  return std::make_unique<TraceFileReader>(path);
}

}  // namespace tritsim
