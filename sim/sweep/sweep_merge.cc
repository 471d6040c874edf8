// Shard merging. See sweep_merge.h.
#include "sweep/sweep_merge.h"

#include <algorithm>
#include <map>

#include "common/error.h"
#include "sweep/sweep_csv.h"
#include "sweep/sweep_identity.h"

namespace tritsim {
namespace {

constexpr size_t kMaxListedIds = 5;  // ids quoted per kind of problem

// "N WHAT (id, id, ...)" with the ids in point order, or "" for none.
std::string ListIds(const std::string& what, std::vector<std::string> ids) {
  if (ids.empty()) return "";
  std::sort(ids.begin(), ids.end());
  std::string out = std::to_string(ids.size()) + " " + what + " (";
  for (size_t i = 0; i < ids.size() && i < kMaxListedIds; ++i) out += (i ? ", " : "") + ids[i];
  if (ids.size() > kMaxListedIds) out += ", ...";
  return out + ")";
}

// How to go on when a shard belongs to other inputs.
std::string MergeHint(const SweepPlan& plan) {
  return "this shard was not run from " + plan.file.path +
         " as it is now; nothing written (re-run the shards with it, or merge with the sweep "
         "file they were run from)";
}

}  // namespace

std::string MergeShardCsvs(const SweepPlan& plan, const std::vector<std::string>& shard_paths) {
  const std::vector<std::string> header = SweepCsvHeader(plan.axis_keys);
  std::map<std::string, size_t> index_of;
  for (const SweepPoint& p : plan.points) index_of[p.id] = p.index;
  std::vector<std::vector<std::string>> rows(plan.points.size());
  std::vector<std::string> duplicated, unknown;
  for (const std::string& path : shard_paths) {
    const CsvTable table = ReadCsvFile(path);
    CheckRowsBelong(plan, table, path, MergeHint(plan));
    for (const std::vector<std::string>& row : table.rows) {
      auto it = index_of.find(row.front());
      if (it == index_of.end()) {
        unknown.push_back(row.front());
      } else if (!rows[it->second].empty()) {
        duplicated.push_back(row.front());
      } else {
        rows[it->second] = row;
      }
    }
  }
  std::vector<std::string> missing;
  for (const SweepPoint& p : plan.points) {
    if (rows[p.index].empty()) missing.push_back(p.id);
  }
  if (!missing.empty() || !duplicated.empty() || !unknown.empty()) {
    std::string problems;
    for (const std::string& part : {ListIds("missing", missing), ListIds("duplicated", duplicated),
                                    ListIds("not in the sweep", unknown)}) {
      if (!part.empty()) problems += (problems.empty() ? "" : "; ") + part;
    }
    throw InputError(plan.file.path, 0, "",
                     "shards do not cover the sweep's " + std::to_string(plan.points.size()) +
                         " points exactly once: " + problems);
  }
  std::string text = CsvLine(header);
  for (const std::vector<std::string>& row : rows) text += CsvLine(row);
  return text;
}

}  // namespace tritsim
