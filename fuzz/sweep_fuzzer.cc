// Fuzzes the sweep-file reader (seeds: configs/sweeps/ and the sweep cases
// of tests/bad_inputs/corpus/). Base files are resolved against a folder
// that does not exist; LoadSweepText does not open them (the plan does).
#include <cstddef>
#include <cstdint>
#include <string>

#include "config/sweep_file.h"
#include "fuzz_check.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  try {
    tritsim::LoadSweepText(text, "fuzz-sweep.yaml", "/nonexistent-fuzz-base");
  } catch (const tritsim::Error& e) {
    tritsim_fuzz::CheckRejection(e, tritsim::ExitCode::kBadInput);
  }
  return 0;
}
