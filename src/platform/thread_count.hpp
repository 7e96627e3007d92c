#pragma once
// The one default thread count of every command (--threads 0): what this process
// may use on a shared node or inside a batch allocation, not what the node has.
#include <optional>
#include <string>

namespace gapwise {

/// OMP_NUM_THREADS when set to a positive number (its first entry for a nested
/// list such as "4,2"), else the CPUs in this process's affinity mask
/// (sched_getaffinity: taskset, cpusets, Slurm and mpirun bindings), at least 1.
int default_thread_count();

/// The rule itself, for tests: `omp_num_threads` is the variable's text (nullopt
/// when unset), `affinity_cpus` the CPUs in the mask (<= 0 when unknown).
int default_thread_count(const std::optional<std::string>& omp_num_threads, int affinity_cpus);

/// CPUs in the affinity mask of this process, or 0 when it cannot be read.
int affinity_cpu_count();

/// OpenMP threads of one MPI rank: OMP_NUM_THREADS when set (as above); else the
/// CPUs in the rank's affinity mask, but no more than its share of the node's
/// online CPUs (`node_cpus` / `ranks_on_node`), so ranks bound to a whole socket
/// (OpenMPI's default for more than 2 ranks) do not oversubscribe it. At least 1.
int threads_per_rank(const std::optional<std::string>& omp_num_threads, int affinity_cpus, int node_cpus,
                     int ranks_on_node);
/// threads_per_rank() for this process (environment, affinity mask, online CPUs).
int threads_per_rank(int ranks_on_node);

/// `requested` when > 0, else default_thread_count().
int thread_count_or_default(int requested);

}  // namespace gapwise
