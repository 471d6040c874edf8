// Slurm job-array scripts: the shard command, the directives given, the
// merge over every shard and the afterok dependency.
#include "sweep/slurm_script.h"

#include <gtest/gtest.h>

namespace tritsim {
namespace {

SlurmOptions Options() {
  SlurmOptions o;
  o.dir = "/scratch/run 1";
  o.tritsim_path = "/opt/tritsim/bin/tritsim";
  o.sweep_path = "/home/ana/it's.yaml";
  o.sweep_name = "wren trees";
  o.tasks = 4;
  return o;
}

bool Has(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

TEST(SlurmScript, QuotesPathsForTheShell) {
  EXPECT_EQ(ShellQuote("plain"), "'plain'");
  EXPECT_EQ(ShellQuote("it's"), "'it'\\''s'");
}

TEST(SlurmScript, ArrayRunsOneShardPerTask) {
  const std::string s = SlurmArrayScript(Options());
  EXPECT_TRUE(Has(s, "#SBATCH --array=0-3\n"));
  EXPECT_TRUE(Has(s, "#SBATCH --job-name=tritsim-wren-trees\n"));
  EXPECT_TRUE(Has(s, "TRITSIM='/opt/tritsim/bin/tritsim'\n"));
  EXPECT_TRUE(Has(s, "SWEEP='/home/ana/it'\\''s.yaml'\n"));
  EXPECT_TRUE(Has(s, "--shard \"$SLURM_ARRAY_TASK_ID/$TASKS\""));
  EXPECT_TRUE(Has(s, "--out \"$OUT/shard-$SLURM_ARRAY_TASK_ID.csv\" --jobs 1 --resume"));
  EXPECT_FALSE(Has(s, "--partition"));  // not given: the cluster's default
  EXPECT_FALSE(Has(s, "--time="));
}

TEST(SlurmScript, DirectivesAppearWhenGiven) {
  SlurmOptions o = Options();
  o.partition = "long";
  o.time_limit = "02:00:00";
  o.mem_per_task = "4G";
  for (const std::string& s : {SlurmArrayScript(o), SlurmMergeScript(o)}) {
    EXPECT_TRUE(Has(s, "#SBATCH --partition=long\n"));
    EXPECT_TRUE(Has(s, "#SBATCH --time=02:00:00\n"));
    EXPECT_TRUE(Has(s, "#SBATCH --mem=4G\n"));
  }
}

TEST(SlurmScript, MergeNamesEveryShardAndSubmitWaitsForTheArray) {
  const std::string m = SlurmMergeScript(Options());
  for (int i = 0; i < 4; ++i) EXPECT_TRUE(Has(m, "\"$OUT/shard-" + std::to_string(i) + ".csv\""));
  EXPECT_FALSE(Has(m, "shard-4.csv"));
  EXPECT_TRUE(Has(m, "sweep merge \"$SWEEP\" --out \"$OUT/sweep.csv\""));
  const std::string s = SlurmSubmitScript(Options());
  EXPECT_TRUE(Has(s, "--dependency=afterok:\"$array_job\" merge.sbatch"));
  EXPECT_TRUE(Has(s, "cd '/scratch/run 1'\n"));
}

}  // namespace
}  // namespace tritsim
