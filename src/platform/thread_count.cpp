#include "platform/thread_count.hpp"

#include <sched.h>
#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <thread>

namespace gapwise {

int affinity_cpu_count() {
  cpu_set_t set;
  CPU_ZERO(&set);
  if (sched_getaffinity(0, sizeof(set), &set) != 0) return 0;
  return CPU_COUNT(&set);
}

namespace {

/// "4" or the outermost level of "4,2"; anything else is ignored as OpenMP does.
std::optional<int> omp_threads_asked(const std::optional<std::string>& omp_num_threads) {
  if (!omp_num_threads) return std::nullopt;
  const std::string first = omp_num_threads->substr(0, omp_num_threads->find(','));
  char* end = nullptr;
  const long n = std::strtol(first.c_str(), &end, 10);
  if (!first.empty() && end && *end == '\0' && n > 0) return static_cast<int>(std::min<long>(n, 1024));
  return std::nullopt;
}

}  // namespace

int default_thread_count(const std::optional<std::string>& omp_num_threads, int affinity_cpus) {
  if (const auto n = omp_threads_asked(omp_num_threads)) return *n;
  if (affinity_cpus > 0) return affinity_cpus;
  const unsigned hw = std::thread::hardware_concurrency();
  return hw > 0 ? static_cast<int>(hw) : 1;
}

int default_thread_count() {
  const char* env = std::getenv("OMP_NUM_THREADS");
  return default_thread_count(env ? std::optional<std::string>(env) : std::nullopt, affinity_cpu_count());
}

int threads_per_rank(const std::optional<std::string>& omp_num_threads, int affinity_cpus, int node_cpus,
                     int ranks_on_node) {
  if (const auto n = omp_threads_asked(omp_num_threads)) return *n;
  const int mask = default_thread_count(std::nullopt, affinity_cpus);
  if (node_cpus > 0 && ranks_on_node > 0) return std::max(1, std::min(mask, node_cpus / ranks_on_node));
  return mask;
}

int threads_per_rank(int ranks_on_node) {
  const char* env = std::getenv("OMP_NUM_THREADS");
  return threads_per_rank(env ? std::optional<std::string>(env) : std::nullopt, affinity_cpu_count(),
                          static_cast<int>(::sysconf(_SC_NPROCESSORS_ONLN)), ranks_on_node);
}

int thread_count_or_default(int requested) { return requested > 0 ? requested : default_thread_count(); }

}  // namespace gapwise
