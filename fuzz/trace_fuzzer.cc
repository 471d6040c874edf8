// Fuzzes the trace reader: the input is written to a file (the reader's
// only entry point is a path), opened, and drained record by record
// (seeds: traces/ and the trace cases of tests/bad_inputs/).
#include <unistd.h>

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "fuzz_check.h"
#include "trace/trace_reader.h"

namespace {

// One scratch file per fuzzing process, removed at exit.
const std::string& ScratchPath() {
  static const std::string path = [] {
    const char* dir = std::getenv("TMPDIR");
    std::string p = std::string(dir && *dir ? dir : "/tmp") + "/tritsim-trace-fuzz." +
                    std::to_string(::getpid()) + ".trace";
    std::atexit([] { std::remove(ScratchPath().c_str()); });
    return p;
  }();
  return path;
}

bool WriteScratch(const uint8_t* data, size_t size) {
  std::FILE* f = std::fopen(ScratchPath().c_str(), "wb");
  if (f == nullptr) return false;
  const bool ok = std::fwrite(data, 1, size, f) == size;
  return std::fclose(f) == 0 && ok;
}

// Reads every record; a record count cap keeps one input's time bounded.
void Drain(tritsim::TraceSource& source) {
  constexpr int kMaxRecords = 100000;
  tritsim::TraceRecord record;
  for (int i = 0; i < kMaxRecords && source.next(record); ++i) {
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (!WriteScratch(data, size)) std::abort();  // the machine, not the reader
  try {
    auto source = tritsim::OpenTraceFile(ScratchPath());
    Drain(*source);
  } catch (const tritsim::Error& e) {
    tritsim_fuzz::CheckRejection(e, tritsim::ExitCode::kBadInput);
  }
  return 0;
}
