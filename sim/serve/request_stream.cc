#include "serve/request_stream.h"

#include <cmath>
#include <random>

#include "common/csv.h"
#include "common/error.h"

namespace tritsim {
namespace {

// A uniform double in (0, 1): the top 53 bits, offset by half a step so
// that neither end is drawn (common practice; log(0) must not occur).
double Uniform01(std::mt19937_64& bits) { return (double(bits() >> 11) + 0.5) * 0x1.0p-53; }

// Inverse transform sampling of the exponential distribution (common
// practice; e.g. Law and Kelton, Simulation Modeling and Analysis, 2000).
double ExponentialGap(std::mt19937_64& bits, double rate) {
  return -std::log(Uniform01(bits)) / rate;
}

int64_t Draw(std::mt19937_64& bits, const LengthSpec& spec) {
  const uint64_t span = uint64_t(spec.high - spec.low) + 1;
  return spec.low + int64_t(bits() % span);  // modulo bias < span / 2^64: negligible
}

bool ParsePositive(const std::string& text, int64_t& value) {
  if (text.empty() || text.size() > 12 ||
      text.find_first_not_of("0123456789") != std::string::npos) {
    return false;
  }
  value = std::stoll(text);
  return value >= 1;
}

}  // namespace

LengthSpec ParseLengthSpec(const std::string& text, const std::string& option) {
  LengthSpec spec;
  const std::string prefix = "uniform:";
  bool ok = false;
  if (text.compare(0, prefix.size(), prefix) == 0) {
    const std::string rest = text.substr(prefix.size());
    const size_t colon = rest.find(':');
    ok = colon != std::string::npos && ParsePositive(rest.substr(0, colon), spec.low) &&
         ParsePositive(rest.substr(colon + 1), spec.high) && spec.low <= spec.high;
  } else {
    ok = ParsePositive(text, spec.low);
    spec.high = spec.low;
  }
  if (!ok) {
    throw UsageError(option + " '" + text +
                     "' is not a length: expected N (a whole number >= 1) or uniform:A:B "
                     "(1 <= A <= B)");
  }
  return spec;
}

std::vector<Request> GenerateRequests(const RequestGenerator& g) {
  std::mt19937_64 bits(g.seed);
  std::vector<Request> out;
  out.reserve(size_t(g.count));
  double t = 0;
  for (int64_t i = 0; i < g.count; ++i) {
    Request r;
    r.id = i;
    t += ExponentialGap(bits, g.rate_per_second);
    r.arrival_seconds = t;
    r.prompt_tokens = Draw(bits, g.prompt);
    r.output_tokens = Draw(bits, g.output);
    out.push_back(r);
  }
  return out;
}

std::vector<Request> ReadRequestsCsv(const std::string& path) {
  const CsvTable table = ReadCsvFile(path);
  const std::vector<std::string> expected = {"arrival_seconds", "prompt_tokens", "output_tokens"};
  if (table.header != expected) {
    throw InputError(path, 1, "", "the header must be arrival_seconds,prompt_tokens,output_tokens");
  }
  if (table.torn_tail) throw InputError(path, 0, "", "the last line has no line break");
  std::vector<Request> out;
  for (size_t i = 0; i < table.rows.size(); ++i) {
    const auto& row = table.rows[i];
    const int line = int(i) + 2;
    Request r;
    r.id = int64_t(i);
    char* end = nullptr;
    r.arrival_seconds = std::strtod(row[0].c_str(), &end);
    if (row[0].empty() || *end != '\0' || !std::isfinite(r.arrival_seconds) ||
        r.arrival_seconds < 0) {
      throw InputError(path, line, expected[0], "'" + row[0] + "' is not a time in seconds >= 0");
    }
    if (!out.empty() && r.arrival_seconds < out.back().arrival_seconds) {
      throw InputError(path, line, expected[0], "arrivals must not decrease");
    }
    if (!ParsePositive(row[1], r.prompt_tokens)) {
      throw InputError(path, line, expected[1], "'" + row[1] + "' is not a whole number >= 1");
    }
    if (!ParsePositive(row[2], r.output_tokens)) {
      throw InputError(path, line, expected[2], "'" + row[2] + "' is not a whole number >= 1");
    }
    out.push_back(r);
  }
  if (out.empty()) throw InputError(path, 0, "", "no requests");
  return out;
}

}  // namespace tritsim
