// The fp16 weight format in traces: a new spelling, the old ones unchanged
// (old traces replay byte-identically; docs/trace-format.md).
#include <gtest/gtest.h>

#include "trace/trace_format.h"

namespace tritsim {
namespace {

TEST(WeightFormatFp16, RoundTripsAndKeepsOldSpellings) {
  WeightFormat f = WeightFormat::kTernary;
  ASSERT_TRUE(ParseWeightFormat("fp16", &f));
  EXPECT_EQ(f, WeightFormat::kFp16);
  EXPECT_STREQ(WeightFormatName(WeightFormat::kFp16), "fp16");
  EXPECT_STREQ(WeightFormatName(WeightFormat::kInt16), "int16");
  EXPECT_EQ(AllowedWeightFormats(), "ternary | int8 | int16 | fp16");
}

}  // namespace
}  // namespace tritsim
