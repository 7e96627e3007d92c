#include "io/gap_report.hpp"

#include <sstream>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/json_run_keys.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"

namespace gapwise {
namespace {

std::string states_text(const FinalLevel& fl, int qubits) {
  std::string s;
  for (std::size_t i = 0; i < fl.states.size() && i < 4; ++i)
    s += fmt::format("{}{} ({:.3f})", i ? ", " : "", bits_string(fl.states[i], qubits), fl.weights[i]);
  if (fl.states.size() > 4) s += ", ...";
  return s;
}

}  // namespace

std::string gap_plan_text(const IsingProblem& p, const GapSearchPlan& plan) {
  return fmt::format("plan         {} qubits, {} (dimension {}), {} levels, {} solver; memory about {} "
                     "(available {})\n",
                     p.qubits, describe_sector(plan.sector), plan.dimension, plan.levels,
                     eigen_method_name(plan.method), human_bytes(plan.memory_bytes), human_bytes(available_bytes()));
}

TextTable gap_curve_table(const MinimumGapReport& r) {
  const int k = r.levels;
  std::vector<std::string> head{"s", "a_ghz", "b_ghz"};
  for (int j = 0; j < k; ++j) head.push_back(fmt::format("e{}_ghz", j));
  head.insert(head.end(), {"gap_Eg_E0_ghz", "gap_E1_E0_ghz", "m_g0_ghz", "m_10_ghz", "error_bound_ghz", "origin"});
  const bool other = !r.curve.empty() && !r.curve.front().other_energies_ghz.empty();
  if (other)
    for (int j = 0; j < k; ++j) head.push_back(fmt::format("other_e{}_ghz", j));
  TextTable curve(head);
  static const char* origins[] = {"grid", "subdivision", "refinement"};
  for (const auto& pt : r.curve) {
    std::vector<std::string> row{fmt::format("{:.12g}", pt.s), fmt_num(pt.a_ghz, 12), fmt_num(pt.b_ghz, 12)};
    for (double e : pt.energies_ghz) row.push_back(fmt::format("{:.15g}", e));
    row.insert(row.end(), {fmt::format("{:.15g}", pt.gap_ghz), fmt::format("{:.15g}", pt.gap_10_ghz),
                           fmt::format("{:.12g}", pt.matrix_element_ghz), fmt::format("{:.12g}", pt.matrix_element_10_ghz),
                           fmt::format("{:.3g}", pt.error_bound_ghz), origins[pt.origin]});
    for (double e : pt.other_energies_ghz) row.push_back(fmt::format("{:.15g}", e));
    curve.add(std::move(row));
  }
  return curve;
}

std::string gap_report_json(const GapReportInputs& in, const MinimumGapReport& r) {
  const IsingProblem& p = *in.problem;
  const int k = r.levels, g = r.ground_degeneracy;
  toml::table j;
  put_input_files(j, in.problem_file, in.schedule_file.empty() ? std::string("(default: linear, 5 GHz)") : in.schedule_file);
  put(j, "qubits", static_cast<long long>(p.qubits));
  put(j, "sector", sector_name(r.sector));
  put(j, "ground_degeneracy_in_sector", static_cast<long long>(g));
  put(j, "classical_ground_states", static_cast<long long>(r.classical_ground_states));
  put(j, "levels", static_cast<long long>(k));
  put(j, "solver", eigen_method_name(r.method));
  put(j, "definition", r.definition);
  put(j, "s_star", r.s_star);
  put(j, "s_star_uncertainty", r.s_star_uncertainty);
  put(j, "gap_ghz", r.gap_ghz);
  put(j, "gap_uncertainty_ghz", r.gap_uncertainty_ghz);
  put(j, "at_end_point", r.at_end_point);
  put(j, "matrix_element_ghz", r.matrix_element_ghz);
  put(j, "adiabatic_time_ns", r.adiabatic_time_ns);
  put(j, "adiabatic_time_at_s", r.adiabatic_time_s);
  put(j, "adiabatic_time_crude_ns", r.adiabatic_time_crude_ns);
  put(j, "gap_e1_e0_at_end_ghz", r.gap_10_end_ghz);
  put(j, "points", static_cast<long long>(r.curve.size()));
  put(j, "wall_seconds", r.wall_seconds);
  toml::array flags;
  for (const auto& f : r.flags) flags.push_back(f);
  j.insert_or_assign("notes", std::move(flags));
  return to_json(j) + "\n";
}

std::string gap_report_text(const GapReportInputs& in, const MinimumGapReport& r) {
  const IsingProblem& p = *in.problem;
  const int k = r.levels, g = r.ground_degeneracy;
  std::ostringstream os;
  std::size_t by_origin[3] = {0, 0, 0};
  for (const auto& pt : r.curve) ++by_origin[pt.origin];
  os << fmt::format("problem      {}: {} qubits, {} couplings, {}\n", terminal_text(in.problem_file), p.qubits, p.couplings.size(),
                           p.has_fields() ? "with fields" : "no fields (global spin flip is a symmetry)");
  os << fmt::format("scales       {}{}, s from {} to {}\n", in.scales->describe(),
                           in.schedule_file.empty() ? " (default; give a schedule file for others)" : "", r.s_first,
                           r.s_last);
  os << fmt::format("sector       {}{}\n", describe_sector(r.sector),
                           r.sector == SpinFlipSector::Even ? ": the anneal starts there and never leaves it" : "");
  os << fmt::format("ground       {} classical ground state(s); g = {} in the sector\n",
                           r.classical_ground_states, g);
  os << fmt::format("scan         {} points ({} grid, {} subdivision, {} refinement), {} levels, {}, {:.2f} s{}\n",
                           r.curve.size(), by_origin[0], by_origin[1], by_origin[2], k, eigen_method_name(r.method),
                           r.wall_seconds, r.resumed_points ? fmt::format(" ({} resumed)", r.resumed_points) : "");
  os << fmt::format("\nminimum gap  Delta_min = {:.10g} +- {:.2g} GHz at s* = {:.9f} +- {:.2g}{}\n",
                           r.gap_ghz, r.gap_uncertainty_ghz, r.s_star, r.s_star_uncertainty,
                           r.at_end_point ? "  (end point)" : "");
  os << fmt::format("  defined as {}\n", r.definition);
  os << fmt::format("  |<{}|dH/ds|0>| at s* = {:.6g} GHz\n", g, r.matrix_element_ghz);
  os << fmt::format("adiabatic    t_ad = max_s |<{0}|dH/ds|0>| / (2 pi Delta(s)^2) = {1:.4g} ns (largest at s = {2:.4f})\n"
                           "             cruder max|M| / (2 pi Delta_min^2) = {3:.4g} ns. For s = t/t_f the anneal\n"
                           "             is adiabatic when t_f >> t_ad (see the method notes for the source).\n",
                           g, r.adiabatic_time_ns, r.adiabatic_time_s, r.adiabatic_time_crude_ns);
  if (g >= 2) {
    os << fmt::format("E_1 - E_0    (not the governing gap) {:.3g} GHz at s = {}: closes because the ground "
                             "manifold is degenerate\n",
                             r.gap_10_end_ghz, r.s_last);
    if (r.gap_10_interior_minimum)
      os << fmt::format("             smallest interior minimum {:.6g} GHz near s = {:.6f} (grid value)\n",
                               r.gap_10_interior_minimum->gap_ghz, r.gap_10_interior_minimum->s);
  }
  if (r.minima.size() > 1) {
    os << "local minima of the gap along s\n";
    TextTable mt({"s", "+-", "gap_ghz", "+-", "where"});
    for (const auto& m : r.minima)
      mt.add({fmt::format("{:.9f}", m.s), fmt::format("{:.2g}", m.s_uncertainty), fmt::format("{:.10g}", m.gap_ghz),
              fmt::format("{:.2g}", m.gap_uncertainty_ghz), m.at_end_point ? "end point" : "interior"});
    os << mt.render();
  }
  os << fmt::format("\nlevels at s = {} (bits q0..q{}, weight in the eigenvector)\n", r.s_last, p.qubits - 1);
  TextTable ft({"level", "energy_ghz", "problem_energy", "ground", "dominant states"});
  for (const auto& fl : r.final_levels)
    ft.add({std::to_string(fl.level), fmt::format("{:.9g}", fl.energy_ghz), fmt_num(fl.problem_energy, 10),
            fl.in_ground_manifold ? "yes" : "", states_text(fl, p.qubits)});
  os << ft.render();
  if (!r.flags.empty()) {
    os << "\nnotes\n";
    for (const auto& f : r.flags) os << "  - " << f << "\n";
  }
  return os.str();
}

}  // namespace gapwise
