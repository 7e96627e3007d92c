#include "problem/planted_loops.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <map>

#include <fmt/format.h>

#include "io/input_error.hpp"
#include "problem/seeded_random.hpp"

namespace gapwise {
namespace {

// A non-backtracking random walk from a random vertex until it revisits a vertex;
// returns the closed part as a vertex cycle v0, v1, ..., v_{L-1} (edge v_{L-1}-v0 closes it).
std::vector<int> random_loop(const std::vector<std::vector<int>>& adj, std::mt19937_64& rng) {
  const int n = static_cast<int>(adj.size());
  std::vector<int> walk;
  std::vector<int> seen_at(static_cast<std::size_t>(n), -1);
  int v = static_cast<int>(uniform_index(rng, static_cast<std::uint64_t>(n)));
  int prev = -1;
  for (;;) {
    seen_at[static_cast<std::size_t>(v)] = static_cast<int>(walk.size());
    walk.push_back(v);
    const auto& nb = adj[static_cast<std::size_t>(v)];
    int next;
    do {
      next = nb[uniform_index(rng, nb.size())];
    } while (next == prev);  // every vertex has >= 2 neighbours, so this ends
    prev = v;
    v = next;
    if (seen_at[static_cast<std::size_t>(v)] >= 0)
      return std::vector<int>(walk.begin() + seen_at[static_cast<std::size_t>(v)], walk.end());
  }
}

}  // namespace

PlantedInstance plant_frustrated_loops(int n, const std::vector<Edge>& edges, double loops_per_qubit, int ruggedness,
                                       std::mt19937_64& rng) {
  if (!(loops_per_qubit > 0.0) || !std::isfinite(loops_per_qubit))
    throw InputError({"--loops-per-qubit", 0, 0, "--loops-per-qubit"},
                     fmt::format("loop density {} must be positive", loops_per_qubit), "use e.g. 1.0");
  if (ruggedness < 0)
    throw InputError({"--ruggedness", 0, 0, "--ruggedness"}, fmt::format("ruggedness {} must not be negative", ruggedness),
                     "use 0 for no bound, or e.g. 3 (the largest |J_ij| allowed)");
  std::vector<std::vector<int>> adj(static_cast<std::size_t>(n));
  for (const auto& e : edges) {
    adj[static_cast<std::size_t>(e.i)].push_back(e.j);
    adj[static_cast<std::size_t>(e.j)].push_back(e.i);
  }
  for (int v = 0; v < n; ++v)
    if (adj[static_cast<std::size_t>(v)].size() < 2)
      throw InputError({"--graph", 0, 0, "--graph"},
                       fmt::format("vertex {} has fewer than two neighbours, so no loop passes through it", v),
                       "plant loops on a graph where every vertex has degree >= 2 (ring, square lattice, complete)");

  PlantedInstance out;
  std::vector<int> spin(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i) {
    spin[static_cast<std::size_t>(i)] = (rng() >> 63) ? -1 : 1;
    if (spin[static_cast<std::size_t>(i)] < 0) out.planted_state |= BasisIndex{1} << i;
  }
  // Integer couplings, summed exactly.
  std::map<std::pair<int, int>, int> j;
  const int wanted = std::max(1, static_cast<int>(std::lround(loops_per_qubit * n)));
  const int max_attempts = 1000 * wanted;
  int attempts = 0;
  while (out.loops < wanted) {
    if (++attempts > max_attempts)
      throw InputError({"--ruggedness", 0, 0, "--ruggedness"},
                       fmt::format("only {} of {} loops fit within ruggedness {} after {} attempts", out.loops, wanted,
                                   ruggedness, max_attempts),
                       "raise --ruggedness or lower --loops-per-qubit");
    const std::vector<int> loop = random_loop(adj, rng);
    const std::size_t len = loop.size();
    const std::size_t frustrated = uniform_index(rng, len);
    std::vector<std::pair<std::pair<int, int>, int>> add;
    bool fits = true;
    for (std::size_t k = 0; k < len && fits; ++k) {
      const int a = loop[k], b = loop[(k + 1) % len];
      const int sign = spin[static_cast<std::size_t>(a)] * spin[static_cast<std::size_t>(b)];
      const int delta = k == frustrated ? sign : -sign;
      const auto key = std::minmax(a, b);
      const auto it = j.find(key);
      if (ruggedness > 0 && std::abs((it == j.end() ? 0 : it->second) + delta) > ruggedness) fits = false;
      add.push_back({key, delta});
    }
    if (!fits) continue;
    for (const auto& [key, delta] : add) j[key] += delta;
    ++out.loops;
    out.loop_lengths.push_back(static_cast<int>(len));
    out.ground_energy += 2.0 - static_cast<double>(len);
  }
  out.problem = IsingProblem(n);
  for (const auto& [key, value] : j)
    if (value != 0) out.problem.couplings.push_back({key.first, key.second, static_cast<double>(value)});
  return out;
}

}  // namespace gapwise
