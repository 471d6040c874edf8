// Append-only sweep CSV. See sweep_journal.h.
#include "sweep/sweep_journal.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include "common/error.h"
#include "sweep/sweep_csv.h"

namespace tritsim {
namespace {

// Size of `path` in bytes, or -1 if it does not exist.
off_t FileSize(const std::string& path) {
  struct stat st;
  if (::stat(path.c_str(), &st) != 0) return -1;
  return st.st_size;
}

Error IoError(const std::string& path, const std::string& what) {
  return Error(ExitCode::kBadInput, path + ": " + what + ": " + std::strerror(errno));
}

// The check of the plain constructor: the same header, known ids only.
ResumeCheck HeaderAndIdsCheck(const std::string& path, const std::vector<std::string>& header,
                              const std::set<std::string>& known_ids) {
  return [path, header, known_ids](const CsvTable& table) {
    if (table.header != header) {
      throw InputError(path, 1, "",
                       "header differs from this sweep's columns; the CSV belongs "
                       "to another sweep file or version (use another --out)");
    }
    for (size_t i = 0; i < table.rows.size(); ++i) {
      const std::string& id = table.rows[i].front();
      if (!known_ids.count(id)) {
        throw InputError(path, int(i) + 2, "",
                         "point " + id +
                             " is not in this sweep (the sweep file "
                             "changed?); use another --out");
      }
    }
  };
}

}  // namespace

SweepJournal::SweepJournal(const std::string& path, const std::vector<std::string>& header,
                           const std::set<std::string>& known_ids, bool resume)
    : SweepJournal(path, header, HeaderAndIdsCheck(path, header, known_ids), resume) {}

SweepJournal::SweepJournal(const std::string& path, const std::vector<std::string>& header,
                           const ResumeCheck& check, bool resume)
    : path_(path) {
  const off_t size = FileSize(path);
  if (size > 0 && !resume) {
    throw UsageError(path +
                     " exists; pass --resume to run only its missing points, or choose "
                     "another --out");
  }
  if (size > 0) ResumeFrom(check);
  fd_ = ::open(path.c_str(), O_WRONLY | O_APPEND | O_CREAT | O_CLOEXEC, 0644);
  if (fd_ < 0) throw IoError(path, "cannot open for appending");
  if (FileSize(path) == 0) AppendLine(CsvLine(header));
}

SweepJournal::~SweepJournal() {
  if (fd_ >= 0) ::close(fd_);
}

void SweepJournal::ResumeFrom(const ResumeCheck& check) {
  const CsvTable table = ReadCsvFile(path_);
  if (table.complete_bytes > 0) check(table);  // not even a whole header: start afresh
  for (size_t i = 0; i < table.rows.size(); ++i) {
    const std::string& id = table.rows[i].front();
    if (!done_.insert(id).second) {
      throw InputError(path_, int(i) + 2, "", "point " + id + " appears twice");
    }
  }
  if (table.torn_tail && ::truncate(path_.c_str(), off_t(table.complete_bytes)) != 0) {
    throw IoError(path_, "cannot cut the torn final line");
  }
}

void SweepJournal::Append(const std::vector<std::string>& fields) { AppendLine(CsvLine(fields)); }

void SweepJournal::AppendLine(const std::string& line) {
  const ssize_t n = ::write(fd_, line.data(), line.size());
  if (n != ssize_t(line.size())) throw IoError(path_, "cannot append a row");
  if (::fsync(fd_) != 0) throw IoError(path_, "cannot sync");
}

}  // namespace tritsim
