// End-to-end sweeps through the tritsim binary: each point's row agrees
// exactly with running that point alone, shards merge into the unsharded
// result, and merge catches missing and duplicated points.
#include <gtest/gtest.h>
#include <stdlib.h>
#include <sys/wait.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include <nlohmann/json.hpp>

#include "sweep/sweep_csv.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

// Two axes, 3 x 4 = 12 points of one decode step of Wren-0.7B cut to 2
// layers (written beside the sweep by the fixture; about 0.05 s a point).
const char* const kSweep =
    "name: wren-small\n"
    "base:\n"
    "  model: wren-2-layers.yaml\n"
    "  workload: {decode: 1}\n"
    "axes:\n"
    "  arch.array.trees: [32, 64, 128]\n"
    "  workload.batch: {from: 1, to: 64, factor: 4}\n";

// models/wren-0.7b.yaml with `layers: 26` replaced by `layers: 2`.
std::string TwoLayerWren() {
  std::ifstream in(TRITSIM_SOURCE_DIR "/models/wren-0.7b.yaml");
  std::ostringstream text;
  text << in.rdbuf();
  std::string yaml = text.str();
  const size_t at = yaml.find("\nlayers: 26");
  if (at != std::string::npos) yaml.replace(at, 11, "\nlayers: 2");
  return yaml;
}

class SweepRunTest : public ::testing::Test {
 protected:
  void SetUp() override {
    char tmpl[] = "/tmp/tritsim-sweep-XXXXXX";
    ASSERT_NE(::mkdtemp(tmpl), nullptr);
    dir_ = tmpl;
    sweep_ = dir_ + "/wren-small.yaml";
    std::ofstream(sweep_) << kSweep;
    const std::string model = TwoLayerWren();
    ASSERT_NE(model.find("\nlayers: 2\n"), std::string::npos) << "wren-0.7b.yaml changed shape";
    std::ofstream(dir_ + "/wren-2-layers.yaml") << model;
  }
  void TearDown() override { fs::remove_all(dir_); }

  // Runs tritsim with `args`; returns its exit code. stderr goes to dir_/err.
  int Tritsim(const std::string& args) {
    const std::string cmd = std::string(TRITSIM_BINARY) + " " + args + " 2>" + dir_ + "/err";
    const int status = std::system(cmd.c_str());
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  std::string Err() {
    std::ifstream in(dir_ + "/err");
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
  }
  std::string Path(const std::string& name) const { return dir_ + "/" + name; }

  // Rows keyed by id, without json_path (which names the shard's folder).
  std::map<std::string, std::vector<std::string>> RowsById(const std::string& csv) {
    const CsvTable t = ReadCsvFile(csv);
    std::map<std::string, std::vector<std::string>> rows;
    const size_t json_path = ColumnIndex(t.header, "json_path", csv, "test");
    for (std::vector<std::string> r : t.rows) {
      r.erase(r.begin() + long(json_path));  // differs between shards and the whole
      rows[r.front()] = r;
    }
    return rows;
  }

  std::string dir_, sweep_;
};

nlohmann::json ReadJson(const std::string& path) {
  std::ifstream in(path);
  return nlohmann::json::parse(in);
}

TEST_F(SweepRunTest, EveryRowMatchesTheSameRunAlone) {
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --out " + Path("all.csv") + " --jobs 2 -q"), 0) << Err();
  const CsvTable t = ReadCsvFile(Path("all.csv"));
  ASSERT_EQ(t.rows.size(), 12u);
  const auto col = [&](const std::string& name) {
    return size_t(std::find(t.header.begin(), t.header.end(), name) - t.header.begin());
  };
  std::set<std::string> ids;
  for (const std::vector<std::string>& row : t.rows) {
    ASSERT_EQ(row[col("status")], "ok") << row[col("error")];
    EXPECT_TRUE(ids.insert(row[0]).second) << "duplicate " << row[0];
    const std::string alone = Path("alone-" + row[0] + ".json");
    ASSERT_EQ(Tritsim("run --model " + Path("wren-2-layers.yaml") + " --set arch.array.trees=" +
                      row[col("arch.array.trees")] + " --decode 1 --batch " +
                      row[col("workload.batch")] + " --json " + alone + " -q"),
              0)
        << Err();
    const nlohmann::json solo = ReadJson(alone);
    const nlohmann::json swept = ReadJson(row[col("json_path")]);
    EXPECT_EQ(swept["totals"], solo["totals"]) << row[0];
    EXPECT_EQ(std::strtod(row[col("tokens_per_second")].c_str(), nullptr),
              solo["totals"]["tokens_per_second"].get<double>());
    EXPECT_EQ(row[col("cycles")], std::to_string(solo["totals"]["cycles"].get<uint64_t>()));
    EXPECT_EQ(std::strtod(row[col("joules_per_token")].c_str(), nullptr),
              solo["totals"]["joules_per_token"].get<double>());
  }
}

TEST_F(SweepRunTest, ShardsMergeIntoTheUnshardedResult) {
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --out " + Path("all.csv") + " --jobs 2 -q"), 0) << Err();
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --shard 0/2 --out " + Path("s0.csv") + " --jobs 2 -q"),
            0);
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --shard 1/2 --out " + Path("s1.csv") + " --jobs 2 -q"),
            0);
  EXPECT_EQ(ReadCsvFile(Path("s0.csv")).rows.size(), 6u);
  ASSERT_EQ(Tritsim("sweep merge " + sweep_ + " --out " + Path("merged.csv") + " " +
                    Path("s1.csv") + " " + Path("s0.csv")),
            0)
      << Err();
  EXPECT_EQ(RowsById(Path("merged.csv")), RowsById(Path("all.csv")));
  // Merged rows come in point order.
  const CsvTable merged = ReadCsvFile(Path("merged.csv"));
  for (size_t i = 1; i < merged.rows.size(); ++i)
    EXPECT_LT(merged.rows[i - 1][0], merged.rows[i][0]);
}

TEST_F(SweepRunTest, MergeReportsMissingAndDuplicatedPoints) {
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --shard 0/2 --out " + Path("s0.csv") + " --jobs 2 -q"),
            0);
  EXPECT_EQ(Tritsim("sweep merge " + sweep_ + " --out " + Path("m.csv") + " " + Path("s0.csv")), 3);
  EXPECT_NE(Err().find("6 missing (p0001-"), std::string::npos) << Err();
  EXPECT_FALSE(fs::exists(Path("m.csv")));
  EXPECT_EQ(Tritsim("sweep merge " + sweep_ + " --out " + Path("m.csv") + " " + Path("s0.csv") +
                    " " + Path("s0.csv")),
            3);
  EXPECT_NE(Err().find("6 duplicated (p0000-"), std::string::npos) << Err();
  EXPECT_FALSE(fs::exists(Path("m.csv")));
}

// The point ids, from --dry-run.
std::vector<std::string> DryRunIds(const std::string& listing) {
  std::vector<std::string> ids;
  std::istringstream in(listing);
  std::string line;
  while (std::getline(in, line)) ids.push_back(line.substr(0, line.find(' ')));
  return ids;
}

TEST_F(SweepRunTest, FailingPointIsRecordedAndTheSweepGoesOn) {
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --dry-run -q >" + Path("list")), 0);
  std::ifstream list(Path("list"));
  std::ostringstream text;
  text << list.rdbuf();
  const std::vector<std::string> ids = DryRunIds(text.str());
  ASSERT_EQ(ids.size(), 12u);
  // A directory where point 3's JSON must go makes that child's atomic
  // rename fail: a genuine runtime failure of one point.
  fs::create_directories(Path("f.csv.points/" + ids[3] + ".json"));
  ASSERT_EQ(Tritsim("sweep " + sweep_ + " --out " + Path("f.csv") + " --jobs 2 -q"), 0) << Err();
  const CsvTable t = ReadCsvFile(Path("f.csv"));
  ASSERT_EQ(t.rows.size(), 12u);
  // Columns: id, 2 axes, status, error, the first metric ...
  ASSERT_EQ(t.header[3], "status");
  for (const std::vector<std::string>& row : t.rows) {
    const std::string& status = row[3];
    const std::string& error = row[4];
    if (row[0] != ids[3]) {
      EXPECT_EQ(status, "ok") << error;
      continue;
    }
    EXPECT_EQ(status, "failed");
    EXPECT_EQ(error.rfind("exit 3: ", 0), 0u) << error;
    // The point's run refuses its --json (a folder) before simulating.
    EXPECT_NE(error.find("cannot write output file (--json): it is a folder"), std::string::npos)
        << error;
    EXPECT_EQ(row[ColumnIndex(t.header, "json_path", "", "")], "");
    EXPECT_EQ(row[5], "");  // no metrics
  }
}

TEST_F(SweepRunTest, EveryPointFailingExitsFour) {
  std::ofstream(Path("two.yaml")) << "name: two\n"
                                     "base: {model: " TRITSIM_SOURCE_DIR
                                     "/models/wren-0.7b.yaml}\n"
                                     "axes: {model.layers: [1, 2]}\n";
  ASSERT_EQ(Tritsim("sweep " + Path("two.yaml") + " --dry-run -q >" + Path("list")), 0);
  std::ifstream list(Path("list"));
  std::ostringstream text;
  text << list.rdbuf();
  for (const std::string& id : DryRunIds(text.str())) {
    fs::create_directories(Path("two.csv.points/" + id + ".json"));
  }
  EXPECT_EQ(Tritsim("sweep " + Path("two.yaml") + " --out " + Path("two.csv") + " -q"), 4);
  EXPECT_EQ(ReadCsvFile(Path("two.csv")).rows.size(), 2u);
}

}  // namespace
}  // namespace tritsim
