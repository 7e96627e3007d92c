// Propagation benchmark: the split-operator propagator against the odeint
// reference (and, when asked, a straightforward SciPy script), side by side in
// one run, on seeded +-1 spin glasses (ring plus 0.5 random chords per qubit,
// no fields) with linear scales A = 5 GHz (1 - s), B = 5 GHz s.
//
//   bench_propagation                         # the default table (a few minutes)
//   bench_propagation --sizes 14 --durations 100 --odeint-max-n 14
//   bench_propagation --scipy bench/scipy_midpoint_anneal.py --scipy-max-n 14
//
// Per row it prints wall time, exponential stages per second, the error
// estimate, the error against a tight run (tolerance/1000) and the ratios to
// the other implementations measured in the same process. Kernel rows give the
// achieved bandwidth of the rotation and phase kernels against a copy of a
// buffer of the same size, measured right before. Ratios measured side by side
// stay meaningful on a busy machine; absolute times do not.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <unistd.h>
#include <fstream>
#include <functional>
#include <iostream>
#include <numbers>
#include <sstream>
#include <limits>
#include <string>
#include <random>
#include <vector>

#include <fmt/format.h>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/split_operator_propagator.hpp"
#include "io/atomic_file.hpp"
#include "problem/classical_spectrum.hpp"
#include "problem/embedding.hpp"
#include "problem/instance_families.hpp"
#include "problem/seeded_random.hpp"
#include "bench_problem_classes.hpp"

using namespace gapwise;
using Clock = std::chrono::steady_clock;

namespace {

double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

std::vector<double> parse_list(const char* s) {
  std::vector<double> v;
  std::stringstream ss(s);
  std::string item;
  while (std::getline(ss, item, ',')) v.push_back(std::stod(item));
  return v;
}

long peak_rss_kib() {
  std::ifstream f("/proc/self/status");
  std::string line;
  while (std::getline(f, line))
    if (line.rfind("VmHWM:", 0) == 0) return std::stol(line.substr(6));
  return -1;
}

// Seconds per call of `f`: the best of ten batches of at least `batch_s`
// seconds each (the same rule for the copy and the kernels, so a slow moment
// of a shared machine does not decide their ratio).
double time_per_call(const std::function<void()>& f, double batch_s = 0.03) {
  f();
  double best = std::numeric_limits<double>::infinity();
  for (int b = 0; b < 10; ++b) {
    long reps = 0;
    const auto t0 = Clock::now();
    double el = 0;
    do {
      f();
      ++reps;
      el = seconds_since(t0);
    } while (el < batch_s);
    best = std::min(best, el / static_cast<double>(reps));
  }
  return best;
}

struct Row {
  std::string method;
  double p = 0, wall_s = 0, est = 0, err_vs_tight = 0, stages_per_s = 0;
  long steps = 0;
};

Row run_split(const IsingProblem& prob, double duration, double tol, const std::string& name) {
  TransverseIsingHamiltonian H(prob);
  GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  const AnnealPath path({{0.0, 0.0}, {duration, 1.0}});
  SimulationOptions o;
  // "NAME:p" controls p alone (as the SciPy script does), not also every
  // outcome set to 100x the tolerance as simulate_anneal does by default.
  // "default": whatever simulate_anneal uses when nothing is chosen.
  const auto colon = name.find(':');
  const std::string base = name.substr(0, colon);
  if (base != "default") o.propagator = base;
  if (colon != std::string::npos) o.propagation.others_factor = std::numeric_limits<double>::infinity();
  o.propagation.tolerance = tol;
  const auto t0 = Clock::now();
  AnnealResult r = simulate_anneal(H, gm, scales, path, uniform_superposition(prob.qubits), o);
  const double wall = seconds_since(t0);
  return {name == "default" ? "default(" + r.propagator + ")" : name, r.ground_probability, wall,
          r.stats.error_estimate, 0.0, static_cast<double>(r.stats.hamiltonian_applications) / wall, r.stats.steps};
}

// A peer script (SciPy or QuTiP) on the same problem: one line
// "steps N p P error E wall SECONDS" (steps: the accepted step count or the
// accepted tolerance). Returns wall < 0 when it failed.
struct PeerResult {
  double wall = -1, p = 0, steps = 0, err = 0;
  std::string text;
};

PeerResult run_peer(const std::string& python, const std::string& script, const IsingProblem& prob, double duration,
                    double p_ref, double target, double budget_s) {
  std::string couplings, fields;
  for (const auto& c : prob.couplings) couplings += fmt::format("{},{},{:.17g};", c.i, c.j, c.value);
  for (std::size_t i = 0; i < prob.h.size(); ++i) fields += fmt::format("{}{:.17g}", i ? "," : "", prob.h[i]);
  const std::string out = fmt::format("/tmp/gapwise-bench-peer-{}-{}.txt", ::getpid(), prob.qubits);
  const std::string cmd =
      fmt::format("'{}' '{}' --qubits {} --couplings='{}' --fields='{}' --duration-ns {} --reference-p {:.15f} "
                  "--target {} --budget-s {} > '{}' 2>&1",
                  python, script, prob.qubits, couplings, fields, duration, p_ref, target, budget_s, out);
  PeerResult r;
  const int rc = std::system(cmd.c_str());
  std::ifstream f(out);
  r.text.assign(std::istreambuf_iterator<char>(f), {});
  std::remove(out.c_str());
  if (rc != 0 || std::sscanf(r.text.c_str(), "steps %lf p %lf error %lf wall %lf", &r.steps, &r.p, &r.err, &r.wall) != 4)
    r.wall = -1;
  while (!r.text.empty() && (r.text.back() == '\n' || r.text.back() == ' ')) r.text.pop_back();
  return r;
}

// The SciPy script's tail "probes N0 search S": how the step count was found.
std::string search_note(const std::string& text) {
  double n0 = 0, total = 0;
  const auto at = text.find("probes ");
  if (at == std::string::npos || std::sscanf(text.c_str() + at, "probes %lf search %lf", &n0, &total) != 2) return "-";
  return fmt::format("probes at {:.0f} and {:.0f} steps; whole search {:.0f} s", n0, 2 * n0, total);
}

std::vector<std::string> split_names(const std::string& s) {
  std::vector<std::string> v;
  std::stringstream ss(s);
  for (std::string item; std::getline(ss, item, ',');) v.push_back(item);
  return v;
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<double> sizes{8, 10, 12, 14}, durations{100};
  std::vector<double> kernel_sizes{10, 12, 14, 16};
  std::vector<std::string> kernel_variants = SplitExponentials::available_kernel_variants();
  std::vector<std::string> classes = kClasses;
  int odeint_max_n = 0, scipy_max_n = 14, qutip_max_n = 10, big_n = 16;
  double odeint_max_t = 100, peer_budget_s = 600;  // at n = 12; scaled by 2.5^(n - 12)
  double tol = 1e-6;
  bool kernels = true, rows_wanted = true;
  std::string scipy = "bench/scipy_midpoint_anneal.py", qutip = "bench/qutip_sesolve_anneal.py";
  std::vector<std::string> props{"default", "split2", "split4", "split4-bm", "split4-yoshida"};
  std::string python = "/usr/bin/python3";
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&] {
      if (i + 1 >= argc) { std::fprintf(stderr, "%s needs a value\n", a.c_str()); std::exit(2); }
      return argv[++i];
    };
    if (a == "--sizes") sizes = parse_list(next());
    else if (a == "--kernel-sizes") kernel_sizes = parse_list(next());
    else if (a == "--kernel-variants") kernel_variants = split_names(next());
    else if (a == "--durations") durations = parse_list(next());
    else if (a == "--classes") classes = split_names(next());
    else if (a == "--odeint-max-n") odeint_max_n = std::atoi(next());
    else if (a == "--odeint-max-ns") odeint_max_t = std::atof(next());
    else if (a == "--scipy") scipy = next();
    else if (a == "--scipy-max-n") scipy_max_n = std::atoi(next());
    else if (a == "--qutip") qutip = next();
    else if (a == "--qutip-max-n") qutip_max_n = std::atoi(next());
    else if (a == "--peer-budget-s") peer_budget_s = std::atof(next());
    else if (a == "--python") python = next();
    else if (a == "--big-n") big_n = std::atoi(next());
    else if (a == "--tolerance") tol = std::atof(next());
    else if (a == "--no-kernels") kernels = false;
    else if (a == "--kernels-only") rows_wanted = false;
    else if (a == "--phase-method") {
      const std::string m = next();
      if (m == "table") SplitExponentials::set_phase_method(PhaseMethod::Table);
      else if (m == "direct") SplitExponentials::set_phase_method(PhaseMethod::Direct);
      else if (m == "factored") SplitExponentials::set_phase_method(PhaseMethod::Factored);
      else if (m != "auto") { std::fprintf(stderr, "--phase-method: auto, table, direct or factored\n"); return 2; }
    }
    else if (a == "--propagators") props = split_names(next());
    else if (a == "--quick") {
      sizes = {8, 10};
      kernel_sizes = {8, 10};
      scipy_max_n = 8;
      qutip_max_n = 8;
      big_n = 0;
      peer_budget_s = 60;
    } else {
      std::printf(
          "bench_propagation: propagation speed on problem classes, side by side with SciPy and QuTiP peers\n"
          "  [--classes glass,glass-fields,gaussian,qubo,embedded]  problem classes (all by default)\n"
          "  [--sizes 8,10,12,14] [--durations 100] [--tolerance 1e-6]\n"
          "  [--propagators default,split2,split4,split4-bm,split4-yoshida]  rows per problem; 'default' is what the anneal\n"
          "                       command uses unchosen; NAME:p controls the error of p alone (as the peers do)\n"
          "  [--odeint-max-n N]   also time the odeint reference for n <= N (slow; 0: never, the default)\n"
          "  [--odeint-max-ns T]  ... and for durations <= T ns (default 100)\n"
          "  [--scipy SCRIPT] [--scipy-max-n N]  SciPy midpoint-exponential peer (default bench/scipy_midpoint_anneal.py, n <= 14)\n"
          "  [--qutip SCRIPT] [--qutip-max-n N]  QuTiP sesolve peer (default bench/qutip_sesolve_anneal.py, n <= 10)\n"
          "  [--peer-budget-s S]  a peer's search for its accepted settings gives up after S x 2.5^(n - 12) s\n"
          "                       (default S = 600: 600 s at n = 12, 3750 s at n = 14; the work grows ~2.5x per qubit)\n"
          "  [--python /usr/bin/python3]\n"
          "  [--big-n N]          one extra run of the default propagator at 100 ns on N qubits of the glass\n"
          "                       with fields (default 16; 0 to skip)\n"
          "  [--no-kernels]       skip the kernel bandwidth table; [--kernels-only] print only that table\n"
          "  [--kernel-sizes 10,12,14,16]  qubit counts of the kernel bandwidth table\n"
          "  [--kernel-variants avx512,avx2,baseline]  instruction-set variants in that table (default: all this\n"
          "                       CPU runs; the propagation rows use the run-time choice or GAPWISE_KERNELS)\n"
          "  [--phase-method auto|table|direct|factored]  force how phases are found (to compare; default auto)\n"
          "  [--quick]            smoke run: n = 8, 10; peers at n = 8 only; no big run\n"
          "Peers are skipped above their -max-n (they take minutes there); the output says so.\n");
      return a == "--help" || a == "-h" ? 0 : 2;
    }
  }
  for (const auto& c : classes) (void)bench_problem(c, 8);  // unknown names fail before any work
  const char* threads = std::getenv("OMP_NUM_THREADS");
  std::printf("gapwise propagation benchmark: linear 5 GHz scales, tolerance %.0e on p, OMP_NUM_THREADS=%s, kernels %s\n",
              tol, threads ? threads : "(unset)", SplitExponentials::kernel_variant());
  for (const auto& c : classes) std::printf("  %-13s %s (seed 2026)\n", c.c_str(), class_description(c).c_str());

  if (kernels) {
    // Kernels: rotation sweep, phase pass and the fused phase + rotation sweep
    // against a copy of the same bytes, measured right before.
    const std::string dispatched = SplitExponentials::kernel_variant();
    std::printf("\nKernel bandwidth (the state's bytes read + written per pass) against a copy of the same buffer;\n"
                "kernels: instruction-set variant (run-time choice here: %s).\n", dispatched.c_str());
    std::printf("%-13s %-3s %9s %-8s %9s %-8s %8s %9s %9s %9s %8s %8s %8s\n", "class", "n", "state", "kernels", "levels",
                "phases", "copy GB/s", "rot GB/s", "phase GB/s", "fused GB/s", "rot/cp", "ph/cp", "fused/cp");
    for (const auto& cls : classes)
      for (double nd : kernel_sizes)
      for (const auto& variant : kernel_variants) {
        SplitExponentials::set_kernel_variant(variant);
        const int n = static_cast<int>(nd);
        IsingProblem prob = bench_problem(cls, n);
        TransverseIsingHamiltonian H(prob);
        SplitExponentials ex(H);
        SplitState x = SplitState::from(uniform_superposition(n));
        SplitState y(H.dim());
        const double bytes = 16.0 * static_cast<double>(H.dim());  // re + im arrays
        const double t_copy = time_per_call([&] { y.copy_from(x); });
        const double t_rot = time_per_call([&] { ex.rotate(x, 0.01); });
        const double t_ph = time_per_call([&] { ex.phase(x, 0.01); });
        const double t_fu = time_per_call([&] { ex.phase_then_rotate(x, 0.01, 0.01); });
        // Bandwidth counts the state's bytes only (read + write per pass), so a
        // kernel that also reads tables or an index shows that as lost speed.
        const double bw_copy = 2 * bytes / t_copy / 1e9;
        const double bw_rot = 2 * bytes * ex.rotate_passes() / t_rot / 1e9;
        const double bw_ph = 2 * bytes / t_ph / 1e9;
        const double bw_fu = 2 * bytes * ex.rotate_passes() / t_fu / 1e9;
        std::printf("%-13s %-3d %9s %-8s %9zu %-8s %8.1f %9.1f %9.1f %9.1f %7.0f%% %7.0f%% %7.0f%%\n", cls.c_str(), n,
                    fmt::format("{} KiB", bytes / 1024).c_str(), ex.kernels(), ex.distinct_levels(), ex.phase_method_name(), bw_copy, bw_rot, bw_ph, bw_fu,
                    100 * bw_rot / bw_copy, 100 * bw_ph / bw_copy, 100 * bw_fu / bw_copy);
        std::fflush(stdout);
      }
    SplitExponentials::set_kernel_variant(dispatched);  // the propagation rows run what a user gets
  }

  if (!rows_wanted) return 0;
  std::printf("\nPer problem: the default settings first, then each propagator; p_tight from split4 at tolerance/1000.\n"
              "Peers (same problem, 100 ns, |p - p_tight| <= %.0e): SciPy's\n"
              "expm_multiply at the largest midpoint step that meets it, QuTiP sesolve (array coefficients) at the\n"
              "loosest tolerance that meets it. 'x SciPy' = SciPy wall / this row's wall (same run, same machine).\n",
              tol);
  for (const auto& cls : classes) {
    std::printf("\n[%s] %s\n", cls.c_str(), class_description(cls).c_str());
    std::printf("%-3s %6s %-20s %14s %9s %8s %9s %9s %10s %8s %8s\n", "n", "T ns", "method", "p_ground", "wall s",
                "steps", "stages/s", "est. err", "err/tight", "x SciPy", "x QuTiP");
    for (double nd : sizes) {
      const int n = static_cast<int>(nd);
      IsingProblem prob;
      try {
        prob = bench_problem(cls, n);
      } catch (const std::exception& e) {
        std::printf("%-3d (skipped: %s)\n", n, e.what());
        continue;
      }
      for (double T : durations) {
        Row tight = run_split(prob, T, tol / 1000, "split4");
        std::vector<Row> rows;
        for (const auto& name : props) {
          rows.push_back(run_split(prob, T, tol, name));
          rows.back().err_vs_tight = std::abs(rows.back().p - tight.p);
        }
        if (n <= odeint_max_n && T <= odeint_max_t) {
          rows.push_back(run_split(prob, T, tol, "odeint"));
          rows.back().err_vs_tight = std::abs(rows.back().p - tight.p);
        }
        PeerResult sp, qt;
        std::string notes;
        if (!scipy.empty() && n <= scipy_max_n) {
          sp = run_peer(python, scipy, prob, T, tight.p, tol, peer_budget_s * std::pow(2.5, n - 12));
          notes += sp.wall < 0 ? fmt::format("    SciPy failed: {}\n", sp.text)
                               : fmt::format("    SciPy  {:.0f} steps, p = {:.10f}, |p - p_tight| {:.1e}, {:.2f} s ({})\n",
                                             sp.steps, sp.p, sp.err, sp.wall, search_note(sp.text));
        } else if (!scipy.empty()) {
          notes += fmt::format("    SciPy  not run above n = {} (minutes per run; --scipy-max-n)\n", scipy_max_n);
        }
        if (!qutip.empty() && n <= qutip_max_n) {
          qt = run_peer(python, qutip, prob, T, tight.p, tol, peer_budget_s * std::pow(2.5, n - 12));
          notes += qt.wall < 0 ? fmt::format("    QuTiP  failed: {}\n", qt.text)
                               : fmt::format("    QuTiP  tolerance {:.0e}, p = {:.10f}, |p - p_tight| {:.1e}, {:.2f} s\n",
                                             qt.steps, qt.p, qt.err, qt.wall);
        } else if (!qutip.empty()) {
          notes += fmt::format("    QuTiP  not run above n = {} (minutes per run; --qutip-max-n)\n", qutip_max_n);
        }
        for (const Row& r : rows) {
          const std::string xs = sp.wall < 0 ? "-" : fmt::format("{:.0f}", sp.wall / r.wall_s);
          const std::string xq = qt.wall < 0 ? "-" : fmt::format("{:.0f}", qt.wall / r.wall_s);
          std::printf("%-3d %6.0f %-20s %14.10f %9.3f %8ld %9.3g %9.1e %10.1e %8s %8s\n", n, T, r.method.c_str(), r.p,
                      r.wall_s, r.steps, r.stages_per_s, r.est, r.err_vs_tight, xs.c_str(), xq.c_str());
        }
        std::printf("%s", notes.c_str());
        std::fflush(stdout);
      }
    }
  }

  if (big_n > 0) {
    std::printf("\nLarge runs: the default settings, 100 ns, n = %d\n", big_n);
    for (const auto& cls : classes) {
      if (cls != "glass-fields") continue;
      IsingProblem prob;
      try {
        prob = bench_problem(cls, big_n);
      } catch (const std::exception& e) {
        continue;
      }
      Row r = run_split(prob, 100.0, tol, "default");
      std::printf("  %-13s p = %.8f, est. err %.1e, %ld steps, %.2f s, peak RSS %.0f MiB\n", cls.c_str(), r.p, r.est,
                  r.steps, r.wall_s, static_cast<double>(peak_rss_kib()) / 1024.0);
      std::fflush(stdout);
    }
  }
  return 0;
}
