// A strongly coupled two-qubit chain behaves as one logical spin whose
// transverse term is reduced: second-order degenerate perturbation theory
// (Schrieffer-Wolff; e.g. Bravyi, DiVincenzo and Loss, Ann. Phys. 326, 2793
// (2011), cited from memory) in the transverse term gives, in our units
// (H = -(A/2) sum X + (B/2) [...], GHz),
//
//   A_eff = A^2 / dE,   dE = B * J_chain   (the energy, in GHz, of breaking the chain)
//
// and a common shift -A^2 / (2 dE) of the two intact chain states; in the
// -Delta sigma^x convention (Delta = A/2) the same result reads
// Delta_eff = 2 Delta^2 / dE = A^2 / (2 dE). Derivation in the method notes
// ("Chains in the strong-coupling limit"). The neglected terms are of order
// A^3 / dE^2, so the level error must fall as 1 / J_chain^2.
//
// Independent exact check: with h = 0 the two-qubit chain splits into spin-flip
// sectors; the odd intact combination is an exact eigenstate at -dE/2 and the
// even sector is a 2x2 problem, so the splitting is exactly
// sqrt((dE/2)^2 + A^2) - dE/2 (worked out in the method notes).
//
// The physical problems below are built by embed_problem and diagonalized with
// the project's kernel (lowest_levels); the effective models are written out
// here as dense matrices, independent of that kernel.
#include <doctest/doctest.h>

#include <cmath>
#include <vector>

#include <Eigen/Dense>

#include "hamiltonian/transverse_ising.hpp"
#include "problem/embedding.hpp"
#include "spectrum/lowest_levels.hpp"

using namespace gapwise;

namespace {

constexpr double kA = 1.0, kB = 1.0;  // GHz, a point deep in the anneal's quantum half

// Dense H = -(1/2) sum_k a_k X_k + (B/2) [sum h_k Z_k + sum J_kl Z_k Z_l] + shift,
// with a transverse coefficient per qubit (the effective model's logical spins differ).
Eigen::VectorXd effective_levels(const std::vector<double>& a_ghz, const IsingProblem& p, double shift_ghz) {
  const int n = p.qubits;
  const Eigen::Index dim = Eigen::Index{1} << n;
  Eigen::MatrixXd h = Eigen::MatrixXd::Zero(dim, dim);
  for (Eigen::Index b = 0; b < dim; ++b) {
    h(b, b) = 0.5 * kB * (p.energy(static_cast<BasisIndex>(b)) - p.offset) + shift_ghz;
    for (int k = 0; k < n; ++k) h(b ^ (Eigen::Index{1} << k), b) += -0.5 * a_ghz[static_cast<std::size_t>(k)];
  }
  return Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd>(h, Eigen::EigenvaluesOnly).eigenvalues();
}

std::vector<double> physical_levels(const IsingProblem& logical, const Embedding& e, double chain_coupling, int k) {
  const EmbeddedProblem ep = embed_problem(logical, e, chain_coupling);
  const TransverseIsingHamiltonian h(ep.physical);
  return lowest_levels(h, kA, kB, k, false, EigenMethod::Dense).energies_ghz;
}

// Diagonal of H excludes the offset; an intact chain of one coupler sits at
// -(B/2) J_chain in it.
double intact_chain_energy(double chain_coupling) { return -0.5 * kB * chain_coupling; }

}  // namespace

TEST_CASE("h = 0: the two-qubit chain splitting equals the exact closed form and tends to A^2 / dE") {
  IsingProblem logical(1);
  Embedding e;
  e.chains = {{0, 1}};
  e.physical_qubits = 2;
  for (double jc : {2.0, 4.0, 8.0, 16.0, 32.0, 64.0}) {
    const auto lv = physical_levels(logical, e, jc, 2);
    const double de = kB * jc;
    const double splitting = lv[1] - lv[0];
    INFO("J_chain = " << jc);
    CHECK(splitting == doctest::Approx(std::sqrt(0.25 * de * de + kA * kA) - 0.5 * de).epsilon(1e-10));
    // Second order: A^2/dE, with relative error (A/dE)^2 from the next order.
    const double a_eff = kA * kA / de;
    CHECK(std::abs(splitting - a_eff) / a_eff <= 1.01 * (kA / de) * (kA / de));
    CHECK(std::abs(splitting - a_eff) / a_eff >= 0.5 * (kA / de) * (kA / de));  // and not smaller: it is that order
  }
}

TEST_CASE("a field on the chain: the low doublet matches one spin with the reduced transverse term") {
  IsingProblem logical(1);
  logical.h = {0.1};
  Embedding e;
  e.chains = {{0, 1}};
  e.physical_qubits = 2;
  double previous_error = 0.0;
  for (double jc : {4.0, 8.0, 16.0, 32.0, 64.0}) {
    const auto lv = physical_levels(logical, e, jc, 2);
    const double de = kB * jc, a_eff = kA * kA / de;
    const double center = intact_chain_energy(jc) - kA * kA / (2.0 * de);
    // One spin: levels center -+ (1/2) sqrt(A_eff^2 + (B h)^2) (single-qubit
    // spectrum, see the physics conventions' worked values).
    const double half_gap = 0.5 * std::hypot(a_eff, kB * logical.h[0]);
    const double error = std::max(std::abs(lv[0] - (center - half_gap)), std::abs(lv[1] - (center + half_gap)));
    MESSAGE("J_chain " << jc << ": gap " << lv[1] - lv[0] << " GHz, predicted " << 2 * half_gap
                       << ", level error " << error << " GHz");
    if (previous_error > 0.0) CHECK(previous_error / error >= 3.5);  // ~ 1/J_chain^2
    previous_error = error;
    // Without the reduction (A in place of A_eff) the prediction is far off.
    CHECK(std::abs((lv[1] - lv[0]) - std::hypot(kA, kB * logical.h[0])) > 0.5);
  }
  CHECK(previous_error < 2e-5);
}

TEST_CASE("a chain inside a larger problem: the lowest four levels match the effective two-spin model") {
  // Logical v0 (field 0.2) on chain [0, 1], v1 (field -0.3) alone on qubit 2,
  // J_01 = 0.6 on the single coupler 1-2.
  IsingProblem logical(2);
  logical.h = {0.2, -0.3};
  logical.couplings = {{0, 1, 0.6}};
  Embedding e;
  e.chains = {{0, 1}, {2}};
  e.physical_qubits = 3;
  e.couplers_given = true;
  e.couplers = {{0, 1}, {1, 2}};
  validate_embedding(e);
  check_embedding_serves(e, logical, "two-spin");
  double previous_error = 0.0;
  for (double jc : {4.0, 8.0, 16.0, 32.0, 64.0}) {
    const auto lv = physical_levels(logical, e, jc, 4);
    const double de = kB * jc;
    const Eigen::VectorXd eff = effective_levels({kA * kA / de, kA}, logical, intact_chain_energy(jc) - kA * kA / (2 * de));
    const Eigen::VectorXd bare = effective_levels({kA, kA}, logical, intact_chain_energy(jc));
    double error = 0.0, bare_error = 0.0;
    for (int k = 0; k < 4; ++k) {
      error = std::max(error, std::abs(lv[static_cast<std::size_t>(k)] - eff[k]));
      bare_error = std::max(bare_error, std::abs(lv[static_cast<std::size_t>(k)] - bare[k]));
    }
    MESSAGE("J_chain " << jc << ": largest level error " << error << " GHz (without the reduction " << bare_error << ")");
    if (previous_error > 0.0) CHECK(previous_error / error >= 3.5);
    previous_error = error;
    CHECK(bare_error > 0.3);
  }
  CHECK(previous_error < 5e-5);
}
