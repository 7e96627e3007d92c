#pragma once
// The gapwise problem file (TOML, format_version 1). Key by key in
// notebooks-free-docs/user-guide.md. Example:
//
//   format = "gapwise-problem"
//   format_version = 1
//   kind = "ising"                      # or "qubo"
//   qubits = 3
//   description = "frustrated triangle"
//   fields = [0.1, 0.0, -0.2]           # h_i, or [[i, h_i], ...]
//   couplings = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]   # [i, j, J_ij]
//   offset = 0.0
//
//   IsingProblem p = read_problem_file("triangle.toml");
#include <string>
#include <string_view>

#include "io/input_error.hpp"
#include "problem/ising_problem.hpp"

namespace gapwise {

struct ProblemFile {
  IsingProblem ising;            ///< always filled (QUBO converted exactly)
  std::string kind;              ///< "ising" or "qubo", as written
  QuboProblem qubo;              ///< filled when kind == "qubo"
  /// Where `qubits` is written (file, line, column), for refusals that depend on
  /// the qubit count, e.g. a command's memory check:
  ///   check_memory(pf.ising.qubits, 10, 0, pf.qubits_place);  // "file:5:10: key 'qubits': ..."
  SourcePlace qubits_place;
};

ProblemFile parse_problem_file(const std::string& path);
ProblemFile parse_problem_text(std::string_view text, const std::string& name);
inline IsingProblem read_problem_file(const std::string& path) { return parse_problem_file(path).ising; }

/// Writes an Ising problem in the same format (used by tools that derive problems).
std::string format_problem_toml(const IsingProblem& p);

}  // namespace gapwise
