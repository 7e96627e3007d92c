#include "hamiltonian/spin_flip_sector.hpp"

#include <cmath>

#include "io/input_error.hpp"

namespace gapwise {

std::string describe_sector(SpinFlipSector sector) {
  switch (sector) {
    case SpinFlipSector::Even: return "even spin-flip sector (P = +1)";
    case SpinFlipSector::Odd: return "odd spin-flip sector (P = -1)";
    default: return "full space";
  }
}

std::string sector_name(SpinFlipSector sector) {
  switch (sector) {
    case SpinFlipSector::Even: return "even";
    case SpinFlipSector::Odd: return "odd";
    default: return "full";
  }
}

IsingProblem fix_last_qubit_up(const IsingProblem& problem) {
  const int last = problem.qubits - 1;
  IsingProblem r(last);
  for (int i = 0; i < last; ++i) r.h[static_cast<std::size_t>(i)] = problem.h[static_cast<std::size_t>(i)];
  for (const Coupling& c : problem.couplings) {
    if (c.j == last) r.h[static_cast<std::size_t>(c.i)] += c.value;  // s_last = +1
    else if (c.i == last) r.h[static_cast<std::size_t>(c.j)] += c.value;
    else r.couplings.push_back(c);
  }
  // The field on qubit n-1 itself contributes h_last * (+1).
  r.offset = problem.offset + (last >= 0 ? problem.h[static_cast<std::size_t>(last)] : 0.0);
  r.description = "reduced (last qubit fixed up)";
  return r;
}

SectorHamiltonian::SectorHamiltonian(const TransverseIsingHamiltonian& full, SpinFlipSector sector)
    : full_(&full), sector_(sector), dim_(full.dim()) {
  if (sector == SpinFlipSector::Full) return;
  const IsingProblem& p = full.problem();
  if (p.has_fields())
    throw InputError({"sector", 0, 0, "sector"},
                     "the spin-flip sectors exist only when every field h_i is zero, and this problem has fields",
                     "use the full space (sector 'full', the default for problems with fields)");
  if (p.qubits < 1)
    throw InputError({"sector", 0, 0, "sector"}, "a problem without qubits has no spin-flip sectors",
                     "give a problem with at least one qubit");
  reduced_ = std::make_shared<const TransverseIsingHamiltonian>(fix_last_qubit_up(p));
  dim_ = full.dim() / 2;
}

BasisIndex SectorHamiltonian::partner(std::size_t index) const {
  if (sector_ == SpinFlipSector::Full) return index;
  return static_cast<BasisIndex>(full_->dim() - 1 - index);
}

void SectorHamiltonian::apply(double a_ghz, double b_ghz, const double* x, double* y) const {
  if (sector_ == SpinFlipSector::Full) {
    full_->apply(a_ghz, b_ghz, x, y);
    return;
  }
  reduced_->apply(a_ghz, b_ghz, x, y);
  // sigma^x on qubit n-1 maps representative b to p * (b with all lower bits flipped).
  const double c = (sector_ == SpinFlipSector::Even ? -0.5 : 0.5) * a_ghz;
  const std::size_t last = dim_ - 1;
  if (dim_ >= (std::size_t{1} << 16)) {
#pragma omp parallel for schedule(static)
    for (std::size_t k = 0; k < dim_; ++k) y[k] += c * x[last - k];
  } else {  // no team of one: its barrier costs a system call (transverse_ising.hpp)
    for (std::size_t k = 0; k < dim_; ++k) y[k] += c * x[last - k];
  }
}

std::vector<double> SectorHamiltonian::to_full(const double* x) const {
  if (sector_ == SpinFlipSector::Full) return std::vector<double>(x, x + dim_);
  std::vector<double> f(full_->dim());
  const double r = 1.0 / std::sqrt(2.0), p = sector_ == SpinFlipSector::Even ? r : -r;
  const std::size_t top = full_->dim() - 1;
  for (std::size_t k = 0; k < dim_; ++k) {
    f[k] = r * x[k];
    f[top - k] = p * x[k];
  }
  return f;
}

}  // namespace gapwise
