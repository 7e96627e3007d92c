#include "hamiltonian/memory_budget.hpp"

#include <cmath>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

double estimate_bytes(int qubits, int complex_vectors, int real_vectors) {
  const double dim = std::ldexp(1.0, qubits);
  return dim * (8.0 /*diagonal*/ + 16.0 * complex_vectors + 8.0 * real_vectors);
}

double available_bytes() {
  std::ifstream f("/proc/meminfo");
  std::string key;
  double kb = 0;
  std::string unit;
  while (f >> key >> kb >> unit)
    if (key == "MemAvailable:") return kb * 1024.0;
  return 0.0;
}

std::string human_bytes(double bytes) {
  const char* units[] = {"B", "KiB", "MiB", "GiB", "TiB", "PiB", "EiB"};
  int u = 0;
  while (bytes >= 1024.0 && u < 6) { bytes /= 1024.0; ++u; }
  return fmt::format("{:.1f} {}", bytes, units[u]);
}

void check_memory(long long qubits, int complex_vectors, int real_vectors, const std::string& what) {
  check_memory(qubits, complex_vectors, real_vectors, SourcePlace{what, 0, 0, "qubits"});
}

void check_memory(long long qubits, int complex_vectors, int real_vectors, const SourcePlace& where_in) {
  SourcePlace where = where_in;
  if (where.key.empty()) where.key = "qubits";
  // The count the input asked for is the one shown, however large (up to 64 the
  // estimate in bytes is still a number worth printing).
  if (qubits > 64)
    throw InputError(where,
                     fmt::format("{} qubits need 2^{} amplitudes, more memory than any computer has; gapwise accepts at "
                                 "most {} qubits",
                                 qubits, qubits, kMaxQubits),
                     "split the problem or fix the qubit count");
  const double need = estimate_bytes(static_cast<int>(qubits), complex_vectors, real_vectors);
  if (qubits > kMaxQubits)
    throw InputError(where,
                     fmt::format("{} qubits need about {} of memory (2^{} amplitudes); gapwise accepts at most {} qubits",
                                 qubits, human_bytes(need), qubits, kMaxQubits),
                     "split the problem or fix the qubit count");
  const double have = available_bytes();
  if (have > 0 && need > 0.9 * have)
    throw InputError(where,
                     fmt::format("{} qubits need about {} but only {} is available", qubits,
                                 human_bytes(need), human_bytes(have)),
                     "use fewer qubits (split the problem) or a machine with more memory; each qubit doubles the need");
}

}  // namespace gapwise
