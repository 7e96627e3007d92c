// Ensemble throughput: instances per minute of `gapwise ensemble` with 1 and 2
// MPI ranks (and 1 and 2 threads without MPI), measured side by side in one run,
// interleaved and repeated so that a load change on a shared machine hits every
// configuration alike. Reports the median of the repeats and the speed-up ratios.
//
//   build/bench/bench_ensemble_throughput [--sizes lin:6:10:3] [--count 4] [--repeats 3]
#include <algorithm>
#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <iostream>
#include <string>
#include <vector>

#include <unistd.h>

#include <fmt/format.h>

#include "io/instance_set_file.hpp"
#include "io/text_table.hpp"
#include "studies/work_distribution.hpp"

namespace {

double run_seconds(const std::string& cmd) {
  const auto t0 = std::chrono::steady_clock::now();
  if (std::system(cmd.c_str()) != 0) {
    std::cerr << "bench: command failed: " << cmd << "\n";
    std::exit(1);
  }
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v.size() % 2 ? v[v.size() / 2] : 0.5 * (v[v.size() / 2 - 1] + v[v.size() / 2]);
}

}  // namespace

int main(int argc, char** argv) {
  std::string sizes = "lin:6:10:3", exe = GAPWISE_EXE_PATH, mpiexec = GAPWISE_MPIEXEC_PATH;
  int count = 4, repeats = 3;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string a = argv[i];
    if (a == "--sizes") sizes = argv[i + 1];
    else if (a == "--count") count = std::atoi(argv[i + 1]);
    else if (a == "--repeats") repeats = std::atoi(argv[i + 1]);
  }
  namespace fs = std::filesystem;
  const fs::path dir = fs::temp_directory_path() / fmt::format("gapwise-bench-ensemble-{}", static_cast<long>(::getpid()));
  fs::create_directories(dir);
  const std::string set = (dir / "set.h5").string();
  const std::string schedule = std::string(GAPWISE_SOURCE_PATH) + "/schedules/linear.toml";
  run_seconds(fmt::format("'{}' generate --graph ring-chords --couplings gaussian --sizes {} --count {} --seed 3 --out '{}' > /dev/null",
                          exe, sizes, count, set));
  const int instances = static_cast<int>(gapwise::read_instance_set(set).instances.size());
  const std::string study = fmt::format("ensemble '{}' '{}' -d 1,3,10,30 -q --fresh", set, schedule);
  struct Config { std::string label, prefix, extra; };
  std::vector<Config> configs = {{"threads, 1", "", "--threads 1"}, {"threads, 2", "", "--threads 2"}};
  if (gapwise::built_with_mpi() && !mpiexec.empty()) {
    configs.push_back({"MPI, 1 rank", fmt::format("'{}' --allow-run-as-root --oversubscribe -np 1 ", mpiexec), ""});
    configs.push_back({"MPI, 2 ranks", fmt::format("'{}' --allow-run-as-root --oversubscribe -np 2 ", mpiexec), ""});
  }
  std::vector<std::vector<double>> times(configs.size());
  for (int r = 0; r < repeats; ++r)
    for (std::size_t c = 0; c < configs.size(); ++c) {
      const std::string out = (dir / fmt::format("r{}.h5", c)).string();
      times[c].push_back(run_seconds(fmt::format("{}'{}' {} {} --out '{}' >/dev/null", configs[c].prefix, exe, study,
                                                 configs[c].extra, out)));
    }
  std::cout << fmt::format("ensemble throughput: {} instances (sizes {}, {} per size), 4 durations 1..30 ns, {} repeats\n",
                           instances, sizes, count, repeats);
  gapwise::TextTable t({"configuration", "median wall s", "instances per minute", "speed-up vs same kind with 1"});
  for (std::size_t c = 0; c < configs.size(); ++c) {
    const double m = median(times[c]);
    const double base = median(times[c % 2 == 0 ? c : c - 1]);
    t.add({configs[c].label, gapwise::fmt_num(m, 4), gapwise::fmt_num(60.0 * instances / m, 4), gapwise::fmt_num(base / m, 3)});
  }
  std::cout << t.render();
  fs::remove_all(dir);
  return 0;
}
