// Cost of the full-space adiabatic master equation (dynamics/master_equation.hpp)
// on a problem with fields and real couplings (invented demo values):
//   bench_master_equation N DURATION_NS ETA TOL          one forward anneal, linear 5 GHz scales, 12 mK
//   bench_master_equation N DURATION_NS ETA TOL one      cost of one generator build, transform, 1 ns evolve
//   bench_master_equation N DURATION_NS ETA TOL METHOD [K]   METHOD auto, ame-full or ame-truncated (K: forced levels)
//   bench_master_equation rows [BUDGET_S]   the issue-18 rows: 8 (1 us), 10 and 12 qubits with fields (this problem;
//                                          bench_problem("gaussian") at 10), 1 and 20 us, 12 mK, eta 1e-3, p to 1e-6,
//                                          automatic K; a row still running after BUDGET_S seconds (default 300)
//                                          is stopped and printed with the pass and fraction it reached
// Prints p, steps, eigen-decompositions, trace and positivity and the wall time.
#include <chrono>
#include <cstdio>
#include <cmath>
#include <cstdlib>
#include <string>
#include <stdexcept>
#include "bench_problem_classes.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/master_equation.hpp"
#include "problem/classical_spectrum.hpp"
using namespace gapwise;
namespace {
IsingProblem ring_with_fields(int n) {
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[i] = 0.37 * std::sin(1.3 * i + 0.4);
  for (int i = 0; i + 1 < n; ++i) p.couplings.push_back({i, i + 1, -0.8 + 0.21 * i});
  if (n > 2) p.couplings.push_back({0, n - 1, 0.45});
  return p;
}

struct OutOfBudget : std::runtime_error {
  using std::runtime_error::runtime_error;
};

int rows(double budget_s) {
  printf("# rows: 12 mK, eta 1e-3, cutoff 8 GHz, linear 5 GHz scales, tolerance 1e-6 on p, automatic K (6, 10, ... 40)\n");
  printf("# budget per row %.0f s (wall); eig = eigen-solves of the final K pass only\n", budget_s);
  printf("%-14s %3s %8s | %-11s %4s %6s %10s %10s %8s %8s %9s\n", "class", "n", "t_f_ns", "p", "K", "passes", "|dp(K)|",
         "top_level", "steps", "eig", "wall_s");
  struct Row { const char* cls; int n; double T; };
  const Row list[] = {{"ring-fields", 8, 1000.0},   {"ring-fields", 10, 1000.0}, {"ring-fields", 10, 20000.0},
                      {"ring-fields", 12, 1000.0},  {"ring-fields", 12, 20000.0}, {"gaussian", 10, 1000.0},
                      {"gaussian", 10, 20000.0}};
  for (const Row& row : list) {
        const char* cls = row.cls;
        const int n = row.n;
        const double T = row.T;
        const IsingProblem p = std::string(cls) == "ring-fields" ? ring_with_fields(n) : bench_problem(cls, n);
        const TransverseIsingHamiltonian h(p);
        const GroundManifold gm = find_ground_manifold(p, h.diagonal());
        Schedule sch;
        AnnealPath path = sch.shape.scaled_to(T);
        OhmicBath b;
        b.coupling = 1e-3;
        OpenPropagatorOptions oo{.tolerance = 1e-6};
        const auto t0 = std::chrono::steady_clock::now();
        PropagationProgress last;
        oo.progress = [&](const PropagationProgress& pr) {
          last = pr;
          if (std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() > budget_s)
            throw OutOfBudget("budget");
        };
        try {
          auto r = simulate_open_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), b, oo);
          printf("%-14s %3d %8.0f | %.9f %4d %6d %10.2e %10.2e %8ld %8ld %9.1f%s\n", cls, n, T, r.ground_probability,
                 r.levels, last.pass, r.truncation_estimate, r.top_level_population, r.stats.steps, r.stats.eigen_solves,
                 r.wall_seconds, r.level_cap_hit ? " cap" : "");
        } catch (const OutOfBudget&) {
          printf("%-14s %3d %8.0f | not finished in %.0f s: pass %d (K = %d) at %.0f %% of the anneal\n", cls, n, T,
                 budget_s, last.pass, 6 + 4 * (last.pass - 1), 100 * last.fraction);
        }
        fflush(stdout);
      }
  return 0;
}
}  // namespace

int main(int argc, char** argv) {
  if (argc > 1 && std::string(argv[1]) == "rows") return rows(argc > 2 ? atof(argv[2]) : 300.0);
  int n = atoi(argv[1]); double T = atof(argv[2]); double eta = atof(argv[3]); double tol = atof(argv[4]);
  const IsingProblem p = ring_with_fields(n);
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  AnnealPath path = sch.shape.scaled_to(T);
  OhmicBath b; b.coupling = eta;
  std::string method = argc > 5 ? argv[5] : "auto";
  if (method == "one") {
    auto t0 = std::chrono::steady_clock::now();
    FrozenGenerator g = build_frozen_generator(h, 2.5, 2.5, b);
    auto t1 = std::chrono::steady_clock::now();
    DensityMatrix rho = DensityMatrix::Identity(h.dim(), h.dim()) / double(h.dim());
    DensityMatrix re = g.to_eigenbasis(rho);
    auto t2 = std::chrono::steady_clock::now();
    g.evolve(re, 1.0);
    auto t3 = std::chrono::steady_clock::now();
    printf("build %.3f s (jumps %zu, K %zu, norm %.3g), transform %.3f s, evolve 1 ns %.3f s\n",
           std::chrono::duration<double>(t1 - t0).count(), g.jump_value.size(), g.k_value.size(), g.norm_bound,
           std::chrono::duration<double>(t2 - t1).count(), std::chrono::duration<double>(t3 - t2).count());
    return 0;
  }
  OpenPropagatorOptions oo{.tolerance = tol};
  oo.method = method;
  if (argc > 6) oo.levels = atoi(argv[6]);
  if (argc > 7) oo.max_rotation = atof(argv[7]);
  if (argc > 8) oo.max_ds = atof(argv[8]);
  auto r = simulate_open_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), b, oo);
  printf("%s K %d top %.2e lost %.2e dK %.2e cap %d | ", r.propagator.c_str(), r.levels, r.top_level_population,
         r.lost_population, r.truncation_estimate, int(r.level_cap_hit));
  printf("p %.9f steps %ld rej %ld eig %ld err %.3g trace %.3g mineig %.3g wall %.2f s jumps %ld\n", r.ground_probability,
         r.stats.steps, r.stats.rejected_steps, r.stats.eigen_solves, r.stats.error_estimate, r.stats.max_trace_deviation,
         r.stats.min_eigenvalue, r.wall_seconds, r.stats.max_jump_terms);
}
