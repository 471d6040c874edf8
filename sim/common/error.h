// Errors that cross module boundaries, and the process exit codes they map to.
//
// Every user-facing failure is one of these; its message is always one line. The CLI catches them
// at the top, prints what() as a single line on stderr and exits with code(). Library exceptions
// (yaml-cpp, Boost.Program_options, SystemC reports) are translated into these at the boundary
// where they can occur.
#pragma once

#include <stdexcept>
#include <string>

namespace tritsim {

// Process exit codes. A contract relied on by scripts and sweeps.
enum class ExitCode : int {
  kOk = 0,
  kInternal = 1,      // a bug in tritsim
  kUsage = 2,         // bad command line
  kBadInput = 3,      // a model, architecture, workload, trace or sweep file is wrong
  kSimFailed = 4,     // the simulation could not complete (tile does not fit, watchdog)
  kInterrupted = 130  // SIGINT
};

// Keys and values quoted from a file may hold line breaks; an error message
// is one line, so they are shown escaped ("\n", "\r").
inline std::string OneLine(std::string text) {
  for (size_t i = text.find_first_of("\r\n"); i != std::string::npos;
       i = text.find_first_of("\r\n", i + 2)) {
    text.replace(i, 1, text[i] == '\n' ? "\\n" : "\\r");
  }
  return text;
}

class Error : public std::runtime_error {
 public:
  Error(ExitCode code, const std::string& message)
      : std::runtime_error(OneLine(message)), code_(code) {}
  ExitCode code() const { return code_; }

 private:
  ExitCode code_;
};

// A command-line mistake: exit 2.
inline Error UsageError(const std::string& message) { return Error(ExitCode::kUsage, message); }

// A bad input file. Formats "FILE:LINE: KEY: MESSAGE"; line 0 omits the line,
// an empty key omits the key.
inline Error InputError(const std::string& file, int line, const std::string& key,
                        const std::string& message) {
  std::string text = file;
  if (line > 0) text += ":" + std::to_string(line);
  text += ": ";
  if (!key.empty()) text += key + ": ";
  text += message;
  return Error(ExitCode::kBadInput, text);
}

// The simulation could not complete: exit 4.
inline Error SimError(const std::string& message) { return Error(ExitCode::kSimFailed, message); }

}  // namespace tritsim
