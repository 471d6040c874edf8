#include "child_process.h"

#include <sys/time.h>

#include <chrono>
#include <cstdlib>
#include <exception>
#include <iostream>
#include <stdexcept>

#include <fmt/core.h>

#include "common/subprocess.h"

namespace tritsim_bench {
namespace {

constexpr const char* kChildValueFlag = "--child-value";

double Seconds(const timeval& t) { return double(t.tv_sec) + double(t.tv_usec) * 1e-6; }

tritsim::ChildResult RunToEnd(const tritsim::SpawnRequest& request) {
  try {
    return tritsim::RunChildToEnd(request);
  } catch (const std::exception& e) {
    throw std::runtime_error(e.what());
  }
}

}  // namespace

ChildMeasurement RunChild(const std::vector<std::string>& argv) {
  if (argv.empty()) throw std::runtime_error("RunChild: empty command");
  tritsim::SpawnRequest request;
  request.argv = argv;
  request.stdout_to = tritsim::ChildOutput::kNull;
  request.stderr_to = tritsim::ChildOutput::kInherit;
  const auto start = std::chrono::steady_clock::now();
  const tritsim::ChildResult child = RunToEnd(request);
  const auto end = std::chrono::steady_clock::now();
  ChildMeasurement m;
  m.wall_seconds = std::chrono::duration<double>(end - start).count();
  m.cpu_seconds = Seconds(child.usage.ru_utime) + Seconds(child.usage.ru_stime);
  m.peak_rss_kib = child.usage.ru_maxrss;
  m.exit_code = tritsim::ExitCodeOf(child.wait_status);
  return m;
}

double RunSelfForValue(const std::string& mode, long argument) {
  tritsim::SpawnRequest request;
  request.argv = {"/proc/self/exe", kChildValueFlag, mode, std::to_string(argument)};
  request.stdout_to = tritsim::ChildOutput::kCapture;
  request.stderr_to = tritsim::ChildOutput::kInherit;
  const tritsim::ChildResult child = RunToEnd(request);
  char* end = nullptr;
  const double value = std::strtod(child.stdout_text.c_str(), &end);
  if (tritsim::ExitCodeOf(child.wait_status) != 0 || end == child.stdout_text.c_str()) {
    throw std::runtime_error("measurement '" + mode + "' in a child process failed (exit " +
                             std::to_string(tritsim::ExitCodeOf(child.wait_status)) + ")");
  }
  return value;
}

bool IsChildValueInvocation(int argc, char** argv, std::string& mode, long& argument) {
  if (argc != 4 || std::string(argv[1]) != kChildValueFlag) return false;
  mode = argv[2];
  argument = std::strtol(argv[3], nullptr, 10);
  return true;
}

void PrintChildValue(double value) { std::cout << fmt::format("{}\n", value) << std::flush; }

}  // namespace tritsim_bench
