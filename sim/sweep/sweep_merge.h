// Merging shard CSVs of one sweep into a single CSV.
#pragma once

#include <string>
#include <vector>

#include "sweep/sweep_plan.h"

namespace tritsim {

// Reads every shard CSV (each must hold rows of this plan's inputs only,
// CheckRowsBelong in sweep_identity.h; a torn final line is ignored), checks that every point of
// `plan` appears exactly once over all shards and no row names a point outside the plan, and
// returns the merged CSV text: the header, then the rows ordered by point index. Throws
// tritsim::Error (kBadInput) listing the missing, duplicated and unknown ids (first few of each,
// with counts).
std::string MergeShardCsvs(const SweepPlan& plan, const std::vector<std::string>& shard_paths);

}  // namespace tritsim
