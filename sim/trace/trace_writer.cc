#include "trace/trace_writer.h"

#include <string>

#include "common/error.h"
#include "trace/trace_format.h"

namespace tritsim {
namespace {

// Comment the writer puts after the magic line; the reader skips it, so
// read -> write still gives the same bytes.
constexpr const char* kWriterComment = "# tritsim layer trace, format: docs/trace-format.md";

// A token is written bare after "key=", so it must not contain separators.
bool IsPlainToken(const std::string& text) {
  if (text.empty()) return false;
  for (unsigned char c : text) {
    if (c <= ' ' || c == '=' || c == '#' || c == 0x7f) return false;
  }
  return true;
}

// The model name is the rest of its line: any text without control bytes.
bool IsPrintableLine(const std::string& text) {
  if (text.empty()) return false;
  for (unsigned char c : text) {
    if (c < ' ' || c == 0x7f) return false;
  }
  return text.front() != ' ' && text.back() != ' ';
}

void AddField(std::string& line, const char* key, const std::string& value) {
  line += ' ';
  line += key;
  line += '=';
  line += value;
}

void AddField(std::string& line, const char* key, int64_t value) {
  AddField(line, key, std::to_string(value));
}

std::string HeaderText(const TraceHeader& header) {
  if (!IsPrintableLine(header.model)) {
    throw Error(ExitCode::kInternal,
                "trace writer: model name '" + header.model +
                    "' cannot be written (empty, control characters or edge spaces)");
  }
  const WorkloadConfig& w = header.workload;
  std::string text = std::string(kTraceMagic) + " " + std::to_string(header.version) + "\n";
  text += std::string(kWriterComment) + "\n";
  text += "model " + header.model + "\n";
  text += "workload";
  AddField(text, "prefill", w.prefill_tokens);
  AddField(text, "decode", w.decode_tokens);
  AddField(text, "context", w.context_tokens);
  AddField(text, "batch", w.batch);
  return text + "\n";
}

// "T@C,T@C,...": each sequence's new tokens and context.
std::string MixText(const std::vector<SequenceSpan>& mix) {
  std::string text;
  for (const SequenceSpan& s : mix) {
    if (!text.empty()) text += ',';
    text += std::to_string(s.tokens) + "@" + std::to_string(s.context);
  }
  return text;
}

std::string StepLine(const TraceStep& step) {
  std::string line = "step";
  AddField(line, "phase", PhaseName(step.phase));
  AddField(line, "index", step.step);
  if (step.mixed()) {
    AddField(line, "batch", step.batch);
    AddField(line, "mix", MixText(step.mix));
    return line + "\n";
  }
  AddField(line, "tokens", step.tokens);
  AddField(line, "batch", step.batch);
  AddField(line, "context", step.context);
  return line + "\n";
}

std::string OpLine(const TraceOp& op, int version) {
  if (!IsPlainToken(op.name)) {
    throw Error(ExitCode::kInternal, "trace writer: op name '" + op.name +
                                         "' cannot be written (empty, spaces, '=' or '#')");
  }
  const bool no_weights = op.tensor == TensorClass::kNone;
  std::string line = "op";
  AddField(line, "layer", op.layer);
  AddField(line, "name", op.name);
  AddField(line, "kind", OpKindName(op.kind));
  AddField(line, "tensor", TensorClassName(op.tensor));
  AddField(line, "weights", no_weights ? kNoWeightsName : WeightFormatName(op.weights));
  AddField(line, "m", op.m);
  AddField(line, "n", op.n);
  AddField(line, "k", op.k);
  AddField(line, "heads", op.heads);
  AddField(line, "kv_heads", op.kv_heads);
  AddField(line, "head_dim", op.head_dim);
  AddField(line, "context", op.context);
  AddField(line, "causal", op.causal ? "true" : "false");
  if (version >= kTraceVersionMixed) AddField(line, "sequences", op.sequences);
  AddField(line, "act_bits", op.act_bits);
  AddField(line, "kv_bits", op.kv_bits);
  AddField(line, "zero_fraction", FormatTraceDouble(op.zero_fraction));
  return line + "\n";
}

// Ops carry no phase or step in the file: they inherit the step line's. A
// source whose op disagrees with its step cannot be written faithfully.
void CheckOpInStep(const TraceOp& op, const TraceStep* step) {
  if (step == nullptr) {
    throw Error(ExitCode::kInternal, "trace writer: op '" + op.name + "' before any step");
  }
  if (op.phase != step->phase || op.step != step->step) {
    throw Error(ExitCode::kInternal, "trace writer: op '" + op.name + "' claims " +
                                         PhaseName(op.phase) + " step " + std::to_string(op.step) +
                                         " inside " + PhaseName(step->phase) + " step " +
                                         std::to_string(step->step));
  }
}

}  // namespace

void WriteTrace(TraceSource& source, std::ostream& out) {
  const int version = source.header().version;
  if (version != kTraceVersion && version != kTraceVersionMixed) {
    throw Error(ExitCode::kInternal, "trace writer: unknown version " + std::to_string(version));
  }
  out << HeaderText(source.header());
  TraceRecord record;
  TraceStep current;
  bool in_step = false;
  while (source.next(record)) {
    if (record.is_step) {
      if (record.step.mixed() && version < kTraceVersionMixed) {
        throw Error(ExitCode::kInternal, "trace writer: a mixed step needs trace version 2");
      }
      current = record.step;
      in_step = true;
      out << StepLine(record.step);
    } else {
      CheckOpInStep(record.op, in_step ? &current : nullptr);
      out << OpLine(record.op, version);
    }
  }
  out << "end\n";
}

}  // namespace tritsim
