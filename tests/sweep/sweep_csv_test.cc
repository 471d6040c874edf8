// Sweep CSV lines, the append-only journal (torn rows, resume checks) and
// the metrics taken from a run JSON.
#include "sweep/sweep_csv.h"

#include <gtest/gtest.h>
#include <stdlib.h>
#include <unistd.h>
#include <nlohmann/json.hpp>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "common/error.h"
#include "sweep/sweep_identity.h"
#include "sweep/sweep_journal.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

class SweepJournalTest : public ::testing::Test {
 protected:
  void SetUp() override {
    char tmpl[] = "/tmp/tritsim-journal-XXXXXX";
    ASSERT_NE(::mkdtemp(tmpl), nullptr);
    dir_ = tmpl;
    path_ = dir_ + "/sweep.csv";
  }
  void TearDown() override { fs::remove_all(dir_); }

  void Write(const std::string& text) { std::ofstream(path_, std::ios::binary) << text; }
  std::string Read() {
    std::ifstream in(path_, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
  }

  const std::vector<std::string> header_ = {"id", "a", "status"};
  const std::set<std::string> ids_ = {"p0", "p1", "p2"};
  std::string dir_, path_;
};

TEST(SweepCsv, QuotedFieldsRoundTrip) {
  const std::vector<std::string> fields = {"p1", "a,b", "say \"hi\"", " padded ", "", "x\ny"};
  const std::string line = CsvLine(fields);
  EXPECT_EQ(line, "p1,\"a,b\",\"say \"\"hi\"\"\",\" padded \",,x y\n");
  std::vector<std::string> back;
  ASSERT_TRUE(ParseCsvLine(line.substr(0, line.size() - 1), back));
  std::vector<std::string> expected = fields;
  expected.back() = "x y";  // line breaks never enter a row
  EXPECT_EQ(back, expected);
  EXPECT_FALSE(ParseCsvLine("a,\"open", back));
}

TEST(SweepCsv, ExactNumbersReadBackBitForBit) {
  for (double v : {0.1, 1.0 / 3.0, 31.59567345277488, 6.02e23, 5e-324}) {
    EXPECT_EQ(std::strtod(FormatExact(v).c_str(), nullptr), v) << FormatExact(v);
  }
}

TEST(SweepCsv, HeaderHasAxesBetweenIdAndStatus) {
  const std::vector<std::string> h = SweepCsvHeader({"arch.array.trees", "workload.batch"});
  EXPECT_EQ(h[0], "id");
  EXPECT_EQ(h[1], "arch.array.trees");
  EXPECT_EQ(h[2], "workload.batch");
  EXPECT_EQ(h[3], "status");
  EXPECT_EQ(h[4], "error");
  EXPECT_EQ(h[4 + MetricColumns().size() + 1], "json_path");
  EXPECT_EQ(h.back(), "input_hash");  // then the identity columns (sweep_identity.h)
  EXPECT_EQ(h.size(), 2 + 2 + MetricColumns().size() + 2 + IdentityColumns().size());
}

TEST(SweepCsv, MetricsComeFromTheRunJson) {
  const nlohmann::json run = nlohmann::json::parse(R"({
    "totals": {"cycles": 1000, "tokens_per_second": 50.0, "time_to_first_token_seconds": 0.02,
               "time_per_output_token_seconds": 0.02, "joules_per_token": 0.5,
               "picojoules_per_op": 2.0, "area_mm2": 1.5, "seconds": 0.001,
               "energy_joules": 0.004},
    "phases": [{"name": "prefill", "tokens_per_second": 800.0},
               {"name": "decode", "tokens_per_second": 50.0, "joules_per_token": 0.25}],
    "stalls": {"busy": 400, "dram_wait": 500, "sram_conflict": 0, "vector_wait": 100, "idle": 0},
    "dram": {"bandwidth_bytes_per_second": 12.8e9, "peak_bytes_per_second": 25.6e9},
    "layers": [{"cycles": 300, "regime": "memory"}, {"cycles": 100, "regime": "compute"}]})");
  const std::vector<std::string> m = MetricsFromRunJson(run);
  ASSERT_EQ(m.size(), MetricColumns().size());
  auto value = [&](const std::string& col) {
    for (size_t i = 0; i < m.size(); ++i) {
      if (MetricColumns()[i] == col) return m[i];
    }
    return std::string("absent");
  };
  EXPECT_EQ(value("tokens_per_second"), "50");
  EXPECT_EQ(value("memory_bound_share"), "0.75");         // 300 of 400 layer cycles
  EXPECT_EQ(value("dram_bandwidth_utilization"), "0.5");  // 12.8 of 25.6 GB/s
  EXPECT_EQ(value("busy_share"), "0.4");
  EXPECT_EQ(value("dram_wait_share"), "0.5");
  EXPECT_EQ(value("vector_wait_share"), "0.1");
  EXPECT_EQ(value("idle_share"), "0");
  EXPECT_EQ(value("cycles"), "1000");
  EXPECT_EQ(value("prefill_tokens_per_second"), "800");
  EXPECT_EQ(value("decode_tokens_per_second"), "50");
  EXPECT_EQ(value("decode_joules_per_token"), "0.25");
  EXPECT_EQ(value("watts"), "4");  // 0.004 J over 1 ms
  EXPECT_THROW(MetricsFromRunJson(nlohmann::json::parse(R"({"totals": {}})")), Error);
}

TEST_F(SweepJournalTest, NewFileGetsTheHeaderOnce) {
  {
    SweepJournal j(path_, header_, ids_, false);
    j.Append({"p0", "1", "ok"});
  }
  EXPECT_EQ(Read(), "id,a,status\np0,1,ok\n");
  SweepJournal again(path_, header_, ids_, true);
  again.Append({"p1", "2", "ok"});
  EXPECT_EQ(Read(), "id,a,status\np0,1,ok\np1,2,ok\n");
  EXPECT_EQ(again.done(), (std::set<std::string>{"p0"}));
}

TEST_F(SweepJournalTest, ExistingFileNeedsResume) {
  Write("id,a,status\np0,1,ok\n");
  try {
    SweepJournal j(path_, header_, ids_, false);
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kUsage);
    EXPECT_NE(std::string(e.what()).find("--resume"), std::string::npos);
  }
  EXPECT_EQ(Read(), "id,a,status\np0,1,ok\n");  // untouched
}

TEST_F(SweepJournalTest, ResumeCutsATornFinalRow) {
  Write("id,a,status\np0,1,ok\np1,2,o");
  SweepJournal j(path_, header_, ids_, true);
  EXPECT_EQ(j.done(), (std::set<std::string>{"p0"}));
  j.Append({"p1", "2", "ok"});
  EXPECT_EQ(Read(), "id,a,status\np0,1,ok\np1,2,ok\n");
}

TEST_F(SweepJournalTest, ResumeOfATornHeaderStartsAfresh) {
  Write("id,a,st");
  SweepJournal j(path_, header_, ids_, true);
  EXPECT_TRUE(j.done().empty());
  EXPECT_EQ(Read(), "id,a,status\n");
}

TEST_F(SweepJournalTest, ResumeRejectsAnotherSweepsCsv) {
  Write("id,b,status\np0,1,ok\n");
  EXPECT_THROW(SweepJournal(path_, header_, ids_, true), Error);
  Write("id,a,status\np9,1,ok\n");
  try {
    SweepJournal j(path_, header_, ids_, true);
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_EQ(e.code(), ExitCode::kBadInput);
    EXPECT_EQ(std::string(e.what()).rfind(path_ + ":2: point p9 is not in this sweep", 0), 0u)
        << e.what();
  }
  Write("id,a,status\np0,1,ok\np0,1,ok\n");
  EXPECT_THROW(SweepJournal(path_, header_, ids_, true), Error);
}

TEST_F(SweepJournalTest, ReadingReportsShortRowsWithTheirLine) {
  Write("id,a,status\np0,1,ok\np1,2\n");
  try {
    ReadCsvFile(path_);
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_EQ(std::string(e.what()), path_ + ":3: row has 2 fields, the header 3");
  }
}

}  // namespace
}  // namespace tritsim
