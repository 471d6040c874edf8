// Sweep row identity: base-file hashes, resolved-input hashes and the resume
// / merge check. See sweep_identity.h.
#include "sweep/sweep_identity.h"

#include <map>

#include "common/error.h"
#include "common/fnv1a.h"
#include "config/embedded_defaults.h"
#include "config/yaml_reader.h"
#include "sweep/sweep_csv.h"
#include "sweep/sweep_plan.h"

namespace tritsim {
namespace {

constexpr const char* kInputHashColumn = "input_hash";

// Bytes of a base file, or of the embedded default when no file is named.
std::string BaseText(const std::string& path, const char* embedded) {
  return path.empty() ? std::string(embedded) : config_internal::ReadConfigFile(path);
}

std::string Join(const std::vector<std::string>& items) {
  std::string out;
  for (const std::string& s : items) out += (out.empty() ? "" : ", ") + s;
  return out.empty() ? "none" : out;
}

// Columns between id and status: the axis keys.
std::vector<std::string> AxesOf(const std::vector<std::string>& header) {
  std::vector<std::string> axes;
  for (size_t i = 1; i < header.size() && header[i] != "status"; ++i) {
    axes.push_back(header[i]);
  }
  return axes;
}

// Why the CSV's header is not this sweep's.
std::string HeaderDifference(const std::vector<std::string>& expected,
                             const std::vector<std::string>& found) {
  bool has_hash = false;
  for (const std::string& c : found) has_hash = has_hash || c == kInputHashColumn;
  if (!has_hash) {
    return "no input_hash column: written by an older tritsim or not a sweep CSV, so its rows "
           "cannot be checked against this sweep's inputs";
  }
  if (AxesOf(expected) != AxesOf(found)) {
    return "axis columns differ: the CSV has " + Join(AxesOf(found)) + "; this sweep has " +
           Join(AxesOf(expected));
  }
  return "columns differ from this sweep's (" + std::to_string(found.size()) + " in the CSV, " +
         std::to_string(expected.size()) + " expected)";
}

// Column positions of a header equal to SweepCsvHeader(axis_keys).
struct Columns {
  size_t sweep = 0, version = 0, arch = 0, model = 0, workload = 0, input = 0;
};

Columns ColumnsOf(const std::vector<std::string>& header) {
  Columns c;
  const size_t base = header.size() - IdentityColumns().size();
  c.sweep = base;
  c.version = base + 1;
  c.arch = base + 2;
  c.model = base + 3;
  c.workload = base + 4;
  c.input = base + 5;
  return c;
}

// "WHAT: the CSV has A, this sweep B" or "" when equal.
std::string Differs(const std::string& what, const std::string& in_csv, const std::string& now) {
  if (in_csv == now) return "";
  return what + ": '" + in_csv + "' in the CSV, '" + now + "' now";
}

std::string BaseFileName(const std::string& path) {
  return path.empty() ? "embedded default" : path;
}

// What differs between a row and the sweep-wide identity, or "".
std::string SweepWideDifference(const SweepPlan& plan, const std::vector<std::string>& row,
                                const Columns& c) {
  const SweepIdentity& id = plan.identity;
  for (const std::string& d :
       {Differs("sweep name", row[c.sweep], id.sweep),
        Differs("tritsim version", row[c.version], id.tritsim_version),
        Differs("base.arch (" + BaseFileName(plan.file.arch_path) + ") changed: content hash",
                row[c.arch], id.arch_file_hash),
        Differs("base.model (" + BaseFileName(plan.file.model_path) + ") changed: content hash",
                row[c.model], id.model_file_hash)}) {
    if (!d.empty()) return d;
  }
  return "";
}

// For a row whose id is not in the plan: the axis whose value changed, when
// the plan has a point at the same position.
std::string UnknownPointDifference(const SweepPlan& plan, const std::vector<std::string>& row,
                                   const std::map<std::string, const SweepPoint*>& by_prefix) {
  const std::string& id = row.front();
  const auto it = by_prefix.find(id.substr(0, id.find('-')));
  if (it != by_prefix.end()) {
    for (size_t k = 0; k < plan.axis_keys.size(); ++k) {
      const std::string d = Differs("axis " + plan.axis_keys[k] + " of point " + id, row[1 + k],
                                    it->second->values[k]);
      if (!d.empty()) return d;
    }
  }
  return "point " + id + " is not in this sweep (" + std::to_string(plan.points.size()) +
         " points; the axes or constraints changed)";
}

// What differs between a row and its point of the plan, or "".
std::string PointDifference(const SweepPlan& plan, const SweepPoint& p,
                            const std::vector<std::string>& row, const Columns& c) {
  const std::string w = Differs("workload of point " + p.id + " (base.workload changed)",
                                row[c.workload], WorkloadText(p.workload));
  if (!w.empty()) return w;
  return Differs("resolved inputs of point " + p.id + " (input_hash)", row[c.input],
                 IdentityFields(plan, p).back());
}

}  // namespace

const std::vector<std::string>& IdentityColumns() {
  static const std::vector<std::string> columns = {"sweep",          "tritsim_version",
                                                   "arch_file_hash", "model_file_hash",
                                                   "workload",       kInputHashColumn};
  return columns;
}

SweepIdentity IdentityOf(const SweepFile& file) {
  SweepIdentity id;
  id.sweep = file.name;
  id.tritsim_version = TRITSIM_VERSION;
  id.arch_file_hash = Hex64(Fnv1a64(BaseText(file.arch_path, kDefaultArchYaml)));
  id.model_file_hash = Hex64(Fnv1a64(BaseText(file.model_path, kDefaultModelYaml)));
  id.sampling = file.sampling;
  return id;
}

std::string WorkloadText(const WorkloadConfig& w) {
  return "prefill=" + std::to_string(w.prefill_tokens) +
         " decode=" + std::to_string(w.decode_tokens) +
         " context=" + std::to_string(w.context_tokens) + " batch=" + std::to_string(w.batch);
}

std::string InputHash(const SweepIdentity& id, const std::vector<SweepSetting>& settings,
                      const WorkloadConfig& workload) {
  uint64_t h = Fnv1a64("tritsim " + id.tritsim_version + "\n");
  h = Fnv1a64("arch " + id.arch_file_hash + "\nmodel " + id.model_file_hash + "\n", h);
  for (const SweepSetting& s : settings) h = Fnv1a64("set " + s.key + "=" + s.value + "\n", h);
  if (id.sampling) h = Fnv1a64("sampling\n", h);  // absent when exact: older hashes hold
  return Hex64(Fnv1a64("workload " + WorkloadText(workload) + "\n", h));
}

std::vector<std::string> IdentityFields(const SweepPlan& plan, const SweepPoint& point) {
  const SweepIdentity& id = plan.identity;
  return {id.sweep,           id.tritsim_version,           id.arch_file_hash,
          id.model_file_hash, WorkloadText(point.workload), point.input_hash};
}

void CheckRowsBelong(const SweepPlan& plan, const CsvTable& table, const std::string& csv,
                     const std::string& hint) {
  const std::vector<std::string> header = SweepCsvHeader(plan.axis_keys);
  if (table.header != header) {
    throw InputError(csv, 1, "", HeaderDifference(header, table.header) + "; " + hint);
  }
  const Columns c = ColumnsOf(header);
  std::map<std::string, const SweepPoint*> by_id, by_prefix;
  for (const SweepPoint& p : plan.points) {
    by_id[p.id] = &p;
    by_prefix[p.id.substr(0, p.id.find('-'))] = &p;
  }
  for (size_t i = 0; i < table.rows.size(); ++i) {
    const std::vector<std::string>& row = table.rows[i];
    std::string d = SweepWideDifference(plan, row, c);
    const auto it = by_id.find(row.front());
    if (d.empty()) {
      d = it == by_id.end() ? UnknownPointDifference(plan, row, by_prefix)
                            : PointDifference(plan, *it->second, row, c);
    }
    if (!d.empty()) throw InputError(csv, int(i) + 2, "", d + "; " + hint);
  }
}

}  // namespace tritsim
