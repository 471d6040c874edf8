// What every fuzz target holds a parser to: it may reject an input only
// with a tritsim::Error of the expected exit code whose message is one line.
// Any other exception escaping the parser, and any sanitizer report, is a
// finding (libFuzzer stops and saves the input).
#pragma once

#include <cstdio>
#include <cstdlib>
#include <cstring>

#include "common/error.h"

namespace tritsim_fuzz {

// Aborts (a libFuzzer crash) if `e` is not a one-line error with `expected`.
inline void CheckRejection(const tritsim::Error& e, tritsim::ExitCode expected) {
  const char* what = e.what();
  if (e.code() != expected) {
    std::fprintf(stderr, "fuzz: exit code %d, expected %d: %s\n", int(e.code()), int(expected),
                 what);
    std::abort();
  }
  if (std::strchr(what, '\n') != nullptr || what[0] == '\0') {
    std::fprintf(stderr, "fuzz: error message is not one non-empty line: [%s]\n", what);
    std::abort();
  }
}

}  // namespace tritsim_fuzz
