#include "cli/cli_options.h"

#include <boost/program_options.hpp>
#include <charconv>
#include <filesystem>
#include <iostream>
#include <limits>

#include "common/error.h"
#include "config/sweep_file.h"

namespace po = boost::program_options;

namespace tritsim {
namespace {

constexpr const char* kBlanks = " \t";

std::string Trim(const std::string& text) {
  const size_t first = text.find_first_not_of(kBlanks);
  if (first == std::string::npos) return "";
  return text.substr(first, text.find_last_not_of(kBlanks) - first + 1);
}

std::string Expected(int64_t min) {
  if (min == 0) return "a non-negative integer";
  if (min == 1) return "a positive integer";
  return "an integer of at least " + std::to_string(min);
}

// Decimal digits (and a '-' when min < 0) in [min, max], else UsageError.
int64_t ParseInteger(const std::string& name, const std::string& text, int64_t min, int64_t max) {
  int64_t value = 0;
  const char* end = text.data() + text.size();
  const bool sign_ok = min < 0 || (!text.empty() && text[0] != '-');
  const auto [ptr, ec] = std::from_chars(text.data(), end, value);
  const bool whole = sign_ok && ec == std::errc() && ptr == end;
  if (whole && value >= min && value <= max) return value;
  const std::string why = ec == std::errc::result_out_of_range || (whole && value > max)
                              ? " (at most " + std::to_string(max) + ")"
                              : "";
  throw UsageError("--" + name + ": expected " + Expected(min) + why + ", got '" + text + "'");
}

template <typename Field>
void AddInteger(po::options_description& desc, const char* name, int64_t min, Field& field,
                const char* help) {
  const std::string option = name;
  const int64_t max = int64_t(
      std::min<uint64_t>(std::numeric_limits<Field>::max(), std::numeric_limits<int64_t>::max()));
  desc.add_options()(name,
                     po::value<std::string>()->value_name("N")->notifier(
                         [option, min, max, &field](const std::string& text) {
                           field = Field(ParseInteger(option, text, min, max));
                         }),
                     help);
}

std::vector<std::string> LongNames(const po::options_description& desc) {
  std::vector<std::string> names;
  for (const auto& option : desc.options()) {
    if (option->long_name() != "input") names.push_back("--" + option->long_name());
  }
  return names;
}

std::string UnknownOption(const po::unknown_option& e, const po::options_description& desc) {
  const std::string name = e.get_option_name();
  const std::vector<std::string> names = LongNames(desc);
  // A prefix of exactly one option names it (prefixes are refused, not guessed).
  std::vector<std::string> extended;
  for (const std::string& n : names) {
    if (n.rfind(name, 0) == 0) extended.push_back(n);
  }
  const std::string near = extended.size() == 1 ? extended.front() : NearestKey(name, names);
  return "unrecognised option '" + name + "'" +
         (near.empty() ? "" : "; did you mean '" + near + "'?");
}

}  // namespace

void AddIntegerOption(po::options_description& desc, const char* name, int64_t min, int64_t& field,
                      const char* help) {
  AddInteger(desc, name, min, field, help);
}

void AddIntegerOption(po::options_description& desc, const char* name, int64_t min, int& field,
                      const char* help) {
  AddInteger(desc, name, min, field, help);
}

void AddIntegerOption(po::options_description& desc, const char* name, int64_t min, size_t& field,
                      const char* help) {
  AddInteger(desc, name, min, field, help);
}

void SplitOverrides(const std::vector<std::string>& raw, ConfigOverrides& arch,
                    ConfigOverrides& model) {
  for (const std::string& text : raw) {
    const size_t eq = text.find('=');
    const std::string key = Trim(text.substr(0, eq));
    const std::string value = eq == std::string::npos ? "" : Trim(text.substr(eq + 1));
    if (eq == std::string::npos || key.empty() || value.empty()) {
      throw UsageError("--set " + text + ": expected KEY=VALUE, e.g. arch.array.trees=128");
    }
    if (key.rfind("arch.", 0) == 0) {
      arch.push_back({key.substr(5), value});
    } else if (key.rfind("model.", 0) == 0) {
      model.push_back({key.substr(6), value});
    } else {
      throw UsageError("--set " + text + ": KEY must start with 'arch.' or 'model.', got '" + key +
                       "'");
    }
  }
}

bool WantsHelp(const std::vector<std::string>& args) {
  for (const std::string& a : args) {
    if (a == "--help" || a == "-h") return true;
  }
  return false;
}

void PrintHelp(const std::string& usage, const po::options_description& desc) {
  std::cout << usage << "\n\n" << desc << "\n";
}

void AddInputOptions(po::options_description& desc, InputOptions& in, bool with_arch) {
  desc.add_options()("model", po::value(&in.model_path)->value_name("FILE"),
                     "model description (YAML); default: the embedded demo model");
  if (with_arch) {
    desc.add_options()("arch", po::value(&in.arch_path)->value_name("FILE"),
                       "architecture / design point (YAML); default: the embedded demo design");
  }
  desc.add_options()(
      "set", po::value(&in.overrides)->value_name("KEY=VALUE")->composing(),
      "override one config key, e.g. arch.array.trees=128 or model.layers=2 (repeatable)");
  WorkloadConfig& w = in.workload;
  AddIntegerOption(desc, "prefill", 0, w.prefill_tokens,
                   "prompt tokens processed in one prefill step (default 0)");
  AddIntegerOption(desc, "decode", 0, w.decode_tokens,
                   "generated tokens, one decode step each (default 1)");
  AddIntegerOption(desc, "context", 0, w.context_tokens,
                   "tokens already in the KV cache before the run (default 0)");
  AddIntegerOption(desc, "batch", 1, w.batch,
                   "independent sequences processed together (default 1)");
}

void FinishInputOptions(const po::variables_map& vm, InputOptions& in) {
  in.workload_given =
      vm.count("prefill") || vm.count("decode") || vm.count("context") || vm.count("batch");
}

ModelConfig LoadModel(const InputOptions& in) {
  ConfigOverrides arch, model;
  SplitOverrides(in.overrides, arch, model);
  return in.model_path.empty() ? DefaultModel(model) : LoadModelFile(in.model_path, model);
}

ArchConfig LoadArch(const InputOptions& in) {
  ConfigOverrides arch, model;
  SplitOverrides(in.overrides, arch, model);
  return in.arch_path.empty() ? DefaultArch(arch) : LoadArchFile(in.arch_path, arch);
}

void ParseCommandLine(const std::string& command, const std::vector<std::string>& args,
                      const po::options_description& desc, po::variables_map& vm,
                      const char* positional, int max_positional) {
  const std::string help = " (see tritsim " + command + " --help)";
  const int style = po::command_line_style::default_style & ~po::command_line_style::allow_guessing;
  try {
    po::positional_options_description pos;
    if (positional) pos.add(positional, max_positional);
    po::store(po::command_line_parser(args).options(desc).positional(pos).style(style).run(), vm);
    po::notify(vm);
  } catch (const po::unknown_option& e) {
    throw UsageError(command + ": " + UnknownOption(e, desc) + help);
  } catch (const po::error& e) {
    throw UsageError(command + ": " + e.what() + help);
  }
}

std::vector<std::string> RecordedCommand(const std::string& command,
                                         const std::vector<std::string>& args) {
  std::vector<std::string> argv = {"tritsim", command};
  argv.insert(argv.end(), args.begin(), args.end());
  return argv;
}

std::string SelfPath() {
  std::error_code ec;
  const std::filesystem::path p = std::filesystem::read_symlink("/proc/self/exe", ec);
  if (ec) throw Error(ExitCode::kInternal, "cannot find the tritsim binary (/proc/self/exe)");
  return p.string();
}

}  // namespace tritsim
