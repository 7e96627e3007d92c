#include "hamiltonian/transverse_ising.hpp"

#include "hamiltonian/memory_budget.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise {

TransverseIsingHamiltonian::TransverseIsingHamiltonian(const IsingProblem& problem)
    : problem_(problem), n_(problem.qubits), dim_(std::size_t{1} << problem.qubits) {
  diag_ = problem_diagonal(problem_);
}

}  // namespace gapwise
