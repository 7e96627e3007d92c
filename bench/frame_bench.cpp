// Long anneals: the frame propagator ("frame") beside full-space propagation
// (split-auto, the default), side by side in one run, on seeded Gaussian spin glasses (ring plus
// 0.5 random chords per qubit, seed 2026) WITH real-valued fields h_i drawn
// uniformly from [-0.5, 0.5] (seed 2027), under linear scales A = 5 GHz (1 - s),
// B = 5 GHz s, tolerance 1e-6 on p.
//
//   build/bench/bench_frame --n 10 --durations-us 1,10,100 --full-max-us 10
//
// Each row: qubits, duration, propagator, wall seconds, p, |p - p_split-auto| when
// split-auto ran, the frame's K, grid points, eigen-solves (and how many were warm
// started), points taken from the shared store, pieces that fell back to split4, and the process's peak memory.
// Times on a shared machine are noisy: compare rows of the same run only.
//
// --build-only: instead, the frame's construction alone (K levels over s: 0 -> 1
// at the first duration), eigen-solves from scratch (lowest_levels) against the
// Lanczos seeded with the previous point's vectors (FrameOptions::seeded_lanczos),
// side by side:
//
//   build/bench/bench_frame --n 12 --build-only --levels 8
#include <sys/resource.h>
#ifdef _OPENMP
#include <omp.h>
#endif

#include <CLI/CLI.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <chrono>

#include "dynamics/anneal_simulation.hpp"
#include "frame/frame_point_cache.hpp"
#include "frame/instantaneous_frame.hpp"
#include "problem/classical_spectrum.hpp"
#include "problem/instance_families.hpp"
#include "spectrum/lowest_levels.hpp"

using namespace gapwise;

namespace {

double peak_mib() {
  rusage ru{};
  getrusage(RUSAGE_SELF, &ru);
  return static_cast<double>(ru.ru_maxrss) / 1024.0;
}

IsingProblem glass_with_fields(int n) {
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = CouplingKind::Gaussian;
  f.seed = 2026;
  IsingProblem p = generate_instance(f, n, 0).problem;
  std::mt19937_64 rng(2027);
  std::uniform_real_distribution<double> u(-0.5, 0.5);
  p.h.assign(static_cast<std::size_t>(n), 0.0);
  for (double& h : p.h) h = u(rng);
  return p;
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"frame propagator against full propagation on long anneals"};
  int n = 10;
  std::string durations = "1,10,100";
  double full_max_us = 10.0;
  double tol = 1e-6;
  app.add_option("--n", n, "qubits")->capture_default_str();
  app.add_option("--durations-us", durations, "comma-separated durations in microseconds")->capture_default_str();
  app.add_option("--full-max-us", full_max_us, "run split-auto only up to this duration")->capture_default_str();
  app.add_option("--tolerance", tol, "tolerance on p")->capture_default_str();
  bool build_only = false;
  int levels = 8;
  app.add_flag("--build-only", build_only, "time the frame construction alone, cold against warm-started solves");
  app.add_option("--levels", levels, "K for --build-only")->capture_default_str();
  bool no_shared = false;
  app.add_flag("--no-shared", no_shared, "leave out the frame-shared rows (one store for all durations of the run)");
  bool breakeven = false;
  app.add_flag("--solver-breakeven", breakeven,
               "time one eigen-solve of the K + 1 lowest levels at s = 0.5, dense against Lanczos, for n = 6 ... --n");
  CLI11_PARSE(app, argc, argv);
  if (breakeven) {
    // One point's solve as the frame does it (K + 1 levels with vectors), cold
    // Lanczos, Lanczos seeded from the vectors at s - 0.002, and the dense
    // self-adjoint solver; the median of 5 repetitions each. One OpenMP thread,
    // as the frame's build runs below dimension 2^16 (instantaneous_frame.cpp).
#ifdef _OPENMP
    omp_set_num_threads(1);
#endif
    std::printf("%3s %6s %3s %12s %12s %12s\n", "n", "dim", "K", "dense_ms", "lanczos_ms", "seeded_ms");
    for (int q = 6; q <= n; ++q) {
      const IsingProblem pq = glass_with_fields(q);
      const TransverseIsingHamiltonian hq(pq);
      const SectorHamiltonian sec(hq, SpinFlipSector::Full);
      Schedule sq;
      const double s0 = 0.5, a = sq.scales.a_ghz(s0), b = sq.scales.b_ghz(s0);
      LevelOptions lo;
      lo.levels = levels + 1;
      lo.vectors = true;
      lo.method = EigenMethod::Lanczos;
      const Levels near = lowest_levels(sec, sq.scales.a_ghz(s0 - 0.002), sq.scales.b_ghz(s0 - 0.002), lo);
      auto median_ms = [&](EigenMethod m, const Eigen::MatrixXd* start) {
        std::vector<double> t;
        LevelOptions o = lo;
        o.method = m;
        for (int rep = 0; rep < 5; ++rep) {
          const auto t0 = std::chrono::steady_clock::now();
          const Levels lv = lowest_levels(sec, a, b, o, start);
          t.push_back(1e3 * std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
          if (lv.energies_ghz.empty()) return std::nan("");
        }
        std::sort(t.begin(), t.end());
        return t[2];
      };
      const double dense = sec.dim() <= 1024 ? median_ms(EigenMethod::Dense, nullptr) : std::nan("");
      std::printf("%3d %6zu %3d %12.3f %12.3f %12.3f\n", q, sec.dim(), levels, dense,
                  median_ms(EigenMethod::Lanczos, nullptr), median_ms(EigenMethod::Lanczos, &near.vectors));
      std::fflush(stdout);
    }
    return 0;
  }

  const IsingProblem prob = glass_with_fields(n);
  const TransverseIsingHamiltonian h(prob);
  const GroundManifold gm = find_ground_manifold(prob, h.diagonal());
  Schedule sch;
  if (build_only) {
    const SectorHamiltonian sec(h, SpinFlipSector::Full);
    const double us = std::stod(durations.substr(0, durations.find(',')));
    std::printf("%3s %3s %10s %6s %9s %6s %7s %6s %9s\n", "n", "K", "T_us", "start", "wall_s", "ratio", "points", "solves",
                "warm");
    double cold_s = 0.0;
    for (int mode : {0, 1, 2}) {
      const bool warm = mode >= 1;
      FrameOptions fo;
      fo.levels = levels;
      fo.ns_per_unit_s = us * 1000.0;
      fo.seeded_lanczos = mode == 1;
      fo.warm_start = mode == 2;
      const auto t0 = std::chrono::steady_clock::now();
      const InstantaneousFrame fr(sec, sch.scales, 0.0, 1.0, fo);
      const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
      if (!warm) cold_s = wall;
      std::printf("%3d %3d %10.3g %6s %9.2f %6.2f %7zu %6ld %9ld\n", n, fr.levels(), us, mode == 0 ? "cold" : mode == 1 ? "seeded" : "block", wall,
                  wall / cold_s, fr.points().size(), fr.eigen_solves(), fr.warm_solves());
      std::fflush(stdout);
    }
    return 0;
  }
  std::printf("%3s %10s %12s %9s %12s %10s %3s %6s %7s %6s %6s %5s %8s\n", "n", "T_us", "prop", "wall_s", "p", "|dp|",
              "K", "points", "solves", "warm", "reused", "fallb", "peak_MiB");
  // frame-shared: one store of solved eigenpairs for all durations of the run,
  // in the order given (as a duration study shares it); frame: a fresh frame each.
  const auto shared_cache = std::make_shared<FramePointCache>();
  std::stringstream ss(durations);
  for (std::string item; std::getline(ss, item, ',');) {
    const double us = std::stod(item);
    const AnnealPath path = sch.path_for(us * 1000.0);
    const QuantumState psi0 = initial_state(h, sch, path);
    double p_full = std::nan("");
    for (const char* prop : {"split-auto", "frame", "frame-shared"}) {
      if (std::string(prop) == "split-auto" && us > full_max_us) continue;
      if (std::string(prop) == "frame-shared" && no_shared) continue;
      SimulationOptions o;
      o.propagator = std::string(prop) == "frame-shared" ? "frame" : prop;
      if (std::string(prop) == "frame-shared") o.propagation.frame_cache = shared_cache;
      o.propagation.tolerance = tol;
      const AnnealResult r = simulate_anneal(h, gm, sch.scales, path, psi0, o);
      if (std::string(prop) == "split-auto") p_full = r.ground_probability;
      const PropagationStats& s = r.stats;
      std::printf("%3d %10.3g %12s %9.2f %12.9f %10.2e %3d %6ld %7ld %6ld %6ld %5ld %8.0f\n", n, us, prop, r.wall_seconds,
                  r.ground_probability, std::abs(r.ground_probability - p_full), s.frame_levels, s.frame_grid_points,
                  s.frame_eigen_solves, s.frame_warm_solves, s.frame_reused_points, s.frame_fallback_pieces, peak_mib());
      std::fflush(stdout);
    }
  }
}
