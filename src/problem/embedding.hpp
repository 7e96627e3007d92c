#pragma once
// A minor embedding (Choi, Quantum Inf. Process. 7, 193 (2008)): each logical
// variable of a problem is represented by a chain of physical qubits, connected
// under the available physical couplers and held together by a ferromagnetic
// chain coupling. This file holds the embedding itself, its validation, and the
// physical (embedded) problem built from a logical one.
//
// Split rules (notebooks-free-docs/method-notes.md, "Embedded problems"):
//   - the logical field h_v is shared equally by the qubits of chain v;
//   - the logical coupling J_uv is shared equally by every available physical
//     coupler between chain u and chain v;
//   - every available coupler inside a chain carries -chain_coupling (ferromagnetic);
//   - the offset is raised by chain_coupling per intra-chain coupler, so an
//     unbroken physical state has exactly the logical energy of the state it
//     decodes to (times the term-limit scale, when one applies).
// Without a coupler list every pair of physical qubits counts as available.
//
//   Embedding e;
//   e.chains = {{0, 1}, {2, 3}, {4, 5}};
//   e.physical_qubits = 6;
//   e.couplers = {{0, 1}, {1, 2}, {2, 3}, {3, 4}, {4, 5}, {0, 5}};
//   e.couplers_given = true;
//   validate_embedding(e);                      // disjoint, covering, connected chains
//   check_embedding_serves(e, logical, "triangle.toml");
//   EmbeddedProblem ep = embed_problem(logical, e, ChainStrength::relative_to_largest(2.0));
//   ep.physical;                                // an ordinary IsingProblem on 6 qubits
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "io/input_error.hpp"
#include "problem/ising_problem.hpp"

namespace gapwise {

/// Strength of the ferromagnetic intra-chain coupling: an absolute magnitude in
/// problem units, or a multiple of the logical problem's largest |h| or |J|.
struct ChainStrength {
  double value = 2.0;
  bool relative = true;

  static ChainStrength absolute(double magnitude) { return {magnitude, false}; }
  static ChainStrength relative_to_largest(double ratio) { return {ratio, true}; }
  /// Magnitude of the chain coupling for this logical problem (> 0), or
  /// InputError (place `where`) when it is not positive or a relative strength
  /// meets a problem without any term.
  double resolve(const IsingProblem& logical, const SourcePlace& where = {}) const;
  /// "2 x largest logical term" or "1.5 (absolute)".
  std::string describe() const;
};

struct Embedding {
  std::vector<std::vector<int>> chains;      ///< chains[v]: physical qubits of logical variable v, in the order written
  int physical_qubits = 0;                   ///< every qubit 0..physical_qubits-1 is in exactly one chain
  bool couplers_given = false;               ///< false: every pair of physical qubits is available
  std::vector<std::pair<int, int>> couplers; ///< available physical couplers, first < second, unique
  std::optional<ChainStrength> chain_strength;  ///< default from the file, if any
  std::optional<double> term_limit;          ///< largest |h| or |J| the device accepts, if any
  std::string description;

  // Where things were written, for messages (empty when built in code).
  std::string source;
  SourcePlace chains_place;                  ///< the chain list as a whole
  std::vector<SourcePlace> chain_places;     ///< one per chain, or empty
  std::vector<SourcePlace> coupler_places;   ///< one per coupler, or empty
  SourcePlace couplers_place;                ///< the coupler list as a whole

  int logical_qubits() const { return static_cast<int>(chains.size()); }
  /// Logical variable owning each physical qubit (size physical_qubits).
  std::vector<int> owner_of_qubits() const;
  /// Is the physical pair (a, b) available (order irrelevant)?
  bool coupler_available(int a, int b) const;
  /// Available couplers inside chain v / between chains u and v (first < second).
  std::vector<std::pair<int, int>> couplers_within(int v) const;
  std::vector<std::pair<int, int>> couplers_between(int u, int v) const;
  /// Place of chain v / coupler k for messages (falls back to the file name and key).
  SourcePlace chain_place(int v) const;
  SourcePlace coupler_place(std::size_t k) const;
};

/// Structure alone: at least one chain, no empty chain, indices in range, no
/// qubit twice (chains disjoint), every physical qubit in a chain, couplers
/// valid and unique, each chain connected under the couplers. InputError names
/// the chain or coupler and the fix.
void validate_embedding(const Embedding& e);

/// Against a logical problem: one chain per logical qubit, and every non-zero
/// logical coupling served by at least one available coupler between its chains.
/// `problem_name` (the problem file) appears in the messages.
void check_embedding_serves(const Embedding& e, const IsingProblem& logical, const std::string& problem_name);

struct EmbeddedProblem {
  IsingProblem physical;        ///< the problem the device (and the simulation) sees
  double chain_coupling = 0;    ///< magnitude of the intra-chain coupling before scaling (problem units)
  double scale = 1;             ///< factor applied to every term to respect the term limit (1 when none)
  int intra_chain_couplers = 0; ///< couplers carrying the chain coupling
  int inter_chain_couplers = 0; ///< couplers carrying shares of logical couplings
};

/// Builds the physical problem by the split rules above; the chains and the
/// logical coupling service must already be valid (validate_embedding,
/// check_embedding_serves). `term_limit` (if set) scales the whole physical
/// problem down so its largest |h| or |J| does not exceed it.
EmbeddedProblem embed_problem(const IsingProblem& logical, const Embedding& e, double chain_coupling,
                              std::optional<double> term_limit = std::nullopt);
EmbeddedProblem embed_problem(const IsingProblem& logical, const Embedding& e, const ChainStrength& strength,
                              std::optional<double> term_limit = std::nullopt);

/// The logical problem under the same device term limit (scaled down when its
/// largest term exceeds it), for a fair comparison with the embedded problem.
IsingProblem limit_terms(const IsingProblem& p, std::optional<double> term_limit, double* scale_out = nullptr);

/// Sufficient chain coupling: any chain coupling strictly above
/// max over logical variables v of (|h_v| + sum_u |J_uv|) makes every physical
/// ground state unbroken, so each decodes to a logical ground state (derivation
/// in the method notes; the principle is Choi's, 2008).
double chain_coupling_bound(const IsingProblem& logical);

}  // namespace gapwise
