// What a process may use on a shared node: the default thread count honours the
// CPU affinity mask and OMP_NUM_THREADS (OpenMP 5.2 spec, sec. 6.2 "OMP_NUM_THREADS":
// a list whose first entry sets the outermost level; sched_getaffinity(2), Linux
// man-pages), and the memory check honours cgroup limits (Linux kernel docs,
// admin-guide/cgroup-v2.rst: memory.max / memory.current, "max" = no limit;
// cgroup-v1/memory.rst: memory.limit_in_bytes / memory.usage_in_bytes) and the
// MPI ranks sharing a node (OpenMPI sets OMPI_COMM_WORLD_LOCAL_SIZE; mpirun(1)).
#include <doctest/doctest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include "hamiltonian/memory_budget.hpp"
#include "platform/thread_count.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::TempDir;

namespace {
void put(const std::filesystem::path& file, const std::string& text) {
  std::filesystem::create_directories(file.parent_path());
  std::ofstream(file) << text;
}
constexpr double kGiB = 1024.0 * 1024.0 * 1024.0;
}  // namespace

TEST_CASE("default thread count: OMP_NUM_THREADS first, else the affinity mask") {
  CHECK(default_thread_count(std::nullopt, 3) == 3);
  CHECK(default_thread_count(std::string("5"), 3) == 5);
  CHECK(default_thread_count(std::string("4,2"), 3) == 4);   // outermost level of a nested list
  CHECK(default_thread_count(std::string("0"), 3) == 3);     // not a valid count: ignored
  CHECK(default_thread_count(std::string("abc"), 3) == 3);
  CHECK(default_thread_count(std::string(""), 2) == 2);
  CHECK(default_thread_count(std::nullopt, 0) >= 1);         // mask unknown: the machine's count
  CHECK(affinity_cpu_count() >= 1);
}

TEST_CASE("threads of an MPI rank: OMP_NUM_THREADS first, else the mask capped at the rank's share of the node") {
  // Common practice for hybrid MPI+OpenMP jobs: ranks x threads per rank <= cores of the node.
  CHECK(threads_per_rank(std::nullopt, 4, 16, 2) == 4);          // bound to 4 CPUs: all 4
  CHECK(threads_per_rank(std::nullopt, 8, 16, 4) == 4);          // bound to a socket of 8 with 4 ranks on 16 CPUs
  CHECK(threads_per_rank(std::nullopt, 16, 16, 32) == 1);        // more ranks than CPUs: at least 1
  CHECK(threads_per_rank(std::string("3"), 8, 16, 8) == 3);      // OMP_NUM_THREADS decides, even above the share
  CHECK(threads_per_rank(std::string("abc"), 8, 16, 4) == 4);    // ignored as OpenMP does
  CHECK(threads_per_rank(std::nullopt, 2, 0, 2) == 2);           // node size unknown: the mask
}

TEST_CASE("ensemble's default threads: one under taskset -c 0, OMP_NUM_THREADS when set") {
  if (std::system("taskset -c 0 true >/dev/null 2>&1") != 0) {
    MESSAGE("taskset is not available; skipped");
    return;
  }
  TempDir dir;
  // Two small instances (a folder of problem files): the run takes a fraction of a second.
  std::filesystem::create_directories(dir.path / "set");
  dir.write("set/a.toml", "qubits = 3\ncouplings = [[0, 1, 1.0], [1, 2, -0.5], [0, 2, 0.75]]\nfields = [0.2, 0.0, -0.1]\n");
  dir.write("set/b.toml", "qubits = 2\ncouplings = [[0, 1, 1.0]]\nfields = [0.3, -0.2]\n");
  const std::string set = "'" + (dir.path / "set").string() + "'";
  const std::string sched = "'" + (testing::source_dir() / "schedules/linear.toml").string() + "'";
  const std::string exe = "'" + testing::gapwise_exe() + "'";
  auto run = [&](const std::string& prefix, const std::string& name) {
    const std::string cmd = prefix + " " + exe + " ensemble " + set + " " + sched + " -d 0.5 --quiet --out '" +
                            (dir.path / name).string() + "' > '" + (dir.path / (name + ".txt")).string() + "' 2>&1";
    CHECK(std::system(cmd.c_str()) == 0);
    std::ifstream f(dir.path / (name + ".txt"));
    return std::string(std::istreambuf_iterator<char>(f), {});
  };
  // Before: std::thread::hardware_concurrency, i.e. every CPU of the machine.
  CHECK(run("env -u OMP_NUM_THREADS taskset -c 0", "a.h5").find("threads (1)") != std::string::npos);
  CHECK(run("env OMP_NUM_THREADS=3", "b.h5").find("threads (3)") != std::string::npos);
}

TEST_CASE("memory check: cgroup v2 limits of the group and its ancestors, MemAvailable, ranks per node") {
  TempDir dir;
  SystemFiles f{(dir.path / "meminfo").string(), (dir.path / "self_cgroup").string(), (dir.path / "cg").string()};
  put(f.meminfo, "MemTotal: 67108864 kB\nMemAvailable: 33554432 kB\n");  // 32 GiB available
  put(f.self_cgroup, "0::/job/step\n");
  SUBCASE("no limit anywhere: MemAvailable") {
    put(dir.path / "cg/job/step/memory.max", "max\n");
    CHECK(available_bytes(f, 1) == doctest::Approx(32 * kGiB));
  }
  SUBCASE("the job's limit minus its use") {
    put(dir.path / "cg/job/step/memory.max", "max\n");
    put(dir.path / "cg/job/memory.max", std::to_string(4 * 1073741824LL) + "\n");
    put(dir.path / "cg/job/memory.current", std::to_string(1073741824LL) + "\n");
    CHECK(available_bytes(f, 1) == doctest::Approx(3 * kGiB));
    CHECK(available_bytes(f, 3) == doctest::Approx(1 * kGiB));  // three ranks on the node share it
  }
  SUBCASE("the tighter of two nested limits") {
    put(dir.path / "cg/job/memory.max", std::to_string(8 * 1073741824LL));
    put(dir.path / "cg/job/step/memory.max", std::to_string(2 * 1073741824LL));
    put(dir.path / "cg/job/step/memory.current", "0");
    CHECK(available_bytes(f, 1) == doctest::Approx(2 * kGiB));
  }
}

TEST_CASE("memory check: cgroup v1 memory controller; its 'no limit' value is ignored") {
  TempDir dir;
  SystemFiles f{(dir.path / "meminfo").string(), (dir.path / "self_cgroup").string(), (dir.path / "cg").string()};
  put(f.meminfo, "MemAvailable: 16777216 kB\n");  // 16 GiB
  put(f.self_cgroup, "12:cpu,cpuacct:/slurm/job7\n11:memory:/slurm/job7\n");
  put(dir.path / "cg/memory/memory.limit_in_bytes", "9223372036854771712\n");  // v1's "unlimited"
  put(dir.path / "cg/memory/slurm/job7/memory.limit_in_bytes", std::to_string(6 * 1073741824LL));
  put(dir.path / "cg/memory/slurm/job7/memory.usage_in_bytes", std::to_string(2 * 1073741824LL));
  CHECK(available_bytes(f, 1) == doctest::Approx(4 * kGiB));
  CHECK(available_bytes(f, 2) == doctest::Approx(2 * kGiB));
}
