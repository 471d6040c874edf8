// The sweep CSV as an append-only journal: each finished point appends one
// complete row, so a sweep killed at any moment (even SIGKILL) leaves a file
// of whole rows plus at most one torn final line, which resume cuts away.
#pragma once

#include <functional>
#include <set>
#include <string>
#include <vector>

namespace tritsim {

struct CsvTable;

// Checks the rows of a CSV about to be resumed; throws tritsim::Error
// (kBadInput) naming what differs. Runs before the file is changed in any way.
using ResumeCheck = std::function<void(const CsvTable& table)>;

class SweepJournal {
 public:
  // Opens `path` for appending rows under `header`.
  // - path absent or empty: creates it and writes the header.
  // - path holds rows and !resume: throws tritsim::Error (kUsage) "PATH
  //   exists; pass --resume ...", leaving the file untouched.
  // - resume: reads the file, truncates a torn final line away, checks the
  //   header equals `header` (else throws kBadInput: the CSV belongs to
  //   another sweep) and that each row's id is in `known_ids` and appears
  //   once; their ids become done().
  SweepJournal(const std::string& path, const std::vector<std::string>& header,
               const std::set<std::string>& known_ids, bool resume);
  // Same, with `check` in place of the header and id checks (duplicate ids
  // are still refused). A refused CSV is left byte for byte as it was: a torn
  // final line is cut only after every check passed.
  SweepJournal(const std::string& path, const std::vector<std::string>& header,
               const ResumeCheck& check, bool resume);
  ~SweepJournal();
  SweepJournal(const SweepJournal&) = delete;
  SweepJournal& operator=(const SweepJournal&) = delete;

  // Ids of the points already in the file when it was opened.
  const std::set<std::string>& done() const { return done_; }

  // Appends one row with a single write(2) on the O_APPEND descriptor, then
  // fsync(2). Throws tritsim::Error (kBadInput) naming the path on failure.
  void Append(const std::vector<std::string>& fields);

 private:
  void AppendLine(const std::string& line);
  void ResumeFrom(const ResumeCheck& check);

  std::string path_;
  int fd_ = -1;
  std::set<std::string> done_;
};

}  // namespace tritsim
