#include "cli/bath_option.hpp"

#include <cmath>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "dynamics/truncated_master_equation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/bath_attributes.hpp"
#include "io/bath_file.hpp"
#include "studies/thermal_channel.hpp"
#include "io/infinite_tts.hpp"
#include "io/input_error.hpp"
#include "io/text_table.hpp"

namespace gapwise::cli {

namespace {
/// How K was chosen: "all levels" (ame-full), "automatic" or "fixed, not checked".
std::string levels_choice(const OpenAnnealResult& open) {
  if (open.levels == 0) return "all levels";
  return open.levels_fixed ? "fixed, not checked" : "automatic";
}

void put_bath_json(toml::table& j, const OhmicBath& bath) {
  toml::table b;
  put(b, "file", bath.source);
  put(b, "temperature_mk", bath.temperature_mk);
  put(b, "theta_ghz", bath.theta_ghz());
  put(b, "coupling", bath.coupling);
  put(b, "cutoff_ghz", bath.cutoff_ghz);
  put(b, "illustrative_defaults_used",
      bath.temperature_defaulted || bath.coupling_defaulted || bath.cutoff_defaulted);
  j.insert_or_assign("bath", std::move(b));
}
}  // namespace

CLI::Option* add_bath_option(CLI::App* sub, std::string& bath_file) {
  return sub
      ->add_option("--bath", bath_file,
                   "also run the anneal coupled to a thermal bath described in FILE (format gapwise-bath:\n"
                   "temperature_mk, coupling, cutoff_ghz; see the user guide) with the adiabatic master\n"
                   "equation (full density matrix up to 6 qubits, the lowest K levels beyond, as far as memory\n"
                   "allows), and report it beside the closed system")
      ->check(readable_input_file());
}

CLI::Option* add_bath_levels_option(CLI::App* sub, int& levels) {
  return sub->add_option("--bath-levels", levels,
                         "with --bath: keep exactly K lowest instantaneous levels (truncated master equation, any\n"
                         "size of problem) instead of the automatic K = 6, 10, 14, ... that reruns the anneal until p\n"
                         "changes less than the tolerance; reported as 'fixed, not checked' (0: automatic)")
      ->capture_default_str();
}

void check_bath_levels(int levels, bool has_bath, int qubits) {
  if (levels == 0) return;
  if (!has_bath)
    throw InputError({"--bath-levels", 0, 0, "--bath-levels"}, "--bath-levels is given without --bath",
                     "add --bath FILE, or leave out --bath-levels");
  const double states = std::ldexp(1.0, qubits);
  if (levels < 2 || levels > states)
    throw InputError({"--bath-levels", 0, 0, "--bath-levels"},
                     fmt::format("{} levels kept: the problem's {} qubits have {} levels", levels, qubits, states),
                     fmt::format("give K from 2 to {} (0: chosen automatically)", states));
  check_bath_size(qubits, levels);
}

OpenPropagatorOptions open_propagator_options(double tolerance, int levels) {
  OpenPropagatorOptions oo;
  oo.tolerance = tolerance;
  if (levels > 0) {
    oo.method = "ame-truncated";
    oo.levels = levels;
    oo.check_levels = false;
  }
  return oo;
}

void check_bath_size(int qubits, int levels) {
  const SourcePlace where{"--bath", 0, 0, "--bath"};
  const OpenPropagatorOptions defaults;
  const std::string method = resolve_open_method(defaults.method, qubits);
  if (method == "ame-full") {
    // Up to kAutoFullSpaceQubits: the full density matrix, far inside its own limit.
    if (qubits > kMaxFullSpaceOpenQubits)
      throw InputError(where,
                       fmt::format("the problem has {} qubits; the full-space master equation keeps the 2^n x 2^n "
                                   "density matrix and holds at most {} qubits",
                                   qubits, kMaxFullSpaceOpenQubits),
                       "leave out --bath, or use a smaller problem");
    return;
  }
  // The truncated master equation: K vectors of 2^n amplitudes (K up to the top of the automatic ladder).
  const int k = levels > 0 ? levels : defaults.max_levels;
  const int vectors = truncated_working_vectors(k);
  const double need = estimate_bytes(qubits, 0, vectors);
  const double have = available_bytes();
  if (qubits > kMaxQubits || (have > 0 && need > 0.9 * have))
    throw InputError(
        where,
        fmt::format("the problem has {} qubits; the open-system anneal (truncated master equation, {} {} lowest "
                    "levels as vectors of 2^{} amplitudes, about {} real vectors) needs about {} of memory, but {}",
                    qubits, levels > 0 ? "the" : "up to the", k, qubits, vectors, human_bytes(need),
                    qubits > kMaxQubits ? fmt::format("gapwise accepts at most {} qubits", kMaxQubits)
                                        : fmt::format("only {} is available{}", human_bytes(have),
                                                      ranks_on_this_node() > 1
                                                          ? fmt::format(" (the share of one of the {} MPI ranks "
                                                                        "on this node)",
                                                                        ranks_on_this_node())
                                                          : "")),
        levels > 0 ? "keep fewer levels with --bath-levels, leave out --bath, or use a machine with more memory "
                     "(each qubit doubles the need)"
                   : "leave out --bath, or use a machine with more memory (each qubit doubles the need)");
}

void check_thermal_channel_size(int qubits) {
  if (qubits > kMaxThermalChannelQubits)
    throw InputError({"--bath", 0, 0, "--bath"},
                     fmt::format("the problem has {} qubits; diagnose's thermal channel reads the level populations "
                                 "from the full spectrum of H(s) (a dense eigen-decomposition of the 2^n x 2^n "
                                 "Hamiltonian at every observation point) and holds at most {} qubits",
                                 qubits, kMaxThermalChannelQubits),
                     "leave out --bath in diagnose and run `anneal --bath` or `durations --bath`, which keep only "
                     "the lowest levels and accept larger problems");
}

std::optional<OhmicBath> load_bath(const std::string& bath_file, int qubits) {
  if (bath_file.empty()) return std::nullopt;
  OhmicBath bath = read_bath_file(bath_file);
  check_bath_size(qubits, 0);
  return bath;
}

std::string open_system_text(const OhmicBath& bath, const OpenAnnealResult& open, double p_closed) {
  std::string out = "\nthermal bath (adiabatic master equation, sigma^z coupling on every qubit, Lamb shift neglected)\n";
  out += fmt::format("bath                      {}{}\n", bath.source.empty() ? "" : bath.source + ": ", bath.summary());
  out += fmt::format("                          closed system   with bath\n");
  out += fmt::format("ground-state probability  {:<15.8f} {:.8f}\n", p_closed, open.ground_probability);
  out += fmt::format("density matrix            trace error {:.1e} (largest along the run), smallest eigenvalue {:.1e}\n",
                     open.stats.max_trace_deviation, open.stats.min_eigenvalue);
  out += fmt::format("open-system run           {} steps ({} rejected), {} eigen-decompositions, error estimate {}, {:.2f} s\n",
                     open.stats.steps, open.stats.rejected_steps, open.stats.eigen_solves,
                     std::isfinite(open.stats.error_estimate) ? fmt::format("{:.1e}", open.stats.error_estimate)
                                                              : std::string("none (K not checked)"),
                     open.wall_seconds);
  out += fmt::format("open-system method        {}", open.propagator);
  if (open.levels > 0 && open.levels_fixed)
    out += fmt::format(", K = {} lowest levels, fixed by --bath-levels, not checked (highest kept level held at "
                       "most {:.1e}; no |p(K) - p(K')|: leave out --bath-levels for the automatic K)",
                       open.levels, open.top_level_population);
  else if (open.levels > 0)
    out += fmt::format(", K = {} lowest levels (highest kept level held at most {:.1e}; |p(K) - p(K')| = {:.1e}{})",
                       open.levels, open.top_level_population, open.truncation_estimate,
                       open.level_cap_hit ? ", level cap reached without meeting the tolerance" : "");
  out += "\n";
  return out;
}

void put_open_system_json(toml::table& j, const OhmicBath& bath, const OpenAnnealResult& open) {
  put_bath_json(j, bath);
  toml::table r;
  put(r, "ground_probability", open.ground_probability);
  put(r, "max_trace_deviation", open.stats.max_trace_deviation);
  put(r, "min_eigenvalue", open.stats.min_eigenvalue);
  if (std::isfinite(open.stats.error_estimate)) put(r, "error_estimate", open.stats.error_estimate);  // absent: not checked
  put(r, "steps", static_cast<long long>(open.stats.steps));
  put(r, "rejected_steps", static_cast<long long>(open.stats.rejected_steps));
  put(r, "eigen_solves", static_cast<long long>(open.stats.eigen_solves));
  put(r, "propagator", open.propagator);
  put(r, "levels", static_cast<long long>(open.levels));
  put(r, "top_level_population", open.top_level_population);
  if (std::isfinite(open.truncation_estimate)) put(r, "truncation_estimate", open.truncation_estimate);  // absent: not checked
  put(r, "level_cap_hit", open.level_cap_hit);
  put(r, "levels_choice", levels_choice(open));
  put(r, "wall_seconds", open.wall_seconds);
  j.insert_or_assign("open_system", std::move(r));
}

void write_open_system_hdf5(Hdf5Output& h5, const std::string& group, const OhmicBath& bath,
                            const OpenAnnealResult& open) {
  write_bath_attributes(h5, group, bath);
  h5.attribute(group, "ground_probability", open.ground_probability);
  h5.attribute(group, "max_trace_deviation", open.stats.max_trace_deviation);
  h5.attribute(group, "min_eigenvalue", open.stats.min_eigenvalue);
  h5.attribute_allowing_inf_nan(group, "error_estimate", open.stats.error_estimate);  // NaN: K not checked
  h5.attribute(group, "steps", static_cast<long long>(open.stats.steps));
  h5.attribute(group, "propagator", open.propagator);
  h5.attribute(group, "levels", static_cast<long long>(open.levels));
  h5.attribute(group, "top_level_population", open.top_level_population);
  h5.attribute_allowing_inf_nan(group, "truncation_estimate", open.truncation_estimate);  // NaN: check not run
  h5.attribute(group, "levels_choice", levels_choice(open));
  h5.write(group + "/final_populations", open.populations, "1");
}


std::string open_durations_text(const OhmicBath& bath, const std::vector<OpenDurationPoint>& rows) {
  std::string out = "with the bath (adiabatic master equation, sigma^z coupling on every qubit, Lamb shift neglected)\n";
  out += fmt::format("bath        {}{}\n", bath.source.empty() ? "" : bath.source + ": ", bath.summary());
  TextTable t({"t_f_ns", "p_closed", "p_bath", "TTS_closed_ns", "TTS_bath_ns", "trace_err", "min_eig", "wall_s"});
  double best_tts = INFINITY, best_t = 0;
  for (const auto& r : rows) {
    t.add({fmt::format("{:.5g}", r.duration_ns), fmt::format("{:.6f}", r.closed_probability),
           fmt::format("{:.6f}", r.open.ground_probability), tts_text(r.closed_tts.tts_ns), tts_text(r.open_tts.tts_ns),
           fmt::format("{:.1e}", r.open.stats.max_trace_deviation), fmt::format("{:.1e}", r.open.stats.min_eigenvalue),
           fmt::format("{:.2f}", r.open.wall_seconds)});
    if (r.open_tts.tts_ns < best_tts) best_tts = r.open_tts.tts_ns, best_t = r.duration_ns;
  }
  out += t.render();
  if (std::isfinite(best_tts))
    out += fmt::format("TTS optimum with the bath (grid only): t_f = {:.5g} ns, TTS = {} ns\n", best_t, tts_text(best_tts));
  else
    out += "TTS with the bath is infinite at every grid duration (p = 0)\n";
  return out;
}

void put_open_durations_json(toml::table& j, const OhmicBath& bath, const std::vector<OpenDurationPoint>& rows) {
  put_bath_json(j, bath);
  toml::array pts;
  for (const auto& r : rows) {
    toml::table e;
    put(e, "duration_ns", r.duration_ns);
    put(e, "closed_ground_probability", r.closed_probability);
    put(e, "ground_probability", r.open.ground_probability);
    put_tts(e, "closed_tts_ns", r.closed_tts.tts_ns);
    put_tts(e, "tts_ns", r.open_tts.tts_ns);
    put(e, "max_trace_deviation", r.open.stats.max_trace_deviation);
    put(e, "min_eigenvalue", r.open.stats.min_eigenvalue);
    if (std::isfinite(r.open.stats.error_estimate)) put(e, "error_estimate", r.open.stats.error_estimate);
    put(e, "steps", static_cast<long long>(r.open.stats.steps));
    put(e, "propagator", r.open.propagator);
    put(e, "levels", static_cast<long long>(r.open.levels));
    put(e, "wall_seconds", r.open.wall_seconds);
    pts.push_back(std::move(e));
  }
  toml::table o;
  put(o, "propagator", rows.empty() ? std::string("ame-full") : rows.front().open.propagator);
  o.insert_or_assign("points", std::move(pts));
  j.insert_or_assign("open_system", std::move(o));
}

}  // namespace gapwise::cli
