// The DRAM command log: the simulator's logs obey JEDEC timing (checked by
// tests/hw/dram_log_checker, written from JESD79-4 / JESD209-5 / JESD235,
// not from the channel code), and the checker catches each rule family.
#include <gtest/gtest.h>
#include <stdlib.h>
#include <sys/wait.h>

#include <cstdint>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "config/arch_config.h"
#include "config/config_loader.h"
#include "hw/dram_command_log.h"
#include "hw/dram_log_checker.h"
#include "hw/memory_system.h"

namespace tritsim {
namespace {

using test::CheckDramLog;
using test::DramLogSummary;

constexpr uint64_t kMiB = uint64_t{1} << 20;
constexpr uint64_t kNoLimit = ~uint64_t{0};

std::string Joined(const DramLogSummary& s) {
  std::string all;
  for (size_t i = 0; i < s.violations.size() && i < 5; ++i) all += s.violations[i] + "\n";
  return all;
}

// Random reads and writes (Knuth's MMIX LCG) over 64 MiB, through the
// plain-C++ memory system; returns the log text and the completion times.
std::string RandomTrafficLog(const DramConfig& d, bool with_log, std::vector<uint64_t>* times,
                             DramStats* stats) {
  std::ostringstream out;
  DramCommandLog log(out, d, kNoLimit);
  auto mem = MakeMemorySystem(d);
  if (with_log) mem->SetCommandLog(&log);
  uint64_t state = 7, start = 0, end = 0;
  for (int i = 0; i < 1500; ++i) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    const uint64_t address = (state >> 20) % (64 * kMiB);
    start += (state >> 44) % 20000;
    const uint64_t bytes = 64 + (state >> 56) * 64;  // up to 16 KiB: row hits and switches
    const uint64_t done = mem->Transfer(address, bytes, (state >> 10) & 1, start, 32);
    times->push_back(done);
    end = std::max(end, done);
  }
  mem->Finish(end);
  log.Close();
  *stats = mem->stats();
  return out.str();
}

void ExpectCleanRandomLog(const char* preset, PagePolicy policy) {
  DramConfig d;
  ApplyDramPreset(preset, d);
  d.channels = 2;
  d.page_policy = policy;
  DramStats with_log, without_log;
  std::vector<uint64_t> times_with_log, times_without_log;
  const DramLogSummary s = CheckDramLog(RandomTrafficLog(d, true, &times_with_log, &with_log));
  RandomTrafficLog(d, false, &times_without_log, &without_log);
  EXPECT_EQ(times_with_log, times_without_log);  // logging changes nothing
  EXPECT_TRUE(s.violations.empty()) << preset << "\n" << Joined(s);
  EXPECT_GT(s.reads, 0u);
  EXPECT_GT(s.writes, 0u);
  EXPECT_GT(s.refreshes, 0u);
  EXPECT_EQ(s.reads, with_log.reads);  // every column command is logged
  EXPECT_EQ(s.writes, with_log.writes);
  EXPECT_EQ(s.acts, with_log.activates);
  EXPECT_EQ(s.refreshes, with_log.refreshes);
  EXPECT_EQ(with_log.refreshes, without_log.refreshes);
  EXPECT_EQ(with_log.row_conflicts, without_log.row_conflicts);
}

TEST(DramLog, RandomTrafficDdr4OpenAndClosedPageObeysJesd79_4) {
  ExpectCleanRandomLog("ddr4-3200", PagePolicy::kOpen);
  ExpectCleanRandomLog("ddr4-3200", PagePolicy::kClosed);
}

TEST(DramLog, RandomTrafficLpddr5ObeysJesd209_5) {
  ExpectCleanRandomLog("lpddr5-6400", PagePolicy::kOpen);
  ExpectCleanRandomLog("lpddr5-6400", PagePolicy::kClosed);
}

TEST(DramLog, RandomTrafficHbm2eObeysJesd235) {
  ExpectCleanRandomLog("hbm2e", PagePolicy::kOpen);
  ExpectCleanRandomLog("hbm2e", PagePolicy::kClosed);
}

TEST(DramLog, StreamingLogHasEveryCommandOnce) {
  DramConfig d;
  ApplyDramPreset("hbm2e", d);
  std::ostringstream out;
  DramCommandLog log(out, d, kNoLimit);
  auto mem = MakeMemorySystem(d);
  mem->SetCommandLog(&log);
  const uint64_t done = mem->Transfer(0, 16 * kMiB, false, 0, 4096);
  mem->Finish(done);
  log.Close();
  const DramLogSummary s = CheckDramLog(out.str());
  EXPECT_TRUE(s.violations.empty()) << Joined(s);
  EXPECT_EQ(s.reads, 16 * kMiB / mem->burst_bytes());
  EXPECT_EQ(s.acts, mem->stats().activates);
}

// ---- the CLI: one small run per demo design point ----

class DramLogRun : public ::testing::Test {
 protected:
  void SetUp() override {
    char tmpl[] = "/tmp/tritsim-dram-log-XXXXXX";
    ASSERT_NE(::mkdtemp(tmpl), nullptr);
    dir_ = tmpl;
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }

  // Runs `tritsim run ARGS`; returns the exit code.
  int Run(const std::string& args) const {
    const std::string cmd = std::string(TRITSIM_BINARY) + " run -q " + args + " 2>" + dir_ + "/err";
    const int status = std::system(cmd.c_str());
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  std::string Read(const std::string& name) const {
    std::ifstream in(dir_ + "/" + name);
    std::stringstream text;
    text << in.rdbuf();
    return text.str();
  }
  void ExpectClean(const std::string& model, const std::string& arch, const std::string& preset) {
    const std::string src = TRITSIM_SOURCE_DIR;
    ASSERT_EQ(Run("--model " + src + "/models/" + model + " --arch " + src + "/configs/" + arch +
                  " --decode 2 --context 256 --dram-log " + dir_ + "/log --dram-log-limit 400000"),
              0)
        << Read("err");
    const std::string text = Read("log");
    EXPECT_NE(text.find("# format tritsim-dram-log/1\n"), std::string::npos);
    EXPECT_NE(text.find("# preset " + preset + "\n"), std::string::npos);
    const DramLogSummary s = CheckDramLog(text);
    EXPECT_TRUE(s.violations.empty()) << Joined(s);
    EXPECT_GT(s.reads, 0u);
    EXPECT_GT(s.writes, 0u);  // KV-cache appends
    EXPECT_GT(s.refreshes, 0u);
  }
  std::string dir_;
};

TEST_F(DramLogRun, HeronDdr4LogObeysJesd79_4) {
  ExpectClean("meadowlark-3b.yaml", "heron-edge-ddr4.yaml", "ddr4-3200");
}

TEST_F(DramLogRun, FinchLpddr5LogObeysJesd209_5) {
  ExpectClean("wren-0.7b.yaml", "finch-phone-lpddr5.yaml", "lpddr5-6400");
}

TEST_F(DramLogRun, OspreyHbm2eLogObeysJesd235) {
  ExpectClean("meadowlark-3b.yaml", "osprey-card-hbm2e.yaml", "hbm2e");
}

TEST_F(DramLogRun, LimitTruncatesWithATrailingLine) {
  ASSERT_EQ(Run("--dram-log " + dir_ + "/log --dram-log-limit 1000"), 0) << Read("err");
  const DramLogSummary s = CheckDramLog(Read("log"));
  EXPECT_EQ(s.commands, 1000u);
  EXPECT_TRUE(s.truncated);
  EXPECT_NE(Read("log").find("\n# truncated after 1000 commands\n"), std::string::npos);
}

TEST_F(DramLogRun, IdealMemoryLogHasHeaderOnly) {
  const std::string src = TRITSIM_SOURCE_DIR;
  ASSERT_EQ(Run("--arch " + src + "/configs/ideal-memory.yaml --dram-log " + dir_ + "/log"), 0)
      << Read("err");
  const DramLogSummary s = CheckDramLog(Read("log"));
  EXPECT_NE(Read("log").find("# preset ideal\n"), std::string::npos);
  EXPECT_EQ(s.commands, 0u);
}

TEST_F(DramLogRun, UnwritableFolderFailsBeforeSimulating) {
  EXPECT_EQ(Run("--dram-log " + dir_ + "/missing/log"), 3);
  EXPECT_NE(Read("err").find(dir_ + "/missing/log"), std::string::npos);
  EXPECT_EQ(Read("err").find('\n'), Read("err").size() - 1);  // one line
}

TEST_F(DramLogRun, LimitBelowOneIsAUsageError) {
  EXPECT_EQ(Run("--dram-log " + dir_ + "/log --dram-log-limit 0"), 2);
  EXPECT_NE(Read("err").find("--dram-log-limit"), std::string::npos);
  EXPECT_FALSE(std::filesystem::exists(dir_ + "/log"));
}

// ---- the checker is not vacuous: each rule family is caught ----

// A DDR4-like header at tCK 1000 ps; small round numbers (arithmetic only).
const char* kHeader =
    "# format tritsim-dram-log/1\n# preset ddr4-3200\n# channels 1\n# tCK_ps 1000\n"
    "# bank_groups 4\n# banks_per_group 4\n# burst_length 8\n# CL 10\n# CWL 8\n# tRCD 10\n"
    "# tRP 10\n# tRAS 30\n# tRC 40\n# tCCD_S 4\n# tCCD_L 6\n# tRRD_S 4\n# tRRD_L 6\n"
    "# tFAW 30\n# tWR 12\n# tWTR_S 3\n# tWTR_L 9\n# tRTP 7\n# tRFC 100\n# tREFI 5000\n";

// Violations of `body` (times in ns, i.e. multiples of tCK).
std::vector<std::string> Violations(const std::string& body) {
  return CheckDramLog(std::string(kHeader) + body).violations;
}

void ExpectCaught(const std::string& body, const std::string& rule) {
  const std::vector<std::string> v = Violations(body);
  ASSERT_EQ(v.size(), 1u) << body;
  EXPECT_NE(v[0].find(": " + rule + ":"), std::string::npos) << v[0];
}

TEST(DramLogChecker, AcceptsALegalSequence) {
  // ACT, RD after tRCD, WR, RD after write end + tWTR_L, PRE after tRAS and
  // tWR, REF after tRP, ACT after tRFC (JESD79-4 minimum delays).
  EXPECT_TRUE(Violations("0 0 ACT 0 0 5 -\n10000 0 RD 0 0 5 1\n16000 0 WR 0 0 5 2\n"
                         "47000 0 RD 0 0 5 3\n60000 0 PRE 0 0 5 -\n70000 0 REF - - - -\n"
                         "170000 0 ACT 0 0 6 -\n")
                  .empty());
}

TEST(DramLogChecker, CatchesSameBankTiming) {
  ExpectCaught("0 0 ACT 0 0 5 -\n9000 0 RD 0 0 5 1\n", "tRCD");  // JESD79-4 tRCD
  ExpectCaught("0 0 ACT 0 0 5 -\n29000 0 PRE 0 0 5 -\n", "tRAS");
  ExpectCaught("0 0 ACT 0 0 5 -\n35000 0 PRE 0 0 5 -\n44000 0 ACT 0 0 6 -\n", "tRP");
  ExpectCaught("0 0 ACT 0 0 5 -\n25000 0 RD 0 0 5 1\n31000 0 PRE 0 0 5 -\n", "tRTP");
  // Write recovery: WR at 20, data ends 20 + CWL 8 + BL/2 4 = 32, PRE >= 44.
  ExpectCaught("0 0 ACT 0 0 5 -\n20000 0 WR 0 0 5 1\n43000 0 PRE 0 0 5 -\n", "tWR");
}

TEST(DramLogChecker, CatchesTrcWithTrpMet) {
  // tRC 40 > tRAS 30 + tRP 10 is not violated at 40; use a longer tRC log.
  const std::string header = std::string(kHeader);
  std::string body = "0 0 ACT 0 0 5 -\n30000 0 PRE 0 0 5 -\n";
  std::string text = header;
  text.replace(text.find("# tRC 40"), 8, "# tRC 45");
  const auto v = CheckDramLog(text + body + "40000 0 ACT 0 0 6 -\n").violations;
  ASSERT_EQ(v.size(), 1u);
  EXPECT_NE(v[0].find(": tRC:"), std::string::npos);  // JESD79-4 tRC
}

TEST(DramLogChecker, CatchesActivateSpacing) {
  ExpectCaught("0 0 ACT 0 0 5 -\n3000 0 ACT 1 0 5 -\n", "tRRD_S");  // JESD79-4
  ExpectCaught("0 0 ACT 0 0 5 -\n5000 0 ACT 0 1 5 -\n", "tRRD_L");
  // Five ACTs 6 ns apart: the fifth is 24 ns after the first, tFAW 30.
  ExpectCaught(
      "0 0 ACT 0 0 5 -\n6000 0 ACT 1 0 5 -\n12000 0 ACT 2 0 5 -\n"
      "18000 0 ACT 3 0 5 -\n24000 0 ACT 0 1 5 -\n",
      "tFAW");
}

TEST(DramLogChecker, CatchesColumnSpacingAndWriteToRead) {
  const std::string open2 = "0 0 ACT 0 0 5 -\n6000 0 ACT 1 0 5 -\n";
  ExpectCaught(open2 + "20000 0 RD 0 0 5 1\n23000 0 RD 1 0 5 1\n", "tCCD_S");  // JESD79-4
  ExpectCaught(open2 + "20000 0 RD 0 0 5 1\n25000 0 RD 0 0 5 2\n", "tCCD_L");
  // WR at 20: data ends 32; a read in the same group needs 32 + 9, another 32 + 3.
  ExpectCaught(open2 + "20000 0 WR 0 0 5 1\n40000 0 RD 0 0 5 2\n", "tWTR_L");
  ExpectCaught(open2 + "20000 0 WR 0 0 5 1\n34000 0 RD 1 0 5 2\n", "tWTR_S");
}

TEST(DramLogChecker, CatchesRowStateErrors) {
  ExpectCaught("10000 0 RD 0 0 5 1\n", "column to closed bank");
  ExpectCaught("0 0 ACT 0 0 5 -\n20000 0 RD 0 0 6 1\n", "column to other row");
  ExpectCaught("0 0 ACT 0 0 5 -\n50000 0 ACT 0 0 6 -\n", "ACT to open bank");
}

TEST(DramLogChecker, CatchesRefreshErrors) {
  ExpectCaught("0 0 ACT 0 0 5 -\n50000 0 REF - - - -\n", "REF with open bank");
  ExpectCaught("0 0 REF - - - -\n99000 0 ACT 0 0 5 -\n", "tRFC");  // JESD79-4 tRFC
  // JESD79-4: at most 8 refreshes postponed, so REFs at most 9 x tREFI apart.
  ExpectCaught("0 0 REF - - - -\n46000000 0 REF - - - -\n", "tREFI");
  ExpectCaught("46000000 0 ACT 0 0 5 -\n", "tREFI");  // 9 REFs due, none issued
}

TEST(DramLogChecker, CatchesFormatAndOrder) {
  ExpectCaught("0 0 ACT 0 0 5 7\n", "format");  // ACT gives '-' for the column
  ExpectCaught("0 0 ACT 0 0 5 -\n4500 0 ACT 1 0 5 -\n", "clock");
  EXPECT_FALSE(Violations("8000 0 ACT 0 0 5 -\n4000 0 ACT 1 0 5 -\n").empty());
}

}  // namespace
}  // namespace tritsim
