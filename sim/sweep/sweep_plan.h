// A sweep plan: the ordered, filtered, validated list of design points a
// sweep file describes, each with a stable id. No SystemC here: points run
// as separate `tritsim run` processes (sweep_runner.h).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "config/config_loader.h"
#include "config/sweep_file.h"
#include "config/workload_config.h"
#include "sweep/sweep_identity.h"

namespace tritsim {

// One design point of the plan.
struct SweepPoint {
  size_t index = 0;  // 0-based position in the plan; shards take index mod N
  // "p" + zero-padded index + "-" + 8 hex digits of a hash of the point's
  // settings (FNV-1a). Stable for the same sweep file, so resume and merge
  // recognise a point; any change to a value changes the id.
  std::string id;
  std::vector<std::string> values;     // one per SweepPlan::axis_keys; "" = not set (points:)
  std::vector<SweepSetting> settings;  // the keys this point sets, in axis order
  WorkloadConfig workload;             // base workload with workload.* settings applied
  double area_mm2 = 0.0;               // EstimateArea of the point's architecture
  // Hash of everything that decides the point's result (sweep_identity.h);
  // unlike `id` it changes when a base file, the base workload or tritsim does.
  std::string input_hash;
  // Files of this point when they differ from the sweep file's base (set by
  // callers that run unlike points, such as studies); "" = plan.file's.
  std::string model_path;
  std::string arch_path;
};

struct SweepPlan {
  SweepFile file;
  std::vector<std::string> axis_keys;  // CSV axis columns: axes in file order (or point keys)
  std::vector<SweepPoint> points;      // in plan order (first axis slowest)
  size_t excluded = 0;                 // candidates removed by constraints
  SweepIdentity identity;              // sweep name, version, base-file hashes
};

// Expands the axes (Cartesian product, first axis slowest) or takes the
// explicit points, loads every candidate's architecture and model with its
// overrides (so an unknown key or bad value fails here, before anything
// runs), checks its workload, applies the constraints and numbers the
// survivors. Throws tritsim::Error (kBadInput) as
// "SWEEP:LINE: axes.KEY: point pNNNN (KEY=VALUE ...): <loader message>".
// Also throws if no point survives the constraints.
SweepPlan BuildSweepPlan(const SweepFile& file);

// The points of shard `shard` of `shards` (index mod shards == shard).
// REQUIRES: 0 <= shard < shards.
std::vector<const SweepPoint*> ShardPoints(const SweepPlan& plan, size_t shard, size_t shards);

// The arguments after the program name that run one point:
// run [--model M] [--arch A] [--set K=V ...]   (M, A: the point's own, else the plan's) --prefill
// .. --decode .. --context .. --batch ..
//     --json JSON_PATH -q [--sample]  (--sample when the sweep file says sampling: true)
std::vector<std::string> PointRunArgs(const SweepPlan& plan, const SweepPoint& point,
                                      const std::string& json_path);

// Splits settings into arch and model overrides, prefixes ("arch.",
// "model.") removed; workload keys are left out.
void SplitOverrides(const std::vector<SweepSetting>& settings, ConfigOverrides& arch,
                    ConfigOverrides& model);

// "KEY=VALUE KEY=VALUE" of the point's settings, for listings and messages.
std::string DescribePoint(const SweepPoint& point);

}  // namespace tritsim
