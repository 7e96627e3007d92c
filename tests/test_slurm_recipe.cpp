// The documented Slurm job-array recipe (scripts/slurm-ensemble-array.sh and the
// user guide's "Running on a cluster"), run without Slurm: each array task is the
// script with SLURM_ARRAY_TASK_ID / SLURM_ARRAY_TASK_COUNT set as Slurm sets them
// (Slurm sbatch(1), "OUTPUT ENVIRONMENT VARIABLES"), then the shards are joined with
// `gapwise merge-shards` and compared with one unsharded run: sharding must not
// change a number (the study's own design rule, checked by ensemble_difference).
#include <doctest/doctest.h>

#include <cstdlib>
#include <string>

#include "ensemble_compare.hpp"
#include "test_support.hpp"

using gapwise::testing::TempDir;
using gapwise::testing::run_gapwise;
using gapwise::testing::ensemble_difference;

TEST_CASE("Slurm job-array recipe: three array tasks merged equal one unsharded run") {
  TempDir dir;
  const auto p = [&](const std::string& f) { return (dir.path / f).string(); };
  const auto src = gapwise::testing::source_dir();
  const std::string schedule = "'" + (src / "schedules/linear.toml").string() + "'";
  REQUIRE(run_gapwise("generate --graph complete --couplings gaussian --sizes lin:3:5:3 --count 2 --seed 4 --out '" +
                          p("set.h5") + "'",
                      dir)
              .exit_code == 0);
  const std::string options = " -d 0.3,1,3 --gap-points 21 --resamples 200 -q --threads 1";
  REQUIRE(run_gapwise("ensemble '" + p("set.h5") + "' " + schedule + options + " --out '" + p("whole.h5") + "'", dir)
              .exit_code == 0);
  const std::string script = "'" + (src / "scripts/slurm-ensemble-array.sh").string() + "'";
  for (int task = 0; task < 3; ++task) {
    const std::string cmd = "cd '" + dir.path.string() + "' && SLURM_ARRAY_TASK_ID=" + std::to_string(task) +
                            " SLURM_ARRAY_TASK_COUNT=3 GAPWISE='" + gapwise::testing::gapwise_exe() + "' sh " + script +
                            " set.h5 " + schedule + " study" + options + " >/dev/null 2>&1";
    INFO(cmd);
    REQUIRE(std::system(cmd.c_str()) == 0);
  }
  const auto merged = run_gapwise("merge-shards '" + p("study-shard-0.h5") + "' '" + p("study-shard-1.h5") + "' '" +
                                      p("study-shard-2.h5") + "' --out '" + p("study.h5") + "'",
                                  dir);
  REQUIRE(merged.exit_code == 0);
  CHECK(ensemble_difference(p("whole.h5"), p("study.h5")) == "");
  CHECK(ensemble_difference(p("whole.h5"), p("study-shard-1.h5")) != "");  // the comparison can fail

  // Outside an array the script says what is missing instead of running shard "/".
  const std::string bare = "cd '" + dir.path.string() + "' && env -u SLURM_ARRAY_TASK_ID sh " + script +
                           " set.h5 " + schedule + " study 2>/dev/null";
  CHECK(std::system(bare.c_str()) != 0);
}
