// The one CSV writer and reader of tritsim (RFC 4180 fields): every CSV the
// program writes (per-layer, sweep, Pareto, study) goes through CsvLine, and
// every CSV it reads back through ReadCsvFile.
//
// Fields holding a comma, quote or leading/trailing space are quoted, with
// quotes doubled (RFC 4180 section 2, rules 5-7). No field ever holds a line
// break (a break becomes a space), so one line is one row; lines end in "\n".
#pragma once

#include <cstddef>
#include <string>
#include <vector>

namespace tritsim {

// One CSV line (terminated by "\n") of `fields`.
std::string CsvLine(const std::vector<std::string>& fields);

// Splits one line (without its "\n") into fields. Returns false for a
// malformed line (an unterminated quote).
bool ParseCsvLine(const std::string& line, std::vector<std::string>& fields);

// A CSV file read back.
struct CsvTable {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;  // each has header.size() fields
  size_t complete_bytes = 0;                   // bytes up to and including the last "\n"
  bool torn_tail = false;                      // the file ended in a line without "\n" (ignored)
};

// Reads `path`. A final line without "\n" is a row torn by a kill and is
// left out (torn_tail); a file without one complete line has an empty
// header. Throws tritsim::Error (kBadInput) "PATH:LINE: ..." if the file
// cannot be read or a complete row is malformed or has a different number
// of fields from the header.
CsvTable ReadCsvFile(const std::string& path);

}  // namespace tritsim
