// Words with units for the columns of a sweep CSV (docs/sweeps.md), for
// axis labels and table headers: "throughput, whole run (tokens per
// second)" rather than "tokens_per_second".
#pragma once

#include <string>

namespace tritsim {

// The label of a metric or axis column; a column it does not know keeps
// its key, with underscores as spaces ("arch.vector.lanes" -> "vector
// lanes (arch.vector.lanes)").
std::string ColumnWords(const std::string& column);

}  // namespace tritsim
