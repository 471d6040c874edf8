// tritsim entry point: dispatches the subcommand and turns every error into
// a one-line message on stderr and the documented exit code.
#include <cstdlib>
#include <exception>
#include <iostream>
#include <map>
#include <string>
#include <vector>

#include "cli/commands.h"
#include "common/error.h"
#include "common/interrupt.h"
#include "config/sweep_file.h"

namespace {

// libsystemc's main() prints the kernel banner before sc_main() unless this
// is set; a static initializer of the executable runs before main().
const bool kQuietBanner = ::setenv("SYSTEMC_DISABLE_COPYRIGHT_MESSAGE", "1", 0) == 0;

using Command = int (*)(const tritsim::Args&);

const std::map<std::string, Command>& Commands() {
  static const std::map<std::string, Command> commands = {
      {"inspect", tritsim::InspectCommand},   {"trace", tritsim::TraceCommand},
      {"run", tritsim::RunCommand},           {"sweep", tritsim::SweepCommand},
      {"datapath", tritsim::DatapathCommand}, {"compare", tritsim::CompareCommand},
      {"diff", tritsim::DiffCommand},         {"serve", tritsim::ServeCommand},
      {"report", tritsim::ReportCommand},
  };
  return commands;
}

// "unknown command 'rnu'; did you mean 'run'? ..." listing every command.
std::string UnknownCommand(const std::string& name) {
  std::vector<std::string> names;
  for (const auto& entry : Commands()) names.push_back(entry.first);
  const std::string near = tritsim::NearestKey(name, names);
  std::string list;
  for (const std::string& n : names) list += (list.empty() ? "" : ", ") + n;
  return "unknown command '" + name + "'" + (near.empty() ? "" : "; did you mean '" + near + "'?") +
         "; commands: " + list + " (tritsim --help)";
}

int Dispatch(int argc, char** argv) {
  if (argc < 2 || std::string(argv[1]) == "--help" || std::string(argv[1]) == "-h") {
    std::cout << tritsim::MainUsage();
    return argc < 2 ? int(tritsim::ExitCode::kUsage) : 0;
  }
  const std::string name = argv[1];
  if (name == "--version") {
    std::cout << "tritsim " TRITSIM_VERSION "\n";
    return 0;
  }
  auto it = Commands().find(name);
  if (it == Commands().end()) {
    throw tritsim::UsageError(UnknownCommand(name));
  }
  return it->second(tritsim::Args(argv + 2, argv + argc));
}

}  // namespace

// libsystemc.so defines main() and calls sc_main() (declared extern "C" by SystemC).
extern "C" int sc_main(int argc, char* argv[]);
int sc_main(int argc, char* argv[]) {
  tritsim::InstallInterruptHandler();
  try {
    return Dispatch(argc, argv);
  } catch (const tritsim::Error& e) {
    std::cerr << "tritsim: " << e.what() << "\n";
    return int(e.code());
  } catch (const std::exception& e) {
    std::cerr << "tritsim: internal error: " << tritsim::OneLine(e.what()) << "\n";
    return int(tritsim::ExitCode::kInternal);
  }
}
