// RFC 4180 CSV lines and files. See csv.h.
#include "common/csv.h"

#include <fstream>
#include <sstream>

#include "common/error.h"

namespace tritsim {
namespace {

bool NeedsQuotes(const std::string& f) {
  return f.find_first_of(",\"") != std::string::npos ||
         (!f.empty() && (f.front() == ' ' || f.back() == ' '));
}

// `f` with line breaks replaced by spaces, quoted when needed.
std::string CsvField(std::string f) {
  for (char& c : f) {
    if (c == '\n' || c == '\r') c = ' ';
  }
  if (!NeedsQuotes(f)) return f;
  std::string quoted = "\"";
  for (char c : f) quoted += c == '"' ? std::string("\"\"") : std::string(1, c);
  return quoted + '"';
}

std::string ReadWholeFile(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, 0, "", "cannot open CSV file");
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

}  // namespace

std::string CsvLine(const std::vector<std::string>& fields) {
  std::string line;
  for (size_t i = 0; i < fields.size(); ++i) {
    if (i > 0) line += ',';
    line += CsvField(fields[i]);
  }
  return line + "\n";
}

bool ParseCsvLine(const std::string& line, std::vector<std::string>& fields) {
  fields.assign(1, "");
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted) {
      if (c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
        fields.back() += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        fields.back() += c;
      }
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      fields.emplace_back();
    } else if (c != '\r') {
      fields.back() += c;
    }
  }
  return !quoted;
}

CsvTable ReadCsvFile(const std::string& path) {
  const std::string text = ReadWholeFile(path);
  CsvTable table;
  const size_t last_newline = text.rfind('\n');
  table.complete_bytes = last_newline == std::string::npos ? 0 : last_newline + 1;
  table.torn_tail = table.complete_bytes < text.size();
  std::istringstream lines(text.substr(0, table.complete_bytes));
  std::string line;
  int number = 0;
  while (std::getline(lines, line)) {
    ++number;
    std::vector<std::string> fields;
    if (!ParseCsvLine(line, fields)) throw InputError(path, number, "", "unterminated quote");
    if (number == 1) {
      table.header = fields;
      continue;
    }
    if (fields.size() != table.header.size()) {
      throw InputError(path, number, "",
                       "row has " + std::to_string(fields.size()) + " fields, the header " +
                           std::to_string(table.header.size()));
    }
    table.rows.push_back(fields);
  }
  return table;
}

}  // namespace tritsim
