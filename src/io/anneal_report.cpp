#include "io/anneal_report.hpp"

#include <sstream>

#include <fmt/format.h>

#include "io/json_run_keys.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"

namespace gapwise {
namespace {

std::vector<TraceObserver::Row> requested_rows_of(const AnnealReport& a) {
  std::vector<TraceObserver::Row> rows;
  for (const auto& row : *a.trace)
    if (row.requested) rows.push_back(row);
  return rows;
}

/// The columns of one observation, in the trace and in the requested observations.
std::vector<std::string> observation_head() { return {"t_ns", "s", "p_ground", "energy_ghz", "norm"}; }
std::vector<std::string> observation_cells(const TraceObserver::Row& row) {
  return {fmt_num(row.t_ns, 8), fmt::format("{:.12g}", row.s), fmt_num(row.ground_probability, 10),
          fmt_num(row.energy_ghz, 10), fmt_num(row.norm, 14)};
}

TextTable outcome_table(const AnnealReport& a) {
  const AnnealResult& r = *a.result;
  const IsingProblem& p = *a.problem;
  TextTable outcomes({"rank", fmt::format("bits q0..q{}", p.qubits - 1), "spins", "energy", "probability", "ground"});
  for (std::size_t k = 0; k < r.top_outcomes.size(); ++k) {
    const auto& oc = r.top_outcomes[k];
    outcomes.add({std::to_string(k + 1), bits_string(oc.state, p.qubits), spins_string(oc.state, p.qubits),
                  fmt_num(oc.energy, 8), fmt_num(oc.probability, 6), oc.in_ground_manifold ? "yes" : ""});
  }
  return outcomes;
}

/// The requested observations on their own (terminal and JSON).
TextTable observation_table(const AnnealReport& a, const std::vector<TraceObserver::Row>& requested_rows) {
  std::vector<std::string> obs_head = observation_head();
  for (int j = 0; j < a.levels; ++j) obs_head.push_back(fmt::format("pop_level{}", j));
  TextTable obs(obs_head);
  for (std::size_t i = 0; i < requested_rows.size(); ++i) {
    std::vector<std::string> cells = observation_cells(requested_rows[i]);
    for (int j = 0; j < a.levels; ++j) cells.push_back(fmt_num(a.level_rows.at(i).levels.populations.at(j), 8));
    obs.add(std::move(cells));
  }
  return obs;
}

}  // namespace

TextTable anneal_trace_table(const AnnealReport& a) {
  std::vector<std::string> trace_head = observation_head();
  if (a.observed) trace_head.push_back("requested");
  TextTable tr(trace_head);
  for (const auto& row : *a.trace) {
    std::vector<std::string> cells = observation_cells(row);
    if (a.observed) cells.push_back(row.requested ? "1" : "0");
    tr.add(std::move(cells));
  }
  return tr;
}

std::string anneal_report_json(const AnnealReport& a) {
  const AnnealResult& r = *a.result;
  const IsingProblem& p = *a.problem;
  const GroundManifold& gm = *a.ground;
  const std::vector<TraceObserver::Row> requested_rows = requested_rows_of(a);
  toml::table j;
  put_input_files(j, a.problem_file, a.schedule_file);
  put(j, "duration_ns", r.duration_ns);
  put(j, "ground_probability", r.ground_probability);
  put_ground_manifold(j, gm);
  put(j, "norm_drift", r.norm_drift);
  put(j, "integrator_error_estimate", r.stats.error_estimate);
  put(j, "accuracy_ok", a.accuracy_ok);
  if (a.delta_p) put(j, "convergence_delta_p", *a.delta_p);
  put_propagation(j, r.propagator, a.tolerance, a.p_only);
  put(j, "propagator_used", r.propagator);
  put(j, "kernels", r.kernels.empty() ? std::string("not used") : r.kernels);
  if (!r.choice.chosen.empty()) {
    toml::table c;
    put(c, "requested", std::string("auto"));
    put(c, "basis", r.choice.basis);
    if (std::isfinite(r.choice.split_seconds)) put(c, "split_seconds_predicted", r.choice.split_seconds);
    if (std::isfinite(r.choice.frame_seconds)) put(c, "frame_seconds_predicted", r.choice.frame_seconds);
    j.insert_or_assign("propagator_choice", std::move(c));
  }
  put(j, "steps", static_cast<long long>(r.stats.steps));
  put(j, "hamiltonian_applications", static_cast<long long>(r.stats.hamiltonian_applications));
  put(j, "error_estimate", r.stats.error_estimate);
  put(j, "wall_seconds", r.wall_seconds);
  if (r.propagator == "frame") {
    put(j, "frame_levels", static_cast<long long>(r.stats.frame_levels));
    put(j, "frame_grid_points", static_cast<long long>(r.stats.frame_grid_points));
    put(j, "frame_reused_points", static_cast<long long>(r.stats.frame_reused_points));
    put(j, "frame_top_level_population", r.stats.frame_top_level_population);
    put(j, "frame_truncation_estimate", r.stats.frame_truncation_estimate);
    put(j, "frame_pieces", static_cast<long long>(r.stats.frame_pieces));
    put(j, "frame_fallback_pieces", static_cast<long long>(r.stats.frame_fallback_pieces));
  }
  toml::array arr;
  for (const auto& oc : r.top_outcomes) {
    toml::table e;
    put(e, "bits", bits_string(oc.state, p.qubits));
    put(e, "spins", spins_string(oc.state, p.qubits));
    put(e, "energy", oc.energy);
    put(e, "probability", oc.probability);
    put(e, "ground", oc.in_ground_manifold);
    arr.push_back(std::move(e));
  }
  j.insert_or_assign("outcomes", std::move(arr));
  if (a.observed) {
    toml::array oa;
    for (std::size_t i = 0; i < requested_rows.size(); ++i) {
      const auto& row = requested_rows[i];
      toml::table e;
      put(e, "t_ns", row.t_ns);
      put(e, "s", row.s);
      put(e, "ground_probability", row.ground_probability);
      put(e, "energy_ghz", row.energy_ghz);
      put(e, "norm", row.norm);
      if (a.levels > 0) {
        toml::array pe, pp;
        for (int k = 0; k < a.levels; ++k) {
          pe.push_back(a.level_rows.at(i).levels.energies_ghz.at(k));
          pp.push_back(a.level_rows.at(i).levels.populations.at(k));
        }
        e.insert_or_assign("level_energies_ghz", std::move(pe));
        e.insert_or_assign("level_populations", std::move(pp));
      }
      oa.push_back(std::move(e));
    }
    j.insert_or_assign("observations", std::move(oa));
  }
  for (auto&& [key, value] : a.open_json) j.insert_or_assign(key, value);
  return to_json(j) + "\n";
}

std::string anneal_report_text(const AnnealReport& a) {
  const AnnealResult& r = *a.result;
  const IsingProblem& p = *a.problem;
  const GroundManifold& gm = *a.ground;
  const Schedule& sch = *a.schedule;
  const AnnealPath& path = *a.path;
  const std::vector<TraceObserver::Row> requested_rows = requested_rows_of(a);
  const TextTable outcomes = outcome_table(a), obs = observation_table(a, requested_rows);
  std::ostringstream os;
  os << fmt::format("problem      {}: {} qubits, {} couplings; ground energy {:.10g}, degeneracy {}\n", terminal_text(a.problem_file),
                           p.qubits, p.couplings.size(), gm.energy, gm.degeneracy());
  os << fmt::format("schedule     {}: {}\n", a.schedule_file, sch.scales.describe());
  os << fmt::format("path         {} waypoints, duration {} ns, start: {}\n", path.points().size(),
                           r.duration_ns, sch.start.kind == StartKind::Ground ? "ground state of H(s0)" : "classical state");
  os << fmt::format("propagator   {} (tolerance {:.0e}): {} steps, {} H applications, {:.3f} s\n", r.propagator,
                           a.tolerance, r.stats.steps, r.stats.hamiltonian_applications, r.wall_seconds);
  os << fmt::format("kernels      {}\n", r.kernels.empty() ? "not used (no split kernels in this propagator)" : r.kernels);
  if (!r.choice.chosen.empty()) {
    auto secs = [](double x) { return std::isfinite(x) ? fmt::format("{:.3g} s", x) : std::string("not needed"); };
    os << fmt::format("choice       auto chose {} ({}; predicted split-auto {}, frame {})\n", r.choice.chosen,
                      r.choice.basis, secs(r.choice.split_seconds), secs(r.choice.frame_seconds));
  }
  os << fmt::format("\nground-state probability  {:.8f}\n", r.ground_probability);
  if (a.delta_p)
    os << fmt::format("convergence               |dp| = {:.1e} when the tolerance is tightened tenfold{}\n", *a.delta_p,
                             *a.delta_p > a.tolerance ? "  (WARNING: larger than expected)" : "");
  os << fmt::format("norm drift                {:.1e}\n", r.norm_drift);
  // One error estimate per run; what it measures depends on the propagator.
  if (r.propagator == "odeint")
    os << fmt::format("integrator error est.     {:.1e} (sum of the accepted steps' local error estimates of the\n"
                             "                          amplitudes; a bound-like figure, not the error of p itself)\n",
                             r.stats.error_estimate);
  else if (r.propagator == "frame") {
    const PropagationStats& fs = r.stats;
    os << fmt::format("error estimate of p       {:.1e} (per piece: the frame's grid against every other grid point,\n"
                             "                          plus the change of p when K drops to 3K/4, plus the start's\n"
                             "                          weight outside the kept levels; summed over pieces)\n",
                             fs.error_estimate);
    os << fmt::format("frame                     K = {} levels, {} grid points, {} eigen-solves ({} warm started),\n"
                      "                          {} points reused from earlier pieces or runs\n",
                      fs.frame_levels, fs.frame_grid_points, fs.frame_eigen_solves, fs.frame_warm_solves,
                      fs.frame_reused_points);
    os << fmt::format("leakage                   largest population of the highest kept level {:.1e}; change of p\n"
                             "                          with K {:.1e}\n",
                             fs.frame_top_level_population, fs.frame_truncation_estimate);
    os << fmt::format("pieces                    {} in the frame, {} by full propagation (split4){}\n", fs.frame_pieces,
                             fs.frame_fallback_pieces,
                             fs.frame_fallback_pieces > 0 && fs.frame_pieces > 0 ? "  (hybrid: the frame could not hold those to the tolerance)"
                             : fs.frame_fallback_pieces > 0 ? "  (FALLBACK: the frame could not hold the run to the tolerance)"
                                                            : "");
  } else
    os << fmt::format("error estimate of p       {:.1e} (the accepted step grid against a coarser one with 4/5\n"
                             "                          or 1/2 of its steps, Richardson-scaled; {})\n",
                             r.stats.error_estimate,
                             a.p_only ? "--p-only: other outcomes not controlled"
                                      : "any other set of outcomes\n                          within 100x the tolerance");
  if (!a.accuracy_ok) os << "accuracy                  NOT within the tolerance (see warnings)\n";
  os << a.open_text;
  os << "\n";
  os << "most probable outcomes" << (a.with_bath ? " (closed system)" : "") << "\n" << outcomes.render();
  if (!requested_rows.empty()) {
    os << "\nobservations at the requested s"
              << (a.levels > 0 ? fmt::format(" (pop_levelJ: weight on the J-th lowest distinct level of H(s), {})",
                                             describe_sector(a.sector))
                               : std::string())
              << "\n"
              << obs.render();
  }
  return os.str();
}

void write_anneal_result(const std::string& path, const AnnealReport& a, const std::string& command_line) {
  const AnnealResult& r = *a.result;
  const GroundManifold& gm = *a.ground;
  const std::vector<TraceObserver::Row> requested_rows = requested_rows_of(a);
  Hdf5Output h5(path, {"gapwise-anneal", 1});
  write_provenance(h5, command_line, {a.problem_file, a.schedule_file});
  h5.attribute("/anneal", "duration_ns", r.duration_ns);
  h5.attribute("/anneal", "ground_probability", r.ground_probability);
  h5.attribute("/anneal", "norm_drift", r.norm_drift);
  h5.attribute("/anneal", "integrator_error_estimate", r.stats.error_estimate);
  h5.attribute("/anneal", "accuracy_ok", static_cast<long long>(a.accuracy_ok));
  h5.attribute("/anneal", "tolerance", a.tolerance);
  h5.attribute("/anneal", "p_only", static_cast<long long>(a.p_only));
  h5.attribute("/anneal", "propagator", r.propagator);
  h5.attribute("/anneal", "propagator_used", r.propagator);
  h5.attribute("/anneal", "kernels", r.kernels.empty() ? std::string("not used") : r.kernels);
  if (!r.choice.chosen.empty()) {
    h5.attribute("/anneal", "propagator_choice_basis", r.choice.basis);
    h5.attribute_allowing_inf_nan("/anneal", "split_seconds_predicted", r.choice.split_seconds);
    h5.attribute_allowing_inf_nan("/anneal", "frame_seconds_predicted", r.choice.frame_seconds);
  }
  h5.attribute("/anneal", "steps", static_cast<long long>(r.stats.steps));
  h5.attribute("/anneal", "error_estimate", r.stats.error_estimate);
  if (r.propagator == "frame") {
    h5.attribute("/anneal", "frame_levels", static_cast<long long>(r.stats.frame_levels));
    h5.attribute("/anneal", "frame_grid_points", static_cast<long long>(r.stats.frame_grid_points));
    h5.attribute("/anneal", "frame_reused_points", static_cast<long long>(r.stats.frame_reused_points));
    h5.attribute("/anneal", "frame_top_level_population", r.stats.frame_top_level_population);
    h5.attribute("/anneal", "frame_truncation_estimate", r.stats.frame_truncation_estimate);
    h5.attribute("/anneal", "frame_pieces", static_cast<long long>(r.stats.frame_pieces));
    h5.attribute("/anneal", "frame_fallback_pieces", static_cast<long long>(r.stats.frame_fallback_pieces));
  }
  if (a.delta_p) h5.attribute("/anneal", "convergence_delta_p", *a.delta_p);
  h5.attribute("/anneal", "ground_energy", gm.energy);
  std::vector<long long> gstates(gm.states.begin(), gm.states.end());
  h5.write("/anneal/ground_states", gstates, DataMeaning("1").described("basis index (bit i = qubit i)"));
  std::vector<double> t, s, pg, e, nrm;
  for (const auto& row : *a.trace) {
    t.push_back(row.t_ns); s.push_back(row.s); pg.push_back(row.ground_probability);
    e.push_back(row.energy_ghz); nrm.push_back(row.norm);
  }
  h5.write("/anneal/trace/t", t, "ns");
  h5.write("/anneal/trace/s", s, "1");
  h5.write("/anneal/trace/ground_probability", pg, "1");
  h5.write("/anneal/trace/energy", e, "GHz");
  h5.write("/anneal/trace/norm", nrm, "1");
  if (a.observed) {
    std::vector<long long> req;
    for (const auto& row : *a.trace) req.push_back(row.requested ? 1 : 0);
    h5.write("/anneal/trace/requested", req, DataMeaning("1").flagged({0, 1}, "sampled observe_s_value"));
    std::vector<double> ot, os, op, oe, on, le, lp;
    for (std::size_t i = 0; i < requested_rows.size(); ++i) {
      const auto& row = requested_rows[i];
      ot.push_back(row.t_ns); os.push_back(row.s); op.push_back(row.ground_probability);
      oe.push_back(row.energy_ghz); on.push_back(row.norm);
      for (int k = 0; k < a.levels; ++k) {
        le.push_back(a.level_rows.at(i).levels.energies_ghz.at(k));
        lp.push_back(a.level_rows.at(i).levels.populations.at(k));
      }
    }
    h5.write("/anneal/observations/t", ot, "ns");
    h5.write("/anneal/observations/s", os, "1");
    h5.write("/anneal/observations/ground_probability", op, "1");
    h5.write("/anneal/observations/energy", oe, "GHz");
    h5.write("/anneal/observations/norm", on, "1");
    if (a.levels > 0) {
      const std::size_t m = requested_rows.size(), kk = static_cast<std::size_t>(a.levels);
      h5.write_matrix("/anneal/observations/level_energies", le, m, kk, "GHz", {"/anneal/observations/s", h5.level_axis("/anneal/observations", kk)});
      h5.write_matrix("/anneal/observations/level_populations", lp, m, kk, "1", {"/anneal/observations/s", h5.level_axis("/anneal/observations", kk)});
      h5.attribute("/anneal/observations/level_populations", "sector", sector_name(a.sector));
    }
  }
  const auto probs = probabilities(r.final_state);
  h5.write("/anneal/final_probabilities", probs, DataMeaning("1").described("probability of basis state b at the end (index b, bit i = qubit i)"));
  if (a.write_open_hdf5) a.write_open_hdf5(h5);
  h5.commit();
}

}  // namespace gapwise
