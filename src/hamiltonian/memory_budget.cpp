#include "hamiltonian/memory_budget.hpp"

#include <atomic>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <optional>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

double estimate_bytes(int qubits, int complex_vectors, int real_vectors) {
  const double dim = std::ldexp(1.0, qubits);
  return dim * (8.0 /*diagonal*/ + 16.0 * complex_vectors + 8.0 * real_vectors);
}

namespace {

/// A number of bytes from a cgroup file; nullopt when missing or "max" (no limit).
std::optional<double> read_bytes(const std::filesystem::path& file) {
  std::ifstream f(file);
  std::string word;
  if (!(f >> word) || word == "max") return std::nullopt;
  char* end = nullptr;
  const double v = std::strtod(word.c_str(), &end);
  if (end == word.c_str() || *end != '\0' || !(v >= 0)) return std::nullopt;
  // cgroup v1 writes "no limit" as a huge page-rounded number (about 2^63).
  if (v >= 0x1p62) return std::nullopt;
  return v;
}

/// Room under the limit of one cgroup folder, nullopt when it sets none.
std::optional<double> room_in(const std::filesystem::path& dir, const char* limit_file, const char* usage_file) {
  const auto limit = read_bytes(dir / limit_file);
  if (!limit) return std::nullopt;
  return std::max(0.0, *limit - read_bytes(dir / usage_file).value_or(0.0));
}

/// The smallest room of `dir` and its ancestors up to `root` (limits nest).
std::optional<double> room_up_to_root(const std::filesystem::path& root, const std::string& relative,
                                      const char* limit_file, const char* usage_file) {
  std::optional<double> best;
  std::filesystem::path rel = std::filesystem::path(relative).relative_path();
  for (;;) {
    const auto r = room_in(root / rel, limit_file, usage_file);
    if (r && (!best || *r < best)) best = r;
    if (rel.empty()) break;
    rel = rel.parent_path();
  }
  return best;
}

/// Room under the cgroup limits of this process (v2 unified or v1 memory controller).
std::optional<double> cgroup_room(const SystemFiles& files) {
  std::ifstream f(files.self_cgroup);
  std::string line;
  std::optional<double> best;
  auto keep = [&](std::optional<double> r) {
    if (r && (!best || *r < best)) best = r;
  };
  while (std::getline(f, line)) {
    // "hierarchy-ID:controller-list:cgroup-path"
    const auto a = line.find(':'), b = line.find(':', a + 1);
    if (a == std::string::npos || b == std::string::npos) continue;
    const std::string controllers = line.substr(a + 1, b - a - 1), path = line.substr(b + 1);
    const std::filesystem::path root(files.cgroup_root);
    if (line.compare(0, a, "0") == 0 && controllers.empty())
      keep(room_up_to_root(root, path, "memory.max", "memory.current"));
    else if ((',' + controllers + ',').find(",memory,") != std::string::npos)
      keep(room_up_to_root(root / "memory", path, "memory.limit_in_bytes", "memory.usage_in_bytes"));
  }
  return best;
}

}  // namespace

double available_bytes(const SystemFiles& files, int ranks_on_node) {
  std::ifstream f(files.meminfo);
  std::string key;
  double kb = 0;
  std::string unit;
  double have = 0.0;
  while (f >> key >> kb >> unit)
    if (key == "MemAvailable:") {
      have = kb * 1024.0;
      break;
    }
  if (const auto room = cgroup_room(files)) have = have > 0 ? std::min(have, *room) : *room;
  return have / std::max(1, ranks_on_node);
}

namespace {
std::atomic<int> g_ranks_counted_by_mpi{0};
}  // namespace

void set_ranks_on_this_node(int ranks) { g_ranks_counted_by_mpi = ranks > 0 ? ranks : 0; }

int ranks_on_this_node() {
  if (const int n = g_ranks_counted_by_mpi.load()) return n;
  const char* env = std::getenv("OMPI_COMM_WORLD_LOCAL_SIZE");
  if (!env) return 1;
  const long n = std::strtol(env, nullptr, 10);
  return n > 0 && n < 100000 ? static_cast<int>(n) : 1;
}

double available_bytes() { return available_bytes(SystemFiles{}, ranks_on_this_node()); }

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
                     fmt::format("{} qubits need about {} but only {} is available{}", qubits,
                                 human_bytes(need), human_bytes(have),
                                 ranks_on_this_node() > 1
                                     ? fmt::format(" (the share of one of the {} MPI ranks on this node)",
                                                   ranks_on_this_node())
                                     : ""),
                     "use fewer qubits (split the problem) or a machine with more memory; each qubit doubles the need");
}

}  // namespace gapwise
