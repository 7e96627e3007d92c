// FrameOptions::seeded_lanczos (each grid point's Lanczos solve started from the
// previous point's vectors) must change the cost only, never the frame: the
// same grid, the same energies (to the Lanczos residual tolerance) and the same
// propagated amplitudes as solves from scratch. Checked on the 8-qubit ring
// with weak fields (data-samples; dimension 256, above the dense-solver limit
// of 128, so Lanczos runs), linear scales, K = 6, s: 0 -> 1 at 1 us.
// The reference is the project's own cold solve (lowest_levels, itself checked
// against dense diagonalisation, Eigen's SelfAdjointEigenSolver, in its tests).
#include <doctest/doctest.h>

#include <cmath>

#include "dynamics/frame_propagator.hpp"
#include "frame/instantaneous_frame.hpp"
#include "hamiltonian/transverse_ising.hpp"
#include "io/problem_file.hpp"
#include "schedule/energy_scales.hpp"
#include "test_support.hpp"

using namespace gapwise;

TEST_CASE("a frame built with seeded Lanczos solves equals the one built from scratch") {
  const auto dir = gapwise::testing::source_dir();
  const IsingProblem p = read_problem_file((dir / "data-samples/weak-field-ring.toml").string());
  REQUIRE(p.has_fields());
  const TransverseIsingHamiltonian h(p);
  const SectorHamiltonian sec(h, SpinFlipSector::Full);
  REQUIRE(sec.dim() > 128);
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  FrameOptions fo;
  fo.levels = 6;
  fo.ns_per_unit_s = 1000.0;
  fo.seeded_lanczos = false;  // the default is seeded: the cold build is asked for
  const InstantaneousFrame cold(sec, scales, 0.0, 1.0, fo);
  fo.seeded_lanczos = true;
  const InstantaneousFrame seeded(sec, scales, 0.0, 1.0, fo);

  CHECK(cold.warm_solves() == 0);
  CHECK(seeded.warm_solves() >= seeded.eigen_solves() / 2);  // the seeded path really ran
  REQUIRE(seeded.points().size() == cold.points().size());
  double de = 0.0;
  for (std::size_t j = 0; j < cold.points().size(); ++j) {
    CHECK(seeded.points()[j].s == doctest::Approx(cold.points()[j].s).epsilon(1e-9));
    de = std::max(de, (seeded.points()[j].h_out.diagonal() - cold.points()[j].h_out.diagonal()).cwiseAbs().maxCoeff());
  }
  CHECK(de < 1e-8);  // GHz

  Eigen::VectorXcd c0 = Eigen::VectorXcd::Zero(cold.levels());
  c0(0) = 1.0;
  const Eigen::VectorXcd a = propagate_through_frame(cold, c0, fo.ns_per_unit_s);
  const Eigen::VectorXcd b = propagate_through_frame(seeded, c0, fo.ns_per_unit_s);
  for (int n = 0; n < cold.levels(); ++n) CHECK(std::norm(a(n)) == doctest::Approx(std::norm(b(n))).epsilon(1e-8));
  CHECK(std::norm(a(0)) > 0.9);  // 1 us is slow for this ring: most weight stays in the ground state
}
