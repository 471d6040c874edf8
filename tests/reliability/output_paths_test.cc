// Output paths checked before any work (common/output_paths.h).
#include "common/output_paths.h"

#include <gtest/gtest.h>
#include <stdlib.h>

#include <filesystem>
#include <fstream>

#include "common/error.h"

namespace tritsim {
namespace {

namespace fs = std::filesystem;

class OutputPathsTest : public ::testing::Test {
 protected:
  void SetUp() override {
    char tmpl[] = "/tmp/tritsim-outputs-XXXXXX";
    ASSERT_NE(::mkdtemp(tmpl), nullptr);
    dir_ = tmpl;
  }
  void TearDown() override { fs::remove_all(dir_); }

  // The message of the check of one output, or "ok".
  std::string Check(const std::string& path, OutputKind kind) {
    try {
      CheckOutputPaths({{"--x", path, kind}});
    } catch (const Error& e) {
      EXPECT_EQ(e.code(), ExitCode::kBadInput);
      return e.what();
    }
    return "ok";
  }

  std::string dir_;
};

TEST_F(OutputPathsTest, WritableFolderPassesAndLeavesNothing) {
  EXPECT_EQ(Check(dir_ + "/a.json", OutputKind::kFile), "ok");
  EXPECT_EQ(Check(dir_ + "/plots", OutputKind::kFolder), "ok");
  EXPECT_EQ(Check(dir_, OutputKind::kFolder), "ok");
  EXPECT_EQ(Check("", OutputKind::kFile), "ok");  // not wanted
  EXPECT_TRUE(fs::is_empty(dir_));                // the probe is removed
}

TEST_F(OutputPathsTest, MissingParentIsRefusedForFilesAndFolders) {
  EXPECT_EQ(Check(dir_ + "/no/a.json", OutputKind::kFile),
            dir_ + "/no/a.json: cannot write output file (--x): folder " + dir_ +
                "/no does not exist (tritsim does not create parent folders)");
  EXPECT_NE(Check(dir_ + "/no/plots", OutputKind::kFolder).find("cannot write output folder"),
            std::string::npos);
  EXPECT_FALSE(fs::exists(dir_ + "/no"));
}

TEST_F(OutputPathsTest, WrongKindIsRefused) {
  std::ofstream(dir_ + "/file") << "x";
  EXPECT_EQ(Check(dir_, OutputKind::kFile),
            dir_ + ": cannot write output file (--x): it is a folder");
  EXPECT_NE(Check(dir_ + "/file", OutputKind::kFolder).find("it exists and is not a folder"),
            std::string::npos);
  EXPECT_NE(Check(dir_ + "/file/a.json", OutputKind::kFile).find("is not a folder"),
            std::string::npos);
}

TEST_F(OutputPathsTest, TheFirstBadPathOfAListIsNamed) {
  try {
    CheckOutputPaths({{"--json", dir_ + "/a.json", OutputKind::kFile},
                      {"--csv", dir_ + "/no/b.csv", OutputKind::kFile}});
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("(--csv)"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace tritsim
