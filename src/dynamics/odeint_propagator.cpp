#include "dynamics/odeint_propagator.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>

#include <boost/numeric/odeint.hpp>

namespace gapwise {

void OdeintPropagator::advance(const AnnealDrive& drive, double t0, double t1, QuantumState& psi,
                               PropagationStats& stats) {
  namespace ode = boost::numeric::odeint;
  const Complex minus_i_2pi(0.0, -2.0 * std::numbers::pi);
  long applications = 0;
  auto system = [&](const QuantumState& x, QuantumState& dxdt, double t) {
    const double a = drive.a_ghz(t), b = drive.b_ghz(t);
    h_.apply_terms<Complex, Complex>(minus_i_2pi * (-0.5 * a), minus_i_2pi * (0.5 * b), x.data(), dxdt.data());
    ++applications;
  };
  // Local errors add up over the thousands of steps of an anneal: the per-step
  // tolerance is kLocalFactor below the target accuracy (measured: 5e-7 global
  // error on p for a 20 ns, 5 GHz anneal at tolerance 1e-6).
  constexpr double kLocalFactor = 1e-4;
  const double local = opt_.tolerance * kLocalFactor;
  auto stepper = ode::make_controlled<ode::runge_kutta_dopri5<QuantumState>>(local, local);
  // First step: a fraction of the fastest phase rotation; the controller adapts it.
  const double scale = std::max(1e-3, 0.5 * (drive.scales->a_max_ghz() * h_.qubits() +
                                             drive.scales->b_max_ghz() * 10.0));
  const double dt0 = std::min(t1 - t0, 0.01 / scale);
  const std::size_t steps = ode::integrate_adaptive(stepper, system, psi, t0, t1, dt0);
  stats.steps += static_cast<long>(steps);
  stats.hamiltonian_applications += applications;
  for (const auto& c : psi)
    if (!std::isfinite(c.real()) || !std::isfinite(c.imag()))
      throw std::runtime_error("the state became non-finite during integration");
}

}  // namespace gapwise
