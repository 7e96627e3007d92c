#pragma once
// Small helpers shared by the tests: where the sources and the built tool are,
// temporary files, and running the command line.
#include <algorithm>
#include <chrono>
#include <csignal>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>
#include <string>
#include <thread>
#include <vector>
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

/// Records in a result journal (every non-empty line that is not a # comment).
inline int journal_records(const std::filesystem::path& p) {
  std::ifstream f(p);
  std::string line;
  int n = 0;
  while (std::getline(f, line))
    if (!line.empty() && line[0] != '#') ++n;
  return n;
}

struct KilledRun {
  bool finished_early = false;  ///< the child ended before `records` were journaled
  bool kill_sent = false;       ///< kill(SIGKILL) succeeded
  bool reaped = false;          ///< waitpid returned the child
  int status = 0;               ///< its wait status
};

/// Runs gapwise with `args` in a child process (output to /dev/null) and kills
/// it with SIGKILL once `journal` holds `records` records (or after `limit`),
/// so nothing of the child runs at exit: what a crash leaves behind.
inline KilledRun run_and_kill_when_journaled(const std::vector<std::string>& args,
                                             const std::filesystem::path& journal, int records,
                                             std::chrono::milliseconds poll,
                                             std::chrono::minutes limit = std::chrono::minutes(5)) {
  std::vector<std::string> argv_s{gapwise_exe()};
  argv_s.insert(argv_s.end(), args.begin(), args.end());
  std::vector<char*> argv;
  for (auto& a : argv_s) argv.push_back(a.data());
  argv.push_back(nullptr);
  KilledRun r;
  const pid_t pid = ::fork();
  if (pid < 0) return r;
  if (pid == 0) {
    std::freopen("/dev/null", "w", stdout);
    std::freopen("/dev/null", "w", stderr);
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  const auto deadline = std::chrono::steady_clock::now() + limit;
  while (journal_records(journal) < records && std::chrono::steady_clock::now() < deadline) {
    int st = 0;
    if (::waitpid(pid, &st, WNOHANG) == pid) {
      r.finished_early = true;
      r.reaped = true;
      r.status = st;
      return r;
    }
    std::this_thread::sleep_for(poll);
  }
  r.kill_sent = ::kill(pid, SIGKILL) == 0;
  r.reaped = ::waitpid(pid, &r.status, 0) == pid;
  return r;
}

}  // namespace gapwise::testing
