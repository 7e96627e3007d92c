#pragma once
// Small helpers shared by the tests: where the sources and the built tool are,
// temporary files, and running the command line.
#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>
#include <string>
#include <sys/wait.h>
#include <unistd.h>

#include "problem/ising_problem.hpp"

#include "io/input_error.hpp"

namespace gapwise::testing {

inline std::filesystem::path source_dir() {
  const char* d = std::getenv("GAPWISE_SOURCE_DIR");
  return d ? std::filesystem::path(d) : std::filesystem::path(GAPWISE_TEST_SOURCE_FALLBACK);
}

inline std::string gapwise_exe() {
  const char* e = std::getenv("GAPWISE_EXE");
  return e ? std::string(e) : std::string("gapwise");
}

/// A fresh directory under the system temp dir, removed when the object dies.
struct TempDir {
  std::filesystem::path path;
  TempDir() {
    static int counter = 0;
    path = std::filesystem::temp_directory_path() /
           ("gapwise-test-" + std::to_string(::getpid()) + "-" + std::to_string(counter++));
    std::filesystem::create_directories(path);
  }
  ~TempDir() { std::error_code ec; std::filesystem::remove_all(path, ec); }
  std::filesystem::path write(const std::string& name, const std::string& text) const {
    auto p = path / name;
    std::ofstream(p) << text;
    return p;
  }
};

/// Runs `f`, which must throw an InputError, and returns that error; returns
/// std::nullopt when nothing (or something else) was thrown.
template <class F>
std::optional<gapwise::InputError> input_error_of(F&& f) {
  try {
    f();
  } catch (const gapwise::InputError& e) {
    return e;
  } catch (...) {
  }
  return std::nullopt;
}

/// Uniform ferromagnetic ring: J_{i,i+1} = -1 on every bond (periodic), no fields.
inline IsingProblem ferromagnetic_ring(int n) {
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) {
    const int j = (i + 1) % n;
    p.couplings.push_back({std::min(i, j), std::max(i, j), -1.0});
  }
  return p;
}

struct CommandResult { int exit_code; std::string out; std::string err; };

/// Runs the gapwise executable with the given argument string; captures stdout and stderr.
inline CommandResult run_gapwise(const std::string& args, const TempDir& dir) {
  auto out = dir.path / "stdout.txt", err = dir.path / "stderr.txt";
  std::string cmd = "'" + gapwise_exe() + "' " + args + " >'" + out.string() + "' 2>'" + err.string() + "'";
  int rc = std::system(cmd.c_str());
  auto slurp = [](const std::filesystem::path& p) {
    std::ifstream f(p); return std::string((std::istreambuf_iterator<char>(f)), {});
  };
  return {WIFEXITED(rc) ? WEXITSTATUS(rc) : -1, slurp(out), slurp(err)};
}

}  // namespace gapwise::testing
