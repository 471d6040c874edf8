// Overflow safety at the schema's limits (docs/config-reference.md): every
// value the loader accepts must give finite, unwrapped figures, and every
// value just beyond a cap must be rejected at load time with a message
// naming the key and the allowed range, never clamped or wrapped.
#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/config_loader.h"
#include "report/inspect_report.h"

namespace tritsim {
namespace {

// Every model dimension at its cap (config-reference.md, "Model
// description"), untied embeddings and 16-bit everything: the largest
// parameter count and KV cache the schema allows.
constexpr int64_t kLayers = 1024, kWidth = 65536, kHeads = 1024, kKvHeads = 1024;
constexpr int64_t kHeadDim = 256;  // heads * head_dim at its cap of 4 * width
constexpr int64_t kFfnWidth = 1000000, kVocab = 4000000;

std::string LargestModelYaml() {
  return "name: largest-allowed\n"
         "layers: " +
         std::to_string(kLayers) + "\nwidth: " + std::to_string(kWidth) +
         "\nheads: " + std::to_string(kHeads) + "\nkv_heads: " + std::to_string(kKvHeads) +
         "\nhead_dim: " + std::to_string(kHeadDim) +
         "\nffn:\n  width: " + std::to_string(kFfnWidth) +
         "\n  kind: gated\nvocab: " + std::to_string(kVocab) +
         "\ntied_embeddings: false\n"
         "precision:\n  attention: int16\n  ffn: int16\n  embedding: int16\n  head: int16\n"
         "  norm_bits: 16\n  activation_bits: 16\n  kv_bits: 16\n";
}

// Parameters of a gated decoder, computed here in long double from the
// shape (q and o: width x heads*head_dim; k and v: width x kv_heads*head_dim;
// gate, up, down: width x ffn; untied embedding and head: vocab x width;
// two norms per block plus the final one). Common practice for decoders.
long double ExpectedParameters() {
  const long double q_o = 2.0L * kWidth * kHeads * kHeadDim;
  const long double k_v = 2.0L * kWidth * kKvHeads * kHeadDim;
  const long double ffn = 3.0L * kWidth * kFfnWidth;
  const long double norms = (2.0L * kLayers + 1.0L) * kWidth;
  return kLayers * (q_o + k_v + ffn) + 2.0L * kVocab * kWidth + norms;
}

// Walks a JSON document and checks every number is finite and not negative
// (a wrapped unsigned counter shows up as a huge or negative value).
void ExpectAllNumbersFiniteAndNonNegative(const nlohmann::ordered_json& j,
                                          const std::string& path) {
  if (j.is_object()) {
    for (auto it = j.begin(); it != j.end(); ++it) {
      ExpectAllNumbersFiniteAndNonNegative(it.value(), path + "." + it.key());
    }
  } else if (j.is_array()) {
    for (size_t i = 0; i < j.size(); ++i) {
      ExpectAllNumbersFiniteAndNonNegative(j[i], path + "[" + std::to_string(i) + "]");
    }
  } else if (j.is_number()) {
    const double v = j.get<double>();
    EXPECT_TRUE(std::isfinite(v)) << path;
    EXPECT_GE(v, 0.0) << path;
    EXPECT_LT(v, 1e30) << path << " = " << v;
  }
}

TEST(CounterLimits, LargestAllowedModelLoadsAndInspectsWithoutWrapping) {
  const ModelConfig model = LoadModelText(LargestModelYaml(), "largest.yaml");
  const ArchConfig arch = DefaultArch();
  WorkloadConfig workload;
  workload.decode_tokens = 1;
  ValidateWorkload(workload, model);  // one token: far below the 1e18-op cap
  const nlohmann::ordered_json j = InspectJson({model, arch, workload});
  ExpectAllNumbersFiniteAndNonNegative(j, "inspect");
  const double params = j["model"]["parameters"].get<double>();
  // Below 2^53, so the double holds the count exactly: compare exactly.
  EXPECT_LT(params, 9007199254740992.0);
  EXPECT_EQ(double(ExpectedParameters()), params);
  // 16-bit KV cache: 2 (K and V) x layers x kv_heads x head_dim x 2 bytes.
  const double kv = 2.0 * kLayers * kKvHeads * kHeadDim * 2.0;
  EXPECT_DOUBLE_EQ(kv, j["model"]["kv_bytes_per_token"].get<double>());
}

TEST(CounterLimits, LargestWorkloadOnLargestModelIsRefusedAsBeyondTheCounters) {
  const ModelConfig model = LoadModelText(LargestModelYaml(), "largest.yaml");
  WorkloadConfig workload;
  workload.prefill_tokens = 1 << 20;  // every workload flag at its cap
  workload.decode_tokens = 1 << 20;
  workload.context_tokens = 1 << 24;
  workload.batch = 4096;
  try {
    ValidateWorkload(workload, model);
    FAIL() << "a run of about 1e27 operations was accepted";
  } catch (const Error& e) {
    EXPECT_EQ(ExitCode::kUsage, e.code());
    EXPECT_NE(std::string::npos, std::string(e.what()).find("1e18")) << e.what();
  }
}

TEST(CounterLimits, AcceptedRunsLeaveTenfoldHeadroomInSixtyFourBits) {
  // The loader's op cap (1e18, config_loader.cc) against what uint64_t holds:
  // sums of a few such counters must still fit.
  const long double max_counter = std::numeric_limits<uint64_t>::max();
  EXPECT_GT(max_counter, 10.0L * 1e18L);
}

struct CapCase {
  const char* yaml;     // a minimal model file
  const char* message;  // what the one-line error must hold
};

TEST(CounterLimits, OneBeyondEachModelCapIsRejectedAtLoadTime) {
  const std::vector<CapCase> cases = {
      {"layers: 1025\n", "layers: must be an integer in [1, 1024], got 1025"},
      {"width: 65537\n", "width: must be an integer in [1, 65536], got 65537"},
      {"heads: 1025\n", "heads: must be an integer in [1, 1024], got 1025"},
      {"head_dim: 4097\n", "head_dim: must be an integer in [1, 4096], got 4097"},
      {"ffn: {width: 1000001}\n", "ffn.width: must be an integer in [1, 1000000], got 1000001"},
      {"vocab: 4000001\n", "vocab: must be an integer in [1, 4000000], got 4000001"},
      {"layers: 9223372036854775808\n", "layers: must be an integer in [1, 1024]"},
      {"width: 18446744073709551617\n", "width: must be an integer in [1, 65536]"},
  };
  for (const CapCase& c : cases) {
    try {
      LoadModelText(std::string("name: cap\n") + c.yaml, "cap.yaml");
      ADD_FAILURE() << "accepted: " << c.yaml;
    } catch (const Error& e) {
      EXPECT_EQ(ExitCode::kBadInput, e.code()) << c.yaml;
      const std::string what = e.what();
      EXPECT_NE(std::string::npos, what.find(c.message)) << what;
      EXPECT_EQ(0u, what.rfind("cap.yaml:", 0)) << what;
    }
  }
}

TEST(CounterLimits, OneBeyondEachWorkloadCapIsAUsageError) {
  const ModelConfig model = DefaultModel();
  const std::vector<WorkloadConfig> beyond = {{(1 << 20) + 1, 1, 0, 1},
                                              {0, (1 << 20) + 1, 0, 1},
                                              {0, 1, (1 << 24) + 1, 1},
                                              {0, 1, 0, 4097},
                                              {0, 1, 0, 0},
                                              {-1, 1, 0, 1},
                                              {0, INT64_MIN, 0, 1}};
  for (const WorkloadConfig& w : beyond) {
    EXPECT_THROW(
        {
          try {
            ValidateWorkload(w, model);
          } catch (const Error& e) {
            EXPECT_EQ(ExitCode::kUsage, e.code()) << e.what();
            throw;
          }
        },
        Error);
  }
}

}  // namespace
}  // namespace tritsim
