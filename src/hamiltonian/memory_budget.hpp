#pragma once
// How much memory a computation on n qubits needs, and whether this machine has it.
// Every dense-state computation asks before allocating, so a too-large problem is
// refused with the estimate instead of dying in the allocator.
#include <cstddef>
#include <string>

#include "io/input_error.hpp"

namespace gapwise {

/// Largest qubit count any gapwise computation accepts (2^n amplitudes).
inline constexpr int kMaxQubits = 30;

/// Bytes for the problem diagonal plus `complex_vectors` complex states and
/// `real_vectors` real vectors of length 2^n.
double estimate_bytes(int qubits, int complex_vectors, int real_vectors);

/// Bytes the kernel reports as available (MemAvailable), or 0 when unknown.
double available_bytes();

/// "1.5 GiB"
std::string human_bytes(double bytes);

/// Throws InputError (place: `what`) when the estimate exceeds the available memory
/// or n > kMaxQubits; the message shows the estimate and the qubit count as asked for.
void check_memory(long long qubits, int complex_vectors, int real_vectors, const std::string& what);

/// The same, with the refusal placed at `where` (e.g. file, line and column of
/// the `qubits` key; an empty key becomes "qubits").
void check_memory(long long qubits, int complex_vectors, int real_vectors, const SourcePlace& where);

}  // namespace gapwise
