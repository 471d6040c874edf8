// The tritsim subcommands. Each takes its own argument vector (after the
// subcommand name), parses it with Boost.Program_options, and returns the
// process exit code; errors are thrown as tritsim::Error and turned into a
// one-line message and exit code by main().
#pragma once

#include <string>
#include <vector>

namespace tritsim {

using Args = std::vector<std::string>;

int InspectCommand(const Args& args);
int TraceCommand(const Args& args);
int RunCommand(const Args& args);
int SweepCommand(const Args& args);
int DatapathCommand(const Args& args);  // cli/datapath_command.cc
int CompareCommand(const Args& args);   // cli/compare_command.cc
int DiffCommand(const Args& args);      // cli/diff_command.cc
int ServeCommand(const Args& args);     // cli/serve_command.cc
int ReportCommand(const Args& args);    // cli/report_command.cc

// Overall usage text (subcommands), for `tritsim --help`.
std::string MainUsage();

}  // namespace tritsim
