#include "problem/instance_families.hpp"

#include <algorithm>
#include <cmath>
#include <random>
#include <set>

#include <fmt/format.h>

#include "io/input_error.hpp"
#include "problem/planted_loops.hpp"
#include "problem/seeded_random.hpp"

namespace gapwise {

std::string graph_name(GraphKind k) {
  switch (k) {
    case GraphKind::Ring: return "ring";
    case GraphKind::RingPlusChords: return "ring-chords";
    case GraphKind::SquareLattice: return "square";
    case GraphKind::Complete: return "complete";
  }
  return "?";
}

std::string coupling_name(CouplingKind k) {
  switch (k) {
    case CouplingKind::PlusMinusOne: return "pm1";
    case CouplingKind::Gaussian: return "gaussian";
    case CouplingKind::PlantedLoops: return "planted";
  }
  return "?";
}

GraphKind parse_graph_name(const std::string& s) {
  for (GraphKind k : {GraphKind::Ring, GraphKind::RingPlusChords, GraphKind::SquareLattice, GraphKind::Complete})
    if (graph_name(k) == s) return k;
  throw InputError({"--graph", 0, 0, "--graph"}, fmt::format("unknown graph \"{}\"", s),
                   "use ring, ring-chords, square or complete");
}

CouplingKind parse_coupling_name(const std::string& s) {
  for (CouplingKind k : {CouplingKind::PlusMinusOne, CouplingKind::Gaussian, CouplingKind::PlantedLoops})
    if (coupling_name(k) == s) return k;
  throw InputError({"--couplings", 0, 0, "--couplings"}, fmt::format("unknown coupling family \"{}\"", s),
                   "use pm1, gaussian or planted");
}

std::string family_name(const FamilySpec& spec) {
  return graph_name(spec.graph) + "/" + coupling_name(spec.couplings);
}

std::vector<Edge> make_graph(GraphKind kind, int n, double chords_per_qubit, std::uint64_t seed,
                             const std::string& what) {
  const SourcePlace place{what, 0, 0, what};
  std::set<std::pair<int, int>> e;
  auto add = [&](int a, int b) { e.insert(std::minmax(a, b)); };
  switch (kind) {
    case GraphKind::Ring:
    case GraphKind::RingPlusChords: {
      if (n < 3) throw InputError(place, fmt::format("a ring needs at least 3 qubits, not {}", n), "use sizes >= 3");
      for (int i = 0; i < n; ++i) add(i, (i + 1) % n);
      if (kind == GraphKind::RingPlusChords) {
        if (!(chords_per_qubit >= 0.0) || !std::isfinite(chords_per_qubit))
          throw InputError({"--chords-per-qubit", 0, 0, "--chords-per-qubit"},
                           fmt::format("chord density {} must be >= 0", chords_per_qubit), "use e.g. 0.5");
        const long long free_pairs = static_cast<long long>(n) * (n - 1) / 2 - n;
        const long long chords = std::min<long long>(free_pairs, std::llround(chords_per_qubit * n));
        std::mt19937_64 rng(seed);
        const std::size_t target = e.size() + static_cast<std::size_t>(chords);
        while (e.size() < target) {
          const int a = static_cast<int>(uniform_index(rng, static_cast<std::uint64_t>(n)));
          const int b = static_cast<int>(uniform_index(rng, static_cast<std::uint64_t>(n)));
          if (a != b) add(a, b);
        }
      }
      break;
    }
    case GraphKind::SquareLattice: {
      int rows = 1;
      for (int r = 2; r * r <= n; ++r)
        if (n % r == 0) rows = r;
      if (rows < 2)
        throw InputError(place, fmt::format("{} qubits do not form a rows x cols lattice with rows, cols >= 2", n),
                         "use a composite size (4, 6, 8, 9, 10, 12, 14, ...) for the square lattice");
      const int cols = n / rows;
      for (int r = 0; r < rows; ++r)
        for (int c = 0; c < cols; ++c) {
          const int v = r * cols + c;
          if (c + 1 < cols) add(v, v + 1);
          if (r + 1 < rows) add(v, v + cols);
        }
      break;
    }
    case GraphKind::Complete:
      if (n < 2) throw InputError(place, "a complete graph needs at least 2 qubits", "use sizes >= 2");
      for (int i = 0; i < n; ++i)
        for (int j = i + 1; j < n; ++j) add(i, j);
      break;
  }
  std::vector<Edge> out;
  for (const auto& [a, b] : e) out.push_back({a, b});
  return out;
}

Instance generate_instance(const FamilySpec& spec, int n, int k) {
  Instance g;
  const std::uint64_t seed = derive_seed(spec.seed, {static_cast<std::uint64_t>(n), static_cast<std::uint64_t>(k)});
  g.seed = seed;
  g.family = family_name(spec);
  g.name = fmt::format("n{:02}-{:03}", n, k);
  std::mt19937_64 rng(seed);
  const std::vector<Edge> edges = make_graph(spec.graph, n, spec.chords_per_qubit, rng());
  if (spec.couplings == CouplingKind::PlantedLoops) {
    PlantedInstance p = plant_frustrated_loops(n, edges, spec.loops_per_qubit, spec.ruggedness, rng);
    g.problem = std::move(p.problem);
    g.planted_energy = p.ground_energy;
    g.planted_state = p.planted_state;
  } else {
    g.problem = IsingProblem(n);
    for (const auto& e : edges) {
      const double j = spec.couplings == CouplingKind::Gaussian ? standard_normal(rng) : ((rng() >> 63) ? -1.0 : 1.0);
      g.problem.couplings.push_back({e.i, e.j, j});
    }
  }
  g.problem.description = fmt::format("{} n={} k={} seed={} (family seed {})", g.family, n, k, seed, spec.seed);
  return g;
}

std::vector<Instance> generate_family(const FamilySpec& spec, const std::vector<int>& sizes, int count) {
  if (count < 1)
    throw InputError({"--count", 0, 0, "--count"}, fmt::format("count {} must be at least 1", count),
                     "give the number of instances per size");
  std::vector<Instance> out;
  for (int n : sizes)
    for (int k = 0; k < count; ++k) out.push_back(generate_instance(spec, n, k));
  return out;
}

}  // namespace gapwise
