// The --vcd activity log: a Value Change Dump as IEEE 1364-2005 clause 18
// describes it (from memory of the standard: header sections $timescale,
// $scope/$var/$upscope, $enddefinitions, then "#time" lines in increasing
// order each followed by value changes "<0|1><id>"). Plain C++.
#include "results/activity_log.h"

#include <gtest/gtest.h>

#include <cstdint>
#include <sstream>
#include <string>
#include <vector>

namespace tritsim {
namespace {

class ActivityLogTest : public ::testing::Test {
 protected:
  std::string Vcd() const { return log_.ToVcd("accelerator"); }
  // The "#time" stamps after $enddefinitions, in file order.
  std::vector<uint64_t> Stamps() const {
    std::vector<uint64_t> stamps;
    std::istringstream in(Vcd());
    for (std::string line; std::getline(in, line);) {
      if (!line.empty() && line[0] == '#') stamps.push_back(std::stoull(line.substr(1)));
    }
    return stamps;
  }
  // Value-change lines (not keywords, not stamps) after the initial $dumpvars block.
  std::vector<std::string> Changes() const {
    const std::string vcd = Vcd();
    std::istringstream in(vcd.substr(vcd.find("$dumpvars")));
    std::vector<std::string> changes;
    bool in_dump = true;
    for (std::string line; std::getline(in, line);) {
      if (line == "$end") in_dump = false;
      if (in_dump || line.empty() || line[0] == '#' || line[0] == '$') continue;
      changes.push_back(line);
    }
    return changes;
  }

  ActivityLog log_;
};

size_t Find(const std::string& text, const std::string& what) { return text.find(what); }

TEST_F(ActivityLogTest, HeaderDeclaresTimescaleVariablesThenEndsDefinitions) {
  log_.AddSignal("tree_array_busy");
  log_.AddSignal("dma_load");
  const std::string vcd = Vcd();
  const size_t timescale = Find(vcd, "$timescale 1 ps $end");
  const size_t first_var = Find(vcd, "$var wire 1 ! tree_array_busy $end");
  const size_t second_var = Find(vcd, "$var wire 1 \" dma_load $end");
  const size_t end = Find(vcd, "$enddefinitions $end");
  ASSERT_NE(timescale, std::string::npos) << vcd;
  ASSERT_NE(first_var, std::string::npos) << vcd;
  ASSERT_NE(second_var, std::string::npos) << vcd;
  ASSERT_NE(end, std::string::npos) << vcd;
  EXPECT_LT(timescale, first_var);
  EXPECT_LT(first_var, second_var);
  EXPECT_LT(second_var, end);
  EXPECT_LT(end, Find(vcd, "#0")) << "no value change before the definitions end";
}

TEST_F(ActivityLogTest, ValueChangesComeInTimeOrderWhateverTheReportingOrder) {
  const int a = log_.AddSignal("a");
  const int b = log_.AddSignal("b");
  log_.Busy(b, 5000, 9000);
  log_.Busy(a, 1000, 2000);
  log_.Busy(a, 7000, 8000);
  log_.Busy(b, 3000, 4000);
  const std::vector<uint64_t> expected = {0, 1000, 2000, 3000, 4000, 5000, 7000, 8000, 9000};
  EXPECT_EQ(Stamps(), expected);
}

TEST_F(ActivityLogTest, OverlappingBusyIntervalsOfOneSignalMergeIntoOnePulse) {
  const int a = log_.AddSignal("a");
  log_.Busy(a, 100, 1000);
  log_.Busy(a, 500, 2000);
  const std::vector<std::string> expected = {"1!", "0!"};
  EXPECT_EQ(Changes(), expected);
  const std::vector<uint64_t> stamps = {0, 100, 2000};
  EXPECT_EQ(Stamps(), stamps);
}

TEST_F(ActivityLogTest, EmptyIntervalsAreIgnored) {
  const int a = log_.AddSignal("a");
  log_.Busy(a, 500, 500);
  log_.Busy(a, 900, 400);
  EXPECT_EQ(log_.intervals(), 0u);
  EXPECT_TRUE(Changes().empty());
}

}  // namespace
}  // namespace tritsim
