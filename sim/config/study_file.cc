// Study file reader. See study_file.h.
#include "config/study_file.h"

#include <algorithm>
#include <charconv>
#include <filesystem>

#include "common/error.h"
#include "config/yaml_reader.h"

namespace tritsim {
namespace {

using config_internal::Document;
using config_internal::IntRule;
using config_internal::NearestWord;
using config_internal::Schema;
using config_internal::Section;

// Largest workload figure a study may name; each variant's run checks the
// real limits (ValidateWorkload) when the plan loads it.
constexpr int64_t kMaxWorkloadValue = int64_t(1) << 40;
const std::vector<std::string> kWorkloadKeys = {"prefill", "decode", "context", "batch"};
const std::vector<std::string> kVariantKeys = {"name", "model", "arch", "set", "workload"};

const Schema& StudySchema() {
  static const Schema schema{{"name", "reference", "workload.prefill", "workload.decode",
                              "workload.context", "workload.batch", "variants"},
                             {}};
  return schema;
}

int LineOf(const YAML::Node& node) {
  const int line = node.Mark().line;
  return line < 0 ? 0 : line + 1;
}

bool IsNameChar(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '.' ||
         c == '_' || c == '-';
}

// The workload field a key of kWorkloadKeys sets.
int64_t& WorkloadField(WorkloadConfig& w, const std::string& key) {
  if (key == "prefill") return w.prefill_tokens;
  if (key == "decode") return w.decode_tokens;
  if (key == "context") return w.context_tokens;
  return w.batch;
}

// Reads a whole study document; holds the source name for messages.
class StudyReader {
 public:
  StudyReader(const std::string& text, const std::string& source, const std::string& base_dir)
      : doc_(text, source, StudySchema()), source_(source), base_dir_(base_dir) {}

  StudyFile Read() {
    StudyFile file;
    file.path = source_;
    const Section top(doc_, doc_.root(), "");
    if (!top.Has("name")) Fail("name", 0, "missing; give the study a name");
    if (!top.Has("reference")) Fail("reference", 0, "missing; name the variant to compare against");
    top.ReadString("name", file.name);
    top.ReadString("reference", file.reference);
    ReadWorkload(doc_.root()["workload"], "workload", file.workload);
    file.variants = ReadVariants(doc_.root()["variants"], file.workload);
    file.reference_index = ReferenceIndex(file, top);
    return file;
  }

 private:
  [[noreturn]] void Fail(const std::string& key, int line, const std::string& message) const {
    throw InputError(source_, line, key, message);
  }

  std::string Resolve(const std::string& path) const {
    if (path.empty() || std::filesystem::path(path).is_absolute()) return path;
    return (std::filesystem::path(base_dir_) / path).lexically_normal().string();
  }

  // Every key of `map` must be one of `known` (else the nearest is named).
  void CheckKeys(const YAML::Node& map, const std::vector<std::string>& known,
                 const std::string& path) const {
    for (auto it = map.begin(); it != map.end(); ++it) {
      const std::string key = it->first.IsScalar() ? it->first.Scalar() : "";
      if (std::find(known.begin(), known.end(), key) != known.end()) continue;
      const std::string near = NearestWord(key, known);
      std::string list;
      for (const std::string& k : known) list += (list.empty() ? "" : ", ") + k;
      Fail(path + "." + key, LineOf(it->first),
           near.empty() ? "unknown key; known keys here: " + list
                        : "unknown key; did you mean '" + near + "'?");
    }
  }

  std::string Text(const YAML::Node& value, const std::string& path) const {
    if (!value.IsScalar() || value.Scalar().empty()) {
      Fail(path, LineOf(value), "must be a single name or number");
    }
    return value.Scalar();
  }

  int64_t Count(const YAML::Node& value, const std::string& path, int64_t lo) const {
    const std::string text = Text(value, path);
    int64_t out = 0;
    const auto r = std::from_chars(text.data(), text.data() + text.size(), out);
    if (r.ec != std::errc() || r.ptr != text.data() + text.size() || out < lo ||
        out > kMaxWorkloadValue) {
      Fail(path, LineOf(value),
           "must be an integer in [" + std::to_string(lo) + ", 2^40], got " + text);
    }
    return out;
  }

  // A workload map over `w` (absent: `w` unchanged).
  void ReadWorkload(const YAML::Node& node, const std::string& path, WorkloadConfig& w) const {
    if (!node.IsDefined() || node.IsNull()) return;
    if (!node.IsMap()) Fail(path, LineOf(node), "must be a map of prefill, decode, context, batch");
    CheckKeys(node, kWorkloadKeys, path);
    for (const std::string& key : kWorkloadKeys) {
      if (node[key].IsDefined()) {
        WorkloadField(w, key) = Count(node[key], path + "." + key, key == "batch" ? 1 : 0);
      }
    }
  }

  std::vector<StudyVariant> ReadVariants(const YAML::Node& list,
                                         const WorkloadConfig& workload) const {
    if (!list.IsDefined()) Fail("variants", 0, "missing; list the variants to compare");
    if (!list.IsSequence() || list.size() < 2 || list.size() > kMaxStudyVariants) {
      Fail("variants", LineOf(list),
           "must be a list of 2 to " + std::to_string(kMaxStudyVariants) + " variant maps");
    }
    std::vector<StudyVariant> out;
    for (size_t i = 0; i < list.size(); ++i) {
      out.push_back(ReadVariant(list[i], "variants[" + std::to_string(i) + "]", workload));
      for (size_t j = 0; j < i; ++j) {
        if (out[j].name == out[i].name) {
          Fail("variants[" + std::to_string(i) + "].name", out[i].line,
               "duplicate variant name '" + out[i].name + "' (first on line " +
                   std::to_string(out[j].line) + ")");
        }
      }
    }
    return out;
  }

  StudyVariant ReadVariant(const YAML::Node& node, const std::string& path,
                           const WorkloadConfig& workload) const {
    if (!node.IsMap()) Fail(path, LineOf(node), "must be a map with name, model, arch, set");
    CheckKeys(node, kVariantKeys, path);
    StudyVariant v;
    v.line = LineOf(node);
    if (!node["name"].IsDefined()) Fail(path + ".name", v.line, "missing; name the variant");
    v.name = VariantName(node["name"], path + ".name");
    if (node["model"].IsDefined()) v.model_path = Resolve(Text(node["model"], path + ".model"));
    if (node["arch"].IsDefined()) v.arch_path = Resolve(Text(node["arch"], path + ".arch"));
    v.settings = ReadSet(node["set"], path + ".set");
    v.workload = workload;
    ReadWorkload(node["workload"], path + ".workload", v.workload);
    return v;
  }

  std::string VariantName(const YAML::Node& node, const std::string& path) const {
    const std::string name = Text(node, path);
    const bool ok =
        name.size() <= kMaxVariantNameChars && std::all_of(name.begin(), name.end(), IsNameChar);
    if (!ok) {
      Fail(path, LineOf(node),
           "must be 1 to 40 letters, digits, '.', '_' or '-', got '" + name + "'");
    }
    return name;
  }

  // `set:` as a map KEY: VALUE; each KEY arch.<key> or model.<key>.
  std::vector<SweepSetting> ReadSet(const YAML::Node& node, const std::string& path) const {
    std::vector<SweepSetting> out;
    if (!node.IsDefined() || node.IsNull()) return out;
    if (!node.IsMap())
      Fail(path, LineOf(node), "must be a map of arch.<key> or model.<key>: value");
    for (auto it = node.begin(); it != node.end(); ++it) {
      const std::string key = Text(it->first, path);
      const bool prefixed = (key.rfind("arch.", 0) == 0 && key.size() > 5) ||
                            (key.rfind("model.", 0) == 0 && key.size() > 6);
      if (!prefixed) {
        Fail(path + "." + key, LineOf(it->first),
             "unknown key; a key is arch.<key> or model.<key> (workload goes under workload:)");
      }
      out.push_back({key, Text(it->second, path + "." + key)});
    }
    return out;
  }

  size_t ReferenceIndex(const StudyFile& file, const Section& top) const {
    std::vector<std::string> names;
    for (const StudyVariant& v : file.variants) names.push_back(v.name);
    const auto it = std::find(names.begin(), names.end(), file.reference);
    if (it != names.end()) return size_t(it - names.begin());
    const std::string near = NearestWord(file.reference, names);
    top.FailAt("reference", "'" + file.reference + "' is not a variant" +
                                (near.empty() ? "" : "; did you mean '" + near + "'?"));
  }

  Document doc_;
  std::string source_;
  std::string base_dir_;
};

}  // namespace

StudyFile LoadStudyText(const std::string& text, const std::string& source_name,
                        const std::string& base_dir) {
  try {
    return StudyReader(text, source_name, base_dir).Read();
  } catch (const Error&) {
    throw;
  } catch (const YAML::Exception& e) {
    throw InputError(source_name, e.mark.line < 0 ? 0 : e.mark.line + 1, "", e.msg);
  }
}

StudyFile LoadStudyFile(const std::string& path) {
  const std::string text = config_internal::ReadConfigFile(path);
  const std::string dir = std::filesystem::path(path).parent_path().string();
  return LoadStudyText(text, path, dir.empty() ? "." : dir);
}

}  // namespace tritsim
