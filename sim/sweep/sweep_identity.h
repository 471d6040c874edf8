// What a sweep row's result was computed from, so that --resume and merge
// never keep a row that belongs to other inputs.
//
// Every row ends with these columns (after json_path):
//   sweep            the sweep's `name:`
//   tritsim_version  the version of the tritsim that ran the point
//   arch_file_hash   FNV-1a 64 (16 hex digits) of the base architecture file's
//                    bytes; of the embedded default's YAML text when absent
//   model_file_hash  same for the base model file
//   workload         the point's resolved workload, "prefill=P decode=D context=C batch=B"
//   input_hash       FNV-1a 64 of all of the above that decides the result:
//                    version, both file hashes, every override (KEY=VALUE, in
//                    axis order) and the workload; docs/sweeps.md gives the bytes
#pragma once

#include <string>
#include <vector>

#include "config/sweep_file.h"
#include "config/workload_config.h"

namespace tritsim {

struct CsvTable;
struct SweepPlan;
struct SweepPoint;

// The inputs shared by every point of a sweep.
struct SweepIdentity {
  std::string sweep;            // name:
  std::string tritsim_version;  // TRITSIM_VERSION
  std::string arch_file_hash;   // 16 hex digits
  std::string model_file_hash;  // 16 hex digits
  bool sampling = false;        // the sweep file's sampling: (part of each input hash when true)
};

// The identity column names, in order.
const std::vector<std::string>& IdentityColumns();

// Hashes the base files of `file` (read again from disk). Throws
// tritsim::Error (kBadInput) naming a base file that cannot be read.
SweepIdentity IdentityOf(const SweepFile& file);

// "prefill=P decode=D context=C batch=B".
std::string WorkloadText(const WorkloadConfig& w);

// The input_hash of one point with these settings and resolved workload.
std::string InputHash(const SweepIdentity& id, const std::vector<SweepSetting>& settings,
                      const WorkloadConfig& workload);

// The identity fields of a point's row, in IdentityColumns() order.
std::vector<std::string> IdentityFields(const SweepPlan& plan, const SweepPoint& point);

// Checks that `table` (read from `csv`) holds rows of `plan` only: the same
// columns, sweep name, tritsim version, base-file hashes, and for each row a
// point of the plan with the same axis values, workload and input_hash.
// Throws tritsim::Error (kBadInput) "CSV:LINE: WHAT DIFFERS; HINT" on the
// first difference; `hint` says how to go on (e.g. how to start afresh).
void CheckRowsBelong(const SweepPlan& plan, const CsvTable& table, const std::string& csv,
                     const std::string& hint);

}  // namespace tritsim
