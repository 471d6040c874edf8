// Fuzzes the YAML config loader: every input is read both as a model
// description and as an architecture (seeds: models/, configs/,
// tests/bad_inputs/). A model that loads is also checked against a small
// workload, which must either pass or fail as a usage error.
#include <cstddef>
#include <cstdint>
#include <string>

#include "config/config_loader.h"
#include "fuzz_check.h"

namespace {

void LoadAsModel(const std::string& text) {
  try {
    const tritsim::ModelConfig model = tritsim::LoadModelText(text, "fuzz-model.yaml");
    try {
      tritsim::ValidateWorkload(tritsim::WorkloadConfig{}, model);
    } catch (const tritsim::Error& e) {
      tritsim_fuzz::CheckRejection(e, tritsim::ExitCode::kUsage);
    }
  } catch (const tritsim::Error& e) {
    tritsim_fuzz::CheckRejection(e, tritsim::ExitCode::kBadInput);
  }
}

void LoadAsArch(const std::string& text) {
  try {
    tritsim::LoadArchText(text, "fuzz-arch.yaml");
  } catch (const tritsim::Error& e) {
    tritsim_fuzz::CheckRejection(e, tritsim::ExitCode::kBadInput);
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  LoadAsModel(text);
  LoadAsArch(text);
  return 0;
}
