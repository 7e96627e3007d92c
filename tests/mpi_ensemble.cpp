// Under mpirun with 2 ranks, `gapwise ensemble` gives exactly the serial result.
// Built and registered only when gapwise is built with MPI (tests/CMakeLists.txt);
// MPIEXEC names the launcher. CI runs as root, so OpenMPI needs
// --allow-run-as-root; --oversubscribe lets 2 ranks run on a 1-core machine.
#include <doctest/doctest.h>

#include <cstdlib>

#include "ensemble_compare.hpp"
#include "io/ensemble_result_file.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::run_gapwise;
using gapwise::testing::TempDir;

TEST_CASE("mpirun -np 2 gives exactly the serial ensemble result") {
  const char* mpiexec = std::getenv("MPIEXEC");
  REQUIRE(mpiexec != nullptr);
  TempDir dir;
  const auto p = [&](const char* f) { return (dir.path / f).string(); };
  const std::string schedule = (gapwise::testing::source_dir() / "schedules" / "linear.toml").string();
  REQUIRE(run_gapwise("generate --graph square --couplings gaussian --sizes 4,6,8 --count 3 --seed 21 --out " + p("set.h5"), dir)
              .exit_code == 0);
  const std::string args = "ensemble " + p("set.h5") + " '" + schedule + "' -d 0.3,1,3 --gap-points 21 --resamples 300 -q ";
  const auto serial = run_gapwise(args + "--threads 1 --out " + p("serial.h5"), dir);
  REQUIRE(serial.exit_code == 0);

  const std::string cmd = std::string("'") + mpiexec + "' --allow-run-as-root --oversubscribe -np 2 '" +
                          gapwise::testing::gapwise_exe() + "' " + args + "--out " + p("mpi.h5") + " >'" + p("mpi.out") +
                          "' 2>&1";
  const int rc = std::system(cmd.c_str());
  REQUIRE(rc == 0);
  const EnsembleResult r = read_ensemble_result(p("mpi.h5"));
  CHECK(r.distribution == "MPI, 2 ranks");
  CHECK(r.computed == 9);
  CHECK(gapwise::testing::ensemble_difference(p("serial.h5"), p("mpi.h5")) == "");
}
