// Reads a study file (YAML, tritsim's own schema): a few named variants to
// compare side by side against one of them, the reference.
//
// Schema (docs/studies.md has the full description):
//   name: STRING                 required, labels the study
//   reference: NAME              required, the name of one variant
//   workload: {prefill, decode, context, batch}   optional; the study's
//                                workload (absent keys keep the run defaults)
//   variants:                    required, a list of 2 to kMaxStudyVariants maps:
//     - name: NAME               required, unique; letters, digits, '.', '_', '-'
//       model: FILE              relative to the study file's folder; absent: embedded default
//       arch: FILE               same
//       set: {KEY: VALUE, ...}   overrides as `tritsim run --set`: arch.<key> or model.<key>
//       workload: {...}          keys that differ from the study's workload
//
// This layer checks the study file's own shape (keys, types, names, the
// reference). Whether set keys and values exist in the model and
// architecture files is checked by BuildStudyPlan (sim/study/study_plan.h),
// which loads every variant. Every failure throws tritsim::Error
// (ExitCode::kBadInput) as "FILE:LINE: KEY.PATH: message"; an unknown key
// names the nearest known one.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "config/sweep_file.h"
#include "config/workload_config.h"

namespace tritsim {

inline constexpr size_t kMaxStudyVariants = 32;  // a comparison, not a sweep
inline constexpr size_t kMaxVariantNameChars = 40;

struct StudyVariant {
  std::string name;                    // unique within the study
  int line = 0;                        // 1-based line of the variant's map
  std::string model_path;              // resolved against the study's folder; "" = default
  std::string arch_path;               // same
  std::vector<SweepSetting> settings;  // `set:` in file order: arch.<key> / model.<key>
  WorkloadConfig workload;             // the study's workload with the variant's keys over it
};

struct StudyFile {
  std::string path;                    // the study file as given (names it in messages)
  std::string name;                    // `name:`
  std::string reference;               // `reference:`, a variant name
  size_t reference_index = 0;          // its position in `variants`
  WorkloadConfig workload;             // the study's workload
  std::vector<StudyVariant> variants;  // file order
};

// Reads and checks a study file. Throws tritsim::Error (kBadInput).
StudyFile LoadStudyFile(const std::string& path);

// Same, from text: `source_name` names it in messages, relative paths
// resolve against `base_dir`.
StudyFile LoadStudyText(const std::string& text, const std::string& source_name,
                        const std::string& base_dir);

}  // namespace tritsim
