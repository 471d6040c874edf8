// A study plan: the variants of a study file, each loaded and checked, as
// the points of a sweep plan so the sweep's child-process runner and CSV
// journal run them (one `tritsim run` process per variant; resumable).
// No SystemC here.
#pragma once

#include <string>
#include <vector>

#include "config/study_file.h"
#include "sweep/sweep_plan.h"

namespace tritsim {

// What a variant implies before it runs (from its loaded configs).
struct VariantFacts {
  std::string model_name;     // model `name:` after overrides
  std::string arch_name;      // arch `name:` after overrides
  double weight_bytes = 0.0;  // every weight as the design stores it (WeightBytesOn)
  // KV cache at the end of the workload: kv_bytes_per_token * batch *
  // (context + prefill + decode).
  double kv_bytes = 0.0;
  double area_mm2 = 0.0;  // EstimateArea
};

struct StudyPlan {
  StudyFile file;
  // One point per variant, in file order: values = {variant name}, the
  // variant's own model and arch files, its `set:` keys as settings.
  SweepPlan runs;
  std::vector<VariantFacts> facts;  // parallel to file.variants
};

// The CSV axis column naming a run's variant.
inline constexpr const char* kVariantColumn = "variant";

// Loads every variant's model and architecture with its overrides and
// checks its workload, so a bad key or value fails before anything runs.
// Throws tritsim::Error (kBadInput) "STUDY:LINE: variants[i]: variant NAME:
// <loader message>". Point ids are "v" + index + "-" + a hash (FNV-1a) of
// the variant's name, files (paths and contents), settings and workload:
// any change to a variant changes its id, so it runs again.
StudyPlan BuildStudyPlan(const StudyFile& file);

}  // namespace tritsim
