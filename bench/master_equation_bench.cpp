// Cost of the full-space adiabatic master equation (dynamics/master_equation.hpp)
// on a problem with fields and real couplings (invented demo values):
//   bench_master_equation N DURATION_NS ETA TOL          one forward anneal, linear 5 GHz scales, 12 mK
//   bench_master_equation N DURATION_NS ETA TOL one      cost of one generator build, transform, 1 ns evolve
//   bench_master_equation N DURATION_NS ETA TOL METHOD [K]   METHOD auto, ame-full or ame-truncated (K: forced levels)
// Prints p, steps, eigen-decompositions, trace and positivity and the wall time.
#include <chrono>
#include <cstdio>
#include <cmath>
#include <cstdlib>
#include <string>
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/master_equation.hpp"
#include "problem/classical_spectrum.hpp"
using namespace gapwise;
int main(int argc, char** argv) {
  int n = atoi(argv[1]); double T = atof(argv[2]); double eta = atof(argv[3]); double tol = atof(argv[4]);
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[i] = 0.37 * std::sin(1.3 * i + 0.4);
  for (int i = 0; i + 1 < n; ++i) p.couplings.push_back({i, i + 1, -0.8 + 0.21 * i});
  if (n > 2) p.couplings.push_back({0, n - 1, 0.45});
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
