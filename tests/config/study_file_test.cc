// The study-file reader: shape, defaults, strictness (docs/studies.md).
#include "config/study_file.h"

#include <gtest/gtest.h>

#include "common/error.h"

namespace tritsim {
namespace {

const char* const kStudy = R"(name: s
reference: b
workload: {prefill: 4, decode: 2}
variants:
  - name: a
    model: m.yaml
    set: {model.layers: 2}
  - name: b
    arch: /abs/a.yaml
    workload: {decode: 5}
)";

std::string ErrorOf(const std::string& text) {
  try {
    LoadStudyText(text, "s.yaml", "dir");
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    return e.what();
  }
  return "";
}

TEST(StudyFile, ReadsVariantsWorkloadsAndReference) {
  const StudyFile f = LoadStudyText(kStudy, "s.yaml", "dir");
  ASSERT_EQ(f.variants.size(), 2u);
  EXPECT_EQ(f.reference_index, 1u);
  EXPECT_EQ(f.variants[0].model_path, "dir/m.yaml");  // relative to the study's folder
  EXPECT_EQ(f.variants[1].arch_path, "/abs/a.yaml");
  EXPECT_EQ(f.variants[0].settings.at(0).key, "model.layers");
  EXPECT_EQ(f.variants[0].workload.decode_tokens, 2);
  EXPECT_EQ(f.variants[1].workload.decode_tokens, 5);  // the variant's own key wins
  EXPECT_EQ(f.variants[1].workload.prefill_tokens, 4);
}

TEST(StudyFile, UnknownKeysNameTheNearest) {
  std::string text = kStudy;
  text.replace(text.find("set:"), 4, "sets:");
  EXPECT_NE(ErrorOf(text).find("variants[0].sets: unknown key; did you mean 'set'?"),
            std::string::npos);
  EXPECT_NE(ErrorOf("name: s\nreferense: a\n").find("did you mean 'reference'?"),
            std::string::npos);
}

TEST(StudyFile, ReferenceMustNameAVariant) {
  std::string text = kStudy;
  text.replace(text.find("reference: b"), 12, "reference: c");
  EXPECT_NE(ErrorOf(text).find("reference: 'c' is not a variant"), std::string::npos);
}

TEST(StudyFile, RejectsDuplicatesBadNamesAndBadSetKeys) {
  std::string dup = kStudy;
  dup.replace(dup.find("name: b"), 7, "name: a");
  EXPECT_NE(ErrorOf(dup).find("duplicate variant name 'a'"), std::string::npos);
  std::string spaced = kStudy;
  spaced.replace(spaced.find("name: a"), 7, "name: 'a b'");
  EXPECT_NE(ErrorOf(spaced).find("variants[0].name"), std::string::npos);
  std::string key = kStudy;
  key.replace(key.find("model.layers"), 12, "layers");
  EXPECT_NE(ErrorOf(key).find("a key is arch.<key> or model.<key>"), std::string::npos);
}

TEST(StudyFile, NeedsTwoVariantsAndCountsInRange) {
  EXPECT_NE(ErrorOf("name: s\nreference: a\nvariants: [{name: a}]\n").find("2 to 32"),
            std::string::npos);
  std::string neg = kStudy;
  neg.replace(neg.find("decode: 5"), 9, "decode: -1");
  EXPECT_NE(ErrorOf(neg).find("variants[1].workload.decode"), std::string::npos);
}

}  // namespace
}  // namespace tritsim
