// `gapwise inspect PROBLEM [SCHEDULE]`: what the inputs hold, the classical
// ground manifold, and the memory a simulation will need.
#include <iostream>
#include <memory>
#include <optional>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise::cli {
namespace {

struct InspectOptions {
  std::string problem, schedule;
  bool json = false;
  int list = 16;
};

void run_inspect(const InspectOptions& o) {
  // Every input is read before anything is printed: a bad schedule must not
  // leave half a report on stdout.
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule));
  const ProblemFile& pf = *loaded.problem_file;
  const IsingProblem& p = pf.ising;
  loaded.check_memory(0);
  const GroundManifold gm = find_ground_manifold(p);
  int nfields = 0;
  for (double x : p.h) nfields += x != 0.0;
  const double dyn_bytes = estimate_bytes(p.qubits, 9, 0);
  if (o.json) {
    toml::table j;
    put(j, "problem_file", o.problem);
    put(j, "kind", pf.kind);
    put(j, "qubits", static_cast<long long>(p.qubits));
    put(j, "couplings", static_cast<long long>(p.couplings.size()));
    put(j, "nonzero_fields", static_cast<long long>(nfields));
    put(j, "offset", p.offset);
    put(j, "ground_energy", gm.energy);
    put(j, "ground_degeneracy", static_cast<long long>(gm.degeneracy()));
    put(j, "first_excited_energy", gm.first_excited_energy);
    put(j, "spin_flip_symmetric", !p.has_fields());
    put(j, "dynamics_memory_bytes", dyn_bytes);
    toml::array states;
    for (std::size_t k = 0; k < gm.states.size() && static_cast<int>(k) < o.list; ++k)
      states.push_back(bits_string(gm.states[k], p.qubits));
    j.insert_or_assign("ground_states_bits", std::move(states));
    std::cout << to_json(j) << "\n";
    return;
  }
  std::cout << fmt::format("problem      {}{}\n", terminal_text(o.problem),
                           p.description.empty() ? "" : "  (" + terminal_text(p.description) + ")");
  std::cout << fmt::format("kind         {} (read as Ising: E(s) = sum h_i s_i + sum J_ij s_i s_j + offset)\n", pf.kind);
  std::cout << fmt::format("qubits       {}   couplings {}   non-zero fields {}   offset {}\n", p.qubits,
                           p.couplings.size(), nfields, p.offset);
  std::cout << fmt::format("symmetry     {}\n", p.has_fields()
                                                   ? "none (fields break the global spin flip)"
                                                   : "global spin flip (all h = 0): spectra are taken in the even sector");
  std::cout << fmt::format("ground       energy {:.15g}, degeneracy {} (tolerance {:.1e})\n", gm.energy, gm.degeneracy(),
                           gm.tolerance);
  std::cout << fmt::format("next level   energy {:.15g} (classical gap {:.6g})\n", gm.first_excited_energy,
                           gm.first_excited_energy - gm.energy);
  std::cout << "ground states (bits q0..q" << p.qubits - 1 << ", spins):\n";
  for (std::size_t k = 0; k < gm.states.size() && static_cast<int>(k) < o.list; ++k)
    std::cout << fmt::format("  {}  {}\n", bits_string(gm.states[k], p.qubits), spins_string(gm.states[k], p.qubits));
  if (static_cast<int>(gm.states.size()) > o.list) std::cout << fmt::format("  ... {} more\n", gm.states.size() - o.list);
  std::cout << fmt::format("memory       state vector {}, an anneal about {} (available {})\n",
                           human_bytes(estimate_bytes(p.qubits, 1, 0) - std::ldexp(8.0, p.qubits)), human_bytes(dyn_bytes),
                           human_bytes(available_bytes()));
  if (!o.schedule.empty()) {
    const Schedule& s = loaded.schedule;
    std::cout << fmt::format("schedule     {}{}\n", terminal_text(o.schedule),
                             s.description.empty() ? "" : "  (" + terminal_text(s.description) + ")");
    std::cout << fmt::format("  scales     {}\n", s.scales.describe());
    std::cout << fmt::format("  path       {} waypoints, times in {}{}\n", s.shape.points().size(),
                             s.time_in_ns ? "ns" : "fractions of the duration",
                             s.duration_ns ? fmt::format(", default duration {} ns", *s.duration_ns) : "");
    std::cout << fmt::format("  start      {}\n", s.start.kind == StartKind::Ground ? "ground state of H at the first s"
                                                                                    : "classical state (start_bits)");
  }
}

}  // namespace

void register_inspect(CLI::App& app) {
  auto o = std::make_shared<InspectOptions>();
  CLI::App* sub = app.add_subcommand("inspect",
      "Show what a problem (and optionally a schedule) file holds: sizes, symmetry,\n"
      "the classical ground energy and degeneracy by exhaustive enumeration, and the\n"
      "memory a simulation needs.\n"
      "Example: gapwise inspect data-samples/triangle.toml schedules/pause.toml");
  sub->add_option("problem", o->problem, "problem file (TOML, see the user guide)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule file (TOML), optional")->check(readable_input_file());
  sub->add_flag("--json", o->json, "print a JSON summary instead of text");
  sub->add_option("--list", o->list, "how many ground states to list")->capture_default_str();
  sub->callback([o] { run_inspect(*o); });
}

}  // namespace gapwise::cli
