#pragma once
// The benchmark's problem classes (invented, seeded), shared by
// bench_propagation and bench_step_count.
//
//   IsingProblem p = bench_problem("glass-fields", 12);
#include <algorithm>
#include <random>
#include <stdexcept>
#include <string>
#include <vector>

#include "problem/embedding.hpp"
#include "problem/instance_families.hpp"
#include "problem/seeded_random.hpp"

namespace gapwise {

// The problem classes of the benchmark (all invented, seeded). The field-free
// +-1 glass is the easiest case for the kernels (few distinct diagonal values,
// spin-flip symmetry); the others are what users run: fields, real-valued
// couplings, QUBO-derived problems, embedded problems with chains.
inline const std::vector<std::string> kClasses{"glass", "glass-fields", "gaussian", "qubo", "embedded"};

inline std::string class_description(const std::string& c) {
  if (c == "glass") return "+-1 couplings on a ring + 0.5 chords/qubit, no fields";
  if (c == "glass-fields") return "the same glass with fields +-0.15 and one coupling set to 0.3";
  if (c == "gaussian") return "N(0,1) couplings on a ring + 0.5 chords/qubit, N(0,0.3^2) fields";
  if (c == "qubo") return "random integer QUBO (Q_ii in -3..3, Q_ij in -2..2 on ring + chords), converted exactly";
  if (c == "embedded") return "+-1 glass with fields on n/2 variables, chains of 2 qubits, chain coupling 2x largest term";
  return "?";
}

inline IsingProblem bench_problem(const std::string& cls, int n) {
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = cls == "gaussian" ? CouplingKind::Gaussian : CouplingKind::PlusMinusOne;
  f.seed = 2026;
  if (cls == "glass" || cls == "gaussian" || cls == "glass-fields") {
    IsingProblem p = generate_instance(f, n, 0).problem;
    std::mt19937_64 rng(derive_seed(2026, {static_cast<std::uint64_t>(n), 77}));
    if (cls == "glass-fields") {
      for (double& h : p.h) h = (rng() & 1) ? 0.15 : -0.15;
      p.couplings[rng() % p.couplings.size()].value = 0.3;
    } else if (cls == "gaussian") {
      std::normal_distribution<double> g(0.0, 0.3);
      for (double& h : p.h) h = g(rng);
    }
    return p;
  }
  if (cls == "qubo") {
    std::mt19937_64 rng(derive_seed(2026, {static_cast<std::uint64_t>(n), 78}));
    QuboProblem q;
    q.variables = n;
    for (int i = 0; i < n; ++i) q.terms.push_back({i, i, static_cast<double>(static_cast<int>(rng() % 7) - 3)});
    for (const Edge& e : make_graph(GraphKind::RingPlusChords, n, 0.5, 2026 + n)) {
      int v = static_cast<int>(rng() % 4) - 2;
      if (v >= 0) ++v;  // -2, -1, 1, 2
      q.terms.push_back({e.i, e.j, static_cast<double>(v)});
    }
    q.offset = 1.5;
    return qubo_to_ising(q);
  }
  if (cls == "embedded") {
    if (n % 2) throw std::invalid_argument("the embedded class needs an even qubit count");
    const int m = n / 2;
    IsingProblem logical = bench_problem("glass-fields", m);
    Embedding e;
    e.physical_qubits = n;
    e.couplers_given = true;
    for (int v = 0; v < m; ++v) {
      e.chains.push_back({2 * v, 2 * v + 1});
      e.couplers.push_back({2 * v, 2 * v + 1});
    }
    for (const Coupling& c : logical.couplings) e.couplers.push_back({2 * c.i + 1, 2 * c.j});
    std::sort(e.couplers.begin(), e.couplers.end());
    return embed_problem(logical, e, ChainStrength::relative_to_largest(2.0)).physical;
  }
  throw std::invalid_argument("unknown problem class '" + cls + "' (classes: glass, glass-fields, gaussian, qubo, embedded)");
}

}  // namespace gapwise
