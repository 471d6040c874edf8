// Reads a sweep file (YAML, tritsim's own schema) into plain structs.
//
// Schema (docs/sweeps.md has the full description):
//   name: STRING                      required, labels the sweep
//   base:                             optional
//     arch: FILE                      relative to the sweep file's folder; absent: embedded default
//     model: FILE                     same
//     workload: {prefill, decode, context, batch}   integers; absent keys keep the run defaults
//   axes:                             map KEY -> values (exactly one of axes / points)
//     KEY: [v1, v2, ...]              a list of scalars
//     KEY: {from: A, to: B, step: S}  arithmetic range, inclusive of B when it lands on it
//     KEY: {from: A, to: B, factor: F}  geometric range (F > 1)
//   points:                           explicit list of maps KEY -> scalar
//   constraints:                      list of "KEY OP NUMBER", OP in < <= > >= == !=,
//                                     KEY an axis key or area_mm2
//   sampling: BOOL                    optional, default false: every point runs
//                                     tritsim run --sample (docs/performance.md)
// KEY is arch.<path> or model.<path> (an override of that file, checked
// later by loading it) or workload.prefill|decode|context|batch.
//
// This layer checks the sweep file's own shape (keys, types, ranges, the
// constraint grammar). Whether arch./model. keys and values exist in those
// files is checked by BuildSweepPlan (sim/sweep/sweep_plan.h), which loads
// every point. All failures throw tritsim::Error (ExitCode::kBadInput)
// as "FILE:LINE: KEY.PATH: message".
#pragma once

#include <string>
#include <vector>

#include "config/workload_config.h"

namespace tritsim {

// One axis: a key path and its values, in order, as YAML scalar text
// (passed verbatim to the run as --set KEY=VALUE or as a workload flag).
struct SweepAxis {
  std::string key;                  // e.g. "arch.array.trees", "workload.batch"
  int line = 0;                     // 1-based line of the key in the sweep file
  std::vector<std::string> values;  // at least one; no duplicates
};

// One setting of an explicit point.
struct SweepSetting {
  std::string key;    // as for SweepAxis::key
  std::string value;  // YAML scalar text
};

// An explicit point from `points:`.
struct SweepPointSpec {
  int line = 0;                        // 1-based line of the point's map
  std::vector<SweepSetting> settings;  // in file order, keys unique
};

enum class CompareOp { kLess, kLessEqual, kGreater, kGreaterEqual, kEqual, kNotEqual };

// "KEY OP NUMBER", e.g. "area_mm2 <= 50".
struct SweepConstraint {
  std::string text;  // as written, for messages
  int line = 0;      // 1-based line in the sweep file
  std::string key;   // an axis key or kAreaKey
  CompareOp op = CompareOp::kLessEqual;
  double number = 0.0;
};

// The constraint key that means the point's estimated area (EstimateArea).
inline constexpr const char* kAreaKey = "area_mm2";

// Upper bounds that keep a mistyped range from planning millions of runs.
inline constexpr size_t kMaxAxisValues = 1000;     // values of one axis
inline constexpr size_t kMaxSweepPoints = 100000;  // points before constraints

struct SweepFile {
  std::string path;             // the sweep file as given (names it in messages)
  std::string name;             // `name:`
  std::string arch_path;        // resolved against the sweep file's folder; "" = embedded default
  std::string model_path;       // same
  WorkloadConfig workload;      // base workload (run defaults where not given)
  std::vector<SweepAxis> axes;  // file order; empty when `points:` is used
  std::vector<SweepPointSpec> points;  // explicit points; empty when `axes:` is used
  std::vector<SweepConstraint> constraints;
  bool sampling = false;  // `sampling:`: points run sampled (run --sample)
};

// Reads and checks a sweep file. Throws tritsim::Error (kBadInput).
SweepFile LoadSweepFile(const std::string& path);

// Same, from text: `source_name` names it in messages, relative base paths
// resolve against `base_dir`.
SweepFile LoadSweepText(const std::string& text, const std::string& source_name,
                        const std::string& base_dir);

// True if `key` is one of the four workload keys (workload.prefill, ...).
bool IsWorkloadKey(const std::string& key);

// The candidate nearest to `word` (a few edits away), or "" if none is
// plausibly meant. For "did you mean" hints outside sim/config.
std::string NearestKey(const std::string& word, const std::vector<std::string>& candidates);

// Evaluates `value OP number`.
bool CompareHolds(CompareOp op, double value, double number);

}  // namespace tritsim
