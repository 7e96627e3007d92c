#pragma once
// Running many independent tasks (one per instance) on every core of one machine
// or, under mpirun, on every rank of a cluster job. This file and its .cpp are
// the only place in gapwise that knows MPI; without GAPWISE_MPI the library
// builds and runs the same tasks on threads.
//
// Dynamic distribution: instance costs differ by orders of magnitude (2^n), so
// tasks are handed out one at a time, most expensive first, to whichever worker
// is free. Under MPI, rank 0 collects every result (and alone writes files); it
// runs one compute thread itself while its main thread serves the other ranks.
// Results travel as byte strings, so they arrive bit for bit as computed.
//
//   ProcessGroup& group = ProcessGroup::instance();   // starts MPI under mpirun
//   distribute_work(order,
//       [&](std::size_t i) { return serialize(evaluate(i)); },       // any rank, any thread
//       [&](std::size_t i, std::string bytes) { keep(i, bytes); },   // rank 0, this thread
//       {.threads = 2});
//   if (group.is_collector()) write_results();
#include <cstddef>
#include <functional>
#include <string>
#include <vector>

namespace gapwise {

class ProcessGroup {
 public:
  /// The group of this process. The first call starts MPI when the process was
  /// launched by mpirun/mpiexec (seen in its environment) and gapwise was built
  /// with MPI; otherwise the group is this process alone. Throws InputError when
  /// launched with several ranks by a gapwise built without MPI (every rank would
  /// repeat the whole job). MPI is finalized at exit.
  static ProcessGroup& instance();
  ~ProcessGroup();
  ProcessGroup(const ProcessGroup&) = delete;
  ProcessGroup& operator=(const ProcessGroup&) = delete;

  int rank() const { return rank_; }
  int size() const { return size_; }
  bool uses_mpi() const { return mpi_; }
  bool is_collector() const { return rank_ == 0; }
  /// Ranks of this job on this node (MPI_COMM_TYPE_SHARED split); 1 without MPI.
  int ranks_on_node() const { return ranks_on_node_; }
  /// OpenMP threads each task of this rank uses under MPI (threads_per_rank of
  /// platform/thread_count: OMP_NUM_THREADS, else the affinity mask capped at
  /// the rank's share of the node); 1 without MPI.
  int threads() const { return threads_; }
  /// "MPI, 4 ranks, 2 threads each" (or "1 to 2 threads each" when the ranks
  /// differ), or "threads".
  std::string describe() const;
  /// Ends the whole job with `code` (MPI_Abort under MPI with several ranks, so no
  /// rank waits forever for one that failed); a plain exit otherwise.
  [[noreturn]] void abort(int code);

 private:
  ProcessGroup();
  int rank_ = 0;
  int size_ = 1;
  bool mpi_ = false;
  int ranks_on_node_ = 1;
  int threads_ = 1;
  int fewest_threads_ = 1, most_threads_ = 1;  // over all ranks
};

/// True when this gapwise was built with MPI support.
bool built_with_mpi();

struct WorkOptions {
  /// Compute threads in this process when not under MPI (>= 1), each task on one
  /// thread. Under MPI every rank computes one task at a time on
  /// ProcessGroup::threads() OpenMP threads (large instances use them all).
  int threads = 1;
};

using TaskFunction = std::function<std::string(std::size_t task)>;
using CollectFunction = std::function<void(std::size_t task, std::string result)>;

/// Runs task(i) for every i in `order` (handed out in that order) and calls
/// collect(i, result) on the collecting rank, in the calling thread, once per
/// task as results arrive. Must be called on every rank of the group with the
/// same `order` size semantics (workers only receive indices from rank 0).
/// A task that throws stops the distribution cleanly on all ranks; the first
/// error is rethrown on the collector as std::runtime_error (InputError stays
/// InputError in threaded mode). Results collected before the error were
/// already passed to collect().
void distribute_work(const std::vector<std::size_t>& order, const TaskFunction& task, const CollectFunction& collect,
                     const WorkOptions& options);

}  // namespace gapwise
