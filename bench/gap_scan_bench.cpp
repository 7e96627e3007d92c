// Gap-scan benchmark: time and peak memory of find_minimum_gap for n = 10..18
// (k = 4 levels, a fixed grid plus Brent refinement, no subdivision), with the
// matrix-free Lanczos solver, and the dense solver beside it where that is
// feasible, all in one run so the ratios are measured under the same load.
// Each case runs in a forked child, so its peak resident memory (wait4's
// ru_maxrss) is its own.
//
//   build/bench/bench_gap_scan                 # n = 10..18, dense up to n = 10
//   build/bench/bench_gap_scan --max-n 14 --dense-max-n 10 --points 11
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <limits>
#include <random>
#include <string>

#include <fmt/format.h>

#include "spectrum/gap_search.hpp"

using namespace gapwise;

namespace {

/// Invented benchmark instance: a ring plus random couplers, couplings in [-1, 1],
/// small random fields when `fields` (seeded, so every run solves the same problem).
IsingProblem bench_problem(int n, bool fields) {
  std::mt19937 rng(20261202u + static_cast<unsigned>(n));
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.couplings.push_back({std::min(i, (i + 1) % n), std::max(i, (i + 1) % n), u(rng)});
  for (int e = 0; e < n; ++e) {
    int i = static_cast<int>(rng() % n), j = static_cast<int>(rng() % n);
    if (i == j || std::abs(i - j) == 1 || std::abs(i - j) == n - 1) continue;
    if (i > j) std::swap(i, j);
    bool dup = false;
    for (const auto& c : p.couplings) dup = dup || (c.i == i && c.j == j);
    if (!dup) p.couplings.push_back({i, j, u(rng)});
  }
  if (fields)
    for (auto& h : p.h) h = 0.2 * u(rng);
  return p;
}

struct CaseResult {
  double seconds = 0, gap = 0, s_star = 0, gap_unc = 0;
  long evaluations = 0;
};

struct Case {
  int n;
  bool fields;
  EigenMethod method;
  bool level_check;
};

CaseResult run_case(const Case& c, int points) {
  const TransverseIsingHamiltonian h(bench_problem(c.n, c.fields));
  GapSearchOptions o;
  o.levels = 4;
  o.method = c.method;
  o.coarse_points = points;
  o.bend_threshold = std::numeric_limits<double>::infinity();  // fixed grid: no subdivision
  o.check_missed_levels = c.level_check;
  const auto t0 = std::chrono::steady_clock::now();
  const MinimumGapReport r = find_minimum_gap(h, EnergyScales::linear(5.0, 5.0), o);
  CaseResult out;
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  out.gap = r.gap_ghz;
  out.s_star = r.s_star;
  out.gap_unc = r.gap_uncertainty_ghz;
  out.evaluations = static_cast<long>(r.evaluations);
  return out;
}

/// Runs a case in a child; returns false when the child failed.
bool run_forked(const Case& c, int points, CaseResult& res, double& peak_mib) {
  int fd[2];
  if (pipe(fd) != 0) return false;
  const pid_t pid = fork();
  if (pid == 0) {
    close(fd[0]);
    CaseResult r;
    try {
      r = run_case(c, points);
    } catch (const std::exception& e) {
      std::fprintf(stderr, "case failed: %s\n", e.what());
      _exit(1);
    }
    if (write(fd[1], &r, sizeof r) != static_cast<ssize_t>(sizeof r)) _exit(1);
    _exit(0);
  }
  close(fd[1]);
  const bool ok = read(fd[0], &res, sizeof res) == static_cast<ssize_t>(sizeof res);
  close(fd[0]);
  int status = 0;
  struct rusage ru {};
  wait4(pid, &status, 0, &ru);
  peak_mib = static_cast<double>(ru.ru_maxrss) / 1024.0;  // KiB on Linux
  return ok && WIFEXITED(status) && WEXITSTATUS(status) == 0;
}

}  // namespace

int main(int argc, char** argv) {
  int min_n = 10, max_n = 18, dense_max_n = 10, points = 21;
  bool sectors = true, no_check = true;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&] { return i + 1 < argc ? std::atoi(argv[++i]) : 0; };
    if (a == "--min-n") min_n = next();
    else if (a == "--max-n") max_n = next();
    else if (a == "--dense-max-n") dense_max_n = next();
    else if (a == "--points") points = next();
    else if (a == "--no-sectors") sectors = false;
    else if (a == "--no-unchecked") no_check = false;
    else {
      std::printf("usage: bench_gap_scan [--min-n N] [--max-n N] [--dense-max-n N] [--points P] [--no-sectors] "
                  "[--no-unchecked]\n");
      return a == "--help" ? 0 : 2;
    }
  }
  std::printf("gap scan, k = 4, %d grid points + Brent refinement, linear 5 GHz scales; random ring+couplers instance\n",
              points);
  std::printf("%3s %-6s %-8s %-7s %6s %9s %10s %9s %14s %10s %11s\n", "n", "space", "solver", "check", "evals",
              "time_s", "ms/eval", "peak_MiB", "gap_ghz", "s*", "|d gap|");
  for (int n = min_n; n <= max_n; ++n) {
    double ref_gap = std::numeric_limits<double>::quiet_NaN();
    std::vector<Case> cases;
    if (n <= dense_max_n) cases.push_back({n, true, EigenMethod::Dense, false});
    cases.push_back({n, true, EigenMethod::Lanczos, true});
    if (no_check && n <= 14) cases.push_back({n, true, EigenMethod::Lanczos, false});
    if (sectors) cases.push_back({n, false, EigenMethod::Lanczos, true});
    for (const Case& c : cases) {
      CaseResult r;
      double peak = 0;
      const bool ok = run_forked(c, points, r, peak);
      const char* space = c.fields ? "full" : "even";
      const char* solver = c.method == EigenMethod::Dense ? "dense" : "lanczos";
      if (!ok) {
        std::printf("%3d %-6s %-8s failed\n", n, space, solver);
        continue;
      }
      if (c.method == EigenMethod::Dense) ref_gap = r.gap;
      const std::string diff =
          c.fields && std::isfinite(ref_gap) && c.method != EigenMethod::Dense ? fmt::format("{:.1e}", std::abs(r.gap - ref_gap)) : "";
      std::printf("%3d %-6s %-8s %-7s %6ld %9.3f %10.2f %9.1f %14.10f %10.7f %11s\n", n, space, solver,
                  c.method == EigenMethod::Dense ? "-" : (c.level_check ? "on" : "off"), r.evaluations, r.seconds,
                  1e3 * r.seconds / std::max(1L, r.evaluations), peak, r.gap, r.s_star, diff.c_str());
      std::fflush(stdout);
    }
  }
  return 0;
}
