#include "platform/thread_count.hpp"

#include <sched.h>

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

int default_thread_count(const std::optional<std::string>& omp_num_threads, int affinity_cpus) {
  if (omp_num_threads) {
    // "4" or the outermost level of "4,2"; anything else is ignored as OpenMP does.
    const std::string first = omp_num_threads->substr(0, omp_num_threads->find(','));
    char* end = nullptr;
    const long n = std::strtol(first.c_str(), &end, 10);
    if (!first.empty() && end && *end == '\0' && n > 0) return static_cast<int>(std::min<long>(n, 1024));
  }
  if (affinity_cpus > 0) return affinity_cpus;
  const unsigned hw = std::thread::hardware_concurrency();
  return hw > 0 ? static_cast<int>(hw) : 1;
}

int default_thread_count() {
  const char* env = std::getenv("OMP_NUM_THREADS");
  return default_thread_count(env ? std::optional<std::string>(env) : std::nullopt, affinity_cpu_count());
}

int thread_count_or_default(int requested) { return requested > 0 ? requested : default_thread_count(); }

}  // namespace gapwise
