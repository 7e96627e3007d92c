// Under mpirun with 2 ranks, `gapwise ensemble` gives exactly the serial result.
// Built and registered only when gapwise is built with MPI (tests/CMakeLists.txt);
// MPIEXEC names the launcher. CI runs as root, so OpenMPI needs
// --allow-run-as-root; --oversubscribe lets 2 ranks run on a 1-core machine.
#include <doctest/doctest.h>

#include <cstdlib>

#include <fmt/format.h>

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
  CHECK(r.distribution.rfind("MPI, 2 ranks, ", 0) == 0);
  CHECK(r.computed == 9);
  CHECK(gapwise::testing::ensemble_difference(p("serial.h5"), p("mpi.h5")) == "");
}

TEST_CASE("ranks x threads: 2 ranks with OMP_NUM_THREADS=1 and =2 give the serial result; each reports its threads") {
  // The threads of a rank split the amplitude loops of one instance (OpenMP
  // regions from 2^16 amplitudes up); the numbers must not depend on how many.
  const char* mpiexec = std::getenv("MPIEXEC");
  REQUIRE(mpiexec != nullptr);
  TempDir dir;
  const auto p = [&](const std::string& f) { return (dir.path / f).string(); };
  const std::string schedule = (gapwise::testing::source_dir() / "schedules" / "linear.toml").string();
  REQUIRE(run_gapwise("generate --graph square --couplings gaussian --sizes 4,6 --count 2 --seed 5 --out " + p("set.h5"), dir)
              .exit_code == 0);
  const std::string args = "ensemble " + p("set.h5") + " '" + schedule + "' -d 0.3,1,3 --gap-points 21 --resamples 300 -q ";
  REQUIRE(run_gapwise(args + "--threads 1 --out " + p("serial.h5"), dir).exit_code == 0);
  for (int threads : {1, 2}) {
    CAPTURE(threads);
    const std::string out = p(fmt::format("mpi{}.h5", threads));
    const std::string cmd = fmt::format("OMP_NUM_THREADS={} '{}' --allow-run-as-root --oversubscribe -np 2 -x OMP_NUM_THREADS '{}' {}--out {} >'{}' 2>&1",
                                        threads, mpiexec, gapwise::testing::gapwise_exe(), args, out, out + ".log");
    REQUIRE(std::system(cmd.c_str()) == 0);
    const EnsembleResult r = read_ensemble_result(out);
    CHECK(r.distribution == fmt::format("MPI, 2 ranks, {} thread{} each", threads, threads == 1 ? "" : "s"));
    CHECK(r.computed == 4);
    CHECK(gapwise::testing::ensemble_difference(p("serial.h5"), out) == "");
  }
}
