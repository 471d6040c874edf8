// The requests a serving run replays: read from a CSV file, or generated
// with Poisson arrivals and lengths from a spec. Plain C++, reproducible:
// the same seed gives the same requests on every machine (the generator
// draws from std::mt19937_64, whose output the C++ standard fixes, and turns
// its bits into numbers itself, not through the library's distributions,
// whose algorithms it does not fix).
#pragma once

#include <cstdint>
#include <string>
#include <vector>

namespace tritsim {

struct Request {
  int64_t id = 0;
  double arrival_seconds = 0;
  int64_t prompt_tokens = 1;  // >= 1
  int64_t output_tokens = 1;  // >= 1 (the first comes out of the prefill)
};

// A length: fixed N, or uniform on the integers [low, high].
struct LengthSpec {
  int64_t low = 1;
  int64_t high = 1;
};

// Parses "N" or "uniform:A:B" (1 <= A <= B). Throws tritsim::Error (usage)
// naming `option` and the accepted forms.
LengthSpec ParseLengthSpec(const std::string& text, const std::string& option);

struct RequestGenerator {
  double rate_per_second = 1.0;  // Poisson arrivals: exponential gaps of mean 1/rate
  int64_t count = 100;
  LengthSpec prompt{128, 128};
  LengthSpec output{128, 128};
  uint64_t seed = 1;
};

// `count` requests, ids from 0, arrivals from the first gap on.
std::vector<Request> GenerateRequests(const RequestGenerator& g);

// Reads a CSV with the header `arrival_seconds,prompt_tokens,output_tokens`
// (ids are the row order from 0). Arrivals must not decrease. Throws
// tritsim::Error (bad input) "FILE:LINE: COLUMN: ..." on a bad row.
std::vector<Request> ReadRequestsCsv(const std::string& path);

}  // namespace tritsim
