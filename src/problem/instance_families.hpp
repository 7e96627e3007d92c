#pragma once
// Reproducible, seeded families of Ising instances for ensemble studies:
// spin glasses with +-1 or Gaussian couplings on a ring, a ring plus random
// chords, an open square lattice or the complete graph, and planted-solution
// instances built from frustrated loops (see planted_loops.hpp) whose ground
// energy is known by construction. No fields (h = 0), so the global spin flip
// is a symmetry and every ground state comes with its mirror image.
//
// Instance k of size n is drawn from its own stream, seeded with
// derive_seed(family_seed, {n, k}); asking for more instances or more sizes
// never changes the ones already drawn.
//
//   FamilySpec f;
//   f.graph = GraphKind::RingPlusChords;  f.couplings = CouplingKind::Gaussian;
//   f.seed = 2026;
//   std::vector<Instance> set = generate_family(f, {6, 8, 10}, 24);
//   set[0].name;  set[0].problem;  *set[0].seed;
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "problem/ising_problem.hpp"

namespace gapwise {

enum class GraphKind {
  Ring,            ///< n edges (i, i+1 mod n)
  RingPlusChords,  ///< the ring plus round(chords_per_qubit * n) distinct random non-ring pairs
  SquareLattice,   ///< rows x cols open lattice, rows the largest divisor of n with rows <= sqrt(n), rows >= 2
  Complete,        ///< all n(n-1)/2 pairs
};

enum class CouplingKind {
  PlusMinusOne,  ///< J_ij = +-1 with equal probability
  Gaussian,      ///< J_ij ~ N(0, 1)
  PlantedLoops,  ///< frustrated-loop construction with a planted ground state
};

struct FamilySpec {
  GraphKind graph = GraphKind::Ring;
  CouplingKind couplings = CouplingKind::PlusMinusOne;
  std::uint64_t seed = 1;
  double chords_per_qubit = 0.5;  ///< RingPlusChords only
  double loops_per_qubit = 1.0;   ///< PlantedLoops: loop density alpha = loops / n
  int ruggedness = 0;             ///< PlantedLoops: largest |J_ij| allowed (integer couplings); 0: no bound
};

/// One member of an instance set: generated here, or read from a file.
struct Instance {
  std::string name;            ///< generated: "n08-003" (size and index; sorts in set order)
  IsingProblem problem;
  std::string family;          ///< e.g. "ring-chords/gaussian"; empty when unknown
  std::optional<std::uint64_t> seed;         ///< this instance's own seed (derived, 63 bits)
  std::optional<double> planted_energy;      ///< ground energy known by construction
  std::optional<BasisIndex> planted_state;   ///< one ground state (its flip is another)
  std::string source;          ///< the problem file it was read from (directory sets); empty otherwise
};

struct Edge { int i = 0; int j = 0; };

/// Edges of a graph on n vertices (i < j, sorted). RingPlusChords draws its chords
/// from `rng`. Throws InputError (key `what`) when the graph does not exist for n.
std::vector<Edge> make_graph(GraphKind kind, int n, double chords_per_qubit, std::uint64_t seed,
                             const std::string& what = "--graph");

/// One instance: size n, index k.
Instance generate_instance(const FamilySpec& spec, int n, int k);
/// `count` instances for each size, sizes in the given order, k = 0..count-1.
std::vector<Instance> generate_family(const FamilySpec& spec, const std::vector<int>& sizes, int count);

/// Names used on the command line and in files: "ring", "ring-chords", "square", "complete";
/// "pm1", "gaussian", "planted".
std::string graph_name(GraphKind k);
std::string coupling_name(CouplingKind k);
GraphKind parse_graph_name(const std::string& s);        ///< InputError on an unknown name
CouplingKind parse_coupling_name(const std::string& s);  ///< InputError on an unknown name
std::string family_name(const FamilySpec& spec);

}  // namespace gapwise
