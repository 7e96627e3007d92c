// Gap-scan benchmark: time and peak memory of find_minimum_gap for n = 10..18
// (k = 4 levels, a fixed grid plus Brent refinement, no subdivision), with the
// matrix-free Lanczos solver, and the dense solver beside it where that is
// feasible, all in one run so the ratios are measured under the same load.
// Each case runs in a forked child, so its peak resident memory (wait4's
// ru_maxrss) is its own.
//
//   build/bench/bench_gap_scan                 # n = 10..18, dense up to n = 10
//   build/bench/bench_gap_scan --max-n 14 --dense-max-n 10 --points 11
//
// Problem classes (--classes): the default gap search (warm-started, adaptive
// grid), the cold search on the old 101-point grid, and bench/scipy_gap_scan.py
// (eigsh on 101 points plus bounded Brent to the tool's s uncertainty) on the
// same problem, side by side in one run, with ratios:
//   build/bench/bench_gap_scan --classes --sizes 12,14 [--python /usr/bin/python3]
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <algorithm>
#include <cstring>
#include <sstream>
#include <limits>
#include <random>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "problem/instance_families.hpp"
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

// ---- problem classes -------------------------------------------------------

/// Invented benchmark classes (seeded). "glass-fields": +-1 ring plus n/2 chords,
/// fields +-0.15, one coupling 0.3; "gaussian": N(0,1) couplings on ring plus chords,
/// N(0, 0.3^2) fields; "qubo": random QUBO (diagonal in [-2, 1], a third of the pairs
/// in [-1, 1]) converted exactly; "glass": the +-1 glass without fields (even sector).
IsingProblem class_problem(const std::string& kind, int n) {
  std::mt19937 rng(20261204u + static_cast<unsigned>(n));
  if (kind == "gaussian") {
    FamilySpec f;
    f.graph = GraphKind::RingPlusChords;
    f.couplings = CouplingKind::Gaussian;
    f.seed = 2026;
    IsingProblem p = generate_instance(f, n, 0).problem;
    std::normal_distribution<double> g(0.0, 0.3);
    for (auto& h : p.h) h = g(rng);
    return p;
  }
  if (kind == "qubo") {
    std::uniform_real_distribution<double> u(-1.0, 1.0), d(-2.0, 1.0);
    QuboProblem q;
    q.variables = n;
    for (int i = 0; i < n; ++i)
      for (int j = i; j < n; ++j)
        if (i == j || rng() % 3 == 0) q.terms.push_back({i, j, i == j ? d(rng) : u(rng)});
    return qubo_to_ising(q);
  }
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.couplings.push_back({std::min(i, (i + 1) % n), std::max(i, (i + 1) % n), 1.0});
  while (static_cast<int>(p.couplings.size()) < n + n / 2) {
    int i = static_cast<int>(rng() % n), j = static_cast<int>(rng() % n);
    if (i > j) std::swap(i, j);
    bool dup = i == j;
    for (const auto& c : p.couplings) dup = dup || (c.i == i && c.j == j);
    if (!dup) p.couplings.push_back({i, j, 1.0});
  }
  for (auto& c : p.couplings) c.value = rng() % 2 ? 1.0 : -1.0;
  if (kind == "glass-fields") {
    p.couplings[0].value = 0.3;
    for (auto& h : p.h) h = rng() % 2 ? 0.15 : -0.15;
  }
  return p;
}

struct ClassRun {
  double seconds = 0, gap = 0, gap_unc = 0, s_star = 0, s_unc = 0;
  long evaluations = 0, operations = 0;
};

ClassRun run_class(const IsingProblem& p, bool warm, int points) {
  const TransverseIsingHamiltonian h(p);
  GapSearchOptions o;
  o.warm_start = warm;
  if (points > 0) o.coarse_points = points;
  const auto t0 = std::chrono::steady_clock::now();
  const MinimumGapReport r = find_minimum_gap(h, EnergyScales::linear(5.0, 5.0), o);
  ClassRun c;
  c.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  c.gap = r.gap_ghz;
  c.gap_unc = r.gap_uncertainty_ghz;
  c.s_star = r.s_star;
  c.s_unc = r.s_star_uncertainty;
  c.evaluations = static_cast<long>(r.evaluations);
  c.operations = r.operator_applications;
  return c;
}

int class_rows(const std::vector<int>& sizes, const std::string& python, const std::string& script, bool scipy, const std::vector<std::string>& kinds) {
  std::printf("gap search by problem class: linear 5 GHz scales, k = 4, s tolerance 1e-6; times in one run, "
              "side by side (busy machine: the ratios are what count)\n");
  std::printf("  default = warm-started LevelTracker, default grid; cold101 = every point a cold Lanczos solve on "
              "101 grid points (the previous default);\n  scipy = eigsh (tol 0) on 101 points + bounded Brent "
              "(xatol = the tool's s uncertainty), bench/scipy_gap_scan.py\n");
  std::printf("%3s %-13s %-8s %6s %8s %9s %17s %9s %14s %9s %8s\n", "n", "class", "run", "evals", "H_ops", "time_s",
              "gap_ghz", "+-", "s*", "+-", "scipy/x");
  for (int n : sizes)
    for (const std::string& kind : kinds) {
      const IsingProblem p = class_problem(kind, n);
      const ClassRun w = run_class(p, true, 0);
      const ClassRun c = run_class(p, false, 101);
      double scipy_s = std::numeric_limits<double>::quiet_NaN(), scipy_gap = 0, scipy_star = 0;
      long scipy_evals = 0;
      if (scipy) {
        std::string cpl, fld;
        for (const auto& e : p.couplings) cpl += fmt::format("{},{},{:.17g};", e.i, e.j, e.value);
        if (p.has_fields())
          for (double h : p.h) fld += fmt::format("{:.17g},", h);
        const std::string out = fmt::format("/tmp/gapwise-scipy-gap-{}.txt", getpid());
        const std::string cmd =
            fmt::format("{} {} --qubits {} --couplings '{}' {} --points 101 --xatol {:.3g} > '{}'", python, script, n,
                        cpl, fld.empty() ? "" : "--fields='" + fld + "'", std::max(w.s_unc, 1e-9), out);
        if (std::system(cmd.c_str()) == 0) {
          if (FILE* f = std::fopen(out.c_str(), "r")) {
            if (std::fscanf(f, "s_star %lf gap %lf evaluations %ld wall %lf", &scipy_star, &scipy_gap, &scipy_evals,
                            &scipy_s) != 4)
              scipy_s = std::numeric_limits<double>::quiet_NaN();
            std::fclose(f);
          }
        }
        std::remove(out.c_str());
      }
      auto row = [&](const char* name, long ev, long ops, double t, double gap, double gu, double ss, double su) {
        std::printf("%3d %-13s %-8s %6ld %8s %9.3f %17.12f %9.1e %14.9f %9.1e %8s\n", n, kind.c_str(), name, ev,
                    ops > 0 ? fmt::format("{}", ops).c_str() : "-", t, gap, gu, ss, su,
                    std::isfinite(scipy_s) ? fmt::format("{:.1f}x", scipy_s / t).c_str() : "-");
      };
      row("default", w.evaluations, w.operations, w.seconds, w.gap, w.gap_unc, w.s_star, w.s_unc);
      row("cold101", c.evaluations, 0, c.seconds, c.gap, c.gap_unc, c.s_star, c.s_unc);
      if (std::isfinite(scipy_s)) {
        row("scipy", scipy_evals, 0, scipy_s, scipy_gap, 0.0, scipy_star, 0.0);
        std::printf("    |gap - scipy| = %.1e GHz, |s* - scipy| = %.1e\n", std::abs(w.gap - scipy_gap),
                    std::abs(w.s_star - scipy_star));
      }
      std::fflush(stdout);
    }
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  for (int i = 1; i < argc; ++i)
    if (std::string(argv[i]) == "--classes") {
      std::vector<int> sizes{12, 14};
      std::string python = "/usr/bin/python3", script = GAPWISE_SOURCE_DIR "/bench/scipy_gap_scan.py";
      bool scipy = true;
      std::vector<std::string> kinds{"glass-fields", "gaussian", "qubo", "glass"};
      for (int j = 1; j < argc; ++j) {
        const std::string a = argv[j];
        if (a == "--sizes" && j + 1 < argc) {
          sizes.clear();
          for (const char* q = argv[++j]; *q;) {
            sizes.push_back(std::atoi(q));
            while (*q && *q != ',') ++q;
            if (*q == ',') ++q;
          }
        } else if (a == "--python" && j + 1 < argc) python = argv[++j];
        else if (a == "--no-scipy") scipy = false;
        else if (a == "--kinds" && j + 1 < argc) {
          const std::vector<std::string> known = kinds;
          kinds.clear();
          std::stringstream ss(argv[++j]);
          for (std::string k; std::getline(ss, k, ',');) {
            if (std::find(known.begin(), known.end(), k) == known.end()) {
              std::fprintf(stderr, "--kinds: unknown class '%s' (glass-fields, gaussian, qubo, glass)\n", k.c_str());
              return 2;
            }
            kinds.push_back(k);
          }
        }
      }
      return class_rows(sizes, python, script, scipy, kinds);
    }
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
                  "[--no-unchecked]\n       bench_gap_scan --classes [--sizes 12,14] [--kinds glass-fields,gaussian,qubo,glass] [--python PY] [--no-scipy]\n");
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
