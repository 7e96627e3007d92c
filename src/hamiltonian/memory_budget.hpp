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

/// Where the memory check reads the machine's state; tests point these at fake files.
struct SystemFiles {
  std::string meminfo = "/proc/meminfo";
  std::string self_cgroup = "/proc/self/cgroup";
  std::string cgroup_root = "/sys/fs/cgroup";
};

/// Bytes this process may still allocate: the smallest of MemAvailable and the
/// room left under the memory limits of its cgroup and every ancestor (v2:
/// memory.max - memory.current; v1: memory/.../memory.limit_in_bytes -
/// memory.usage_in_bytes), divided by OMPI_COMM_WORLD_LOCAL_SIZE (the MPI ranks
/// of this job on this node, which each need as much). 0 when unknown.
double available_bytes(const SystemFiles& files, int ranks_on_node);
/// available_bytes() for this process (the real files and the environment).
double available_bytes();
/// The ranks sharing this node: as counted by MPI (set_ranks_on_this_node, from
/// an MPI_COMM_TYPE_SHARED split) once MPI runs, else OMPI_COMM_WORLD_LOCAL_SIZE
/// under mpirun, else 1.
int ranks_on_this_node();
/// Called by the process group once MPI has counted the ranks on this node.
void set_ranks_on_this_node(int ranks);

/// "1.5 GiB"
std::string human_bytes(double bytes);

/// Throws InputError (place: `what`) when the estimate exceeds the available memory
/// or n > kMaxQubits; the message shows the estimate and the qubit count as asked for.
void check_memory(long long qubits, int complex_vectors, int real_vectors, const std::string& what);

/// The same, with the refusal placed at `where` (e.g. file, line and column of
/// the `qubits` key; an empty key becomes "qubits").
void check_memory(long long qubits, int complex_vectors, int real_vectors, const SourcePlace& where);

}  // namespace gapwise
