#include "io/duration_study_file.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <set>

#include <fmt/format.h>

#include "io/bath_attributes.hpp"
#include "io/infinite_tts.hpp"
#include "io/hdf5_output.hpp"

namespace gapwise {

const char* needed_status_name(NeededStatus s) {
  switch (s) {
    case NeededStatus::Reached: return "reached";
    case NeededStatus::ReachedAtShortest: return "reached at the shortest duration";
    case NeededStatus::NotReached: return "not reached";
  }
  return "?";
}

namespace {

void write_bracket(Hdf5Output& h5, const std::string& g, const CrossingBracket& b) {
  h5.attribute(g, "lower_ns", b.lower_ns);
  h5.attribute(g, "upper_ns", b.upper_ns);
  h5.attribute(g, "p_lower", b.p_lower);
  h5.attribute(g, "p_upper", b.p_upper);
  h5.attribute(g, "bisection_rounds", static_cast<long long>(b.rounds));
  h5.attribute(g, "oscillation_inside", static_cast<long long>(b.oscillation_inside));
}

double clamp01(double p) { return std::clamp(p, 0.0, 1.0); }

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The open-system point at duration d (nullptr: a bisection probe, not run with the bath).
const OpenDurationPoint* open_at(const DurationStudyInputs& in, double d) {
  if (!in.open_rows) return nullptr;
  for (const auto& r : *in.open_rows)
    if (r.duration_ns == d) return &r;
  return nullptr;
}

// /durations/open_system: one entry per grid duration, each dataset with the
// duration axis as its dimension scale; and p_bath, tts_bath_ns in /points.
void write_open_durations(Hdf5Output& h5, const std::string& root, const DurationStudyInputs& in,
                          const std::map<double, DurationPoint>& known) {
  const OhmicBath& bath = *in.bath;
  const auto& rows = *in.open_rows;
  const std::string g = root + "/open_system";
  h5.group(g);
  write_bath_attributes(h5, g, bath);
  h5.attribute(g, "method", rows.empty() ? std::string("none") : rows.front().open.propagator);
  const bool fixed = !rows.empty() && rows.front().open.levels_fixed;
  const bool truncated = !rows.empty() && rows.front().open.levels > 0;
  h5.attribute(g, "levels_choice", std::string(!truncated ? "all levels" : fixed ? "fixed, not checked" : "automatic"));
  h5.attribute(g, "lamb_shift", std::string("neglected"));
  std::vector<double> t, pc, pb, tc, tb, trace, mineig, est, top, wall;
  std::vector<long long> levels, steps;
  for (const auto& r : rows) {
    t.push_back(r.duration_ns);
    pc.push_back(r.closed_probability);
    pb.push_back(r.open.ground_probability);
    tc.push_back(stored_tts(r.closed_tts.tts_ns));
    tb.push_back(stored_tts(r.open_tts.tts_ns));
    trace.push_back(r.open.stats.max_trace_deviation);
    mineig.push_back(r.open.stats.min_eigenvalue);
    est.push_back(r.open.levels > 0 && std::isfinite(r.open.truncation_estimate) ? r.open.truncation_estimate : kNaN);
    top.push_back(r.open.levels > 0 ? r.open.top_level_population : kNaN);
    levels.push_back(r.open.levels);
    steps.push_back(r.open.stats.steps);
    wall.push_back(r.open.wall_seconds);
  }
  const std::string axis = g + "/duration_ns";
  h5.write(axis, t, DataMeaning("ns").described("grid durations run with the bath"));
  auto put = [&](const std::string& name, const std::vector<double>& v, const DataMeaning& m) {
    h5.write(g + "/" + name, v, m);
    h5.attach_scales(g + "/" + name, {axis});
  };
  auto put_int = [&](const std::string& name, const std::vector<long long>& v, const DataMeaning& m) {
    h5.write(g + "/" + name, v, m);
    h5.attach_scales(g + "/" + name, {axis});
  };
  put("ground_probability", pb, DataMeaning("1").described("p with the bath (adiabatic master equation)"));
  put("closed_ground_probability", pc, DataMeaning("1").described("p of the closed system, same duration"));
  put("tts_ns", tb, tts_meaning("ns").described("time to solution with the bath"));
  put("closed_tts_ns", tc, tts_meaning("ns").described("time to solution of the closed system"));
  put("max_trace_deviation", trace, DataMeaning("1").described("largest |Tr rho - 1| along the run"));
  put("min_eigenvalue", mineig, DataMeaning("1").described("smallest eigenvalue of rho (positivity)"));
  put("truncation_estimate", est,
      DataMeaning("1").described("|p(K) - p(K')| of the automatic choice of K")
          .nan_means("not applicable: all levels kept (ame-full), or K fixed by --bath-levels and not checked"));
  put("top_level_population", top,
      DataMeaning("1").described("largest population of the highest kept level along the run")
          .nan_means("not applicable: all levels kept (ame-full)"));
  put_int("levels", levels, DataMeaning("1").described("K kept levels; 0 = all levels (ame-full)"));
  put_int("steps", steps, DataMeaning("1").described("accepted steps (grid intervals for ame-truncated)"));
  put("wall_seconds", wall, "s");

  // Beside every known point: p and TTS with the bath, NaN at bisection probes.
  std::vector<double> pp, pt;
  for (const auto& [d, pt_] : known) {
    const OpenDurationPoint* r = open_at(in, d);
    pp.push_back(r ? r->open.ground_probability : kNaN);
    pt.push_back(r ? stored_tts(r->open_tts.tts_ns) : kNaN);
  }
  const std::string why = "bisection probe: only grid durations are run with the bath";
  h5.write(root + "/points/p_bath", pp, not_applicable("1", why));
  h5.write(root + "/points/tts_bath_ns", pt, tts_meaning("ns").nan_means(why));
}

}  // namespace

void write_duration_study_hdf5(const std::string& path, const DurationStudyInputs& in,
                               const std::map<double, DurationPoint>& known, const DurationStudy* finished) {
  Hdf5Output h5(path, {"gapwise-durations", 1});
  write_provenance(h5, in.command_line, {in.problem_file, in.schedule_file});
  const std::string root = "/durations";
  h5.group(root);
  h5.attribute(root, "complete", static_cast<long long>(finished != nullptr));
  h5.attribute(root, "target_probability", in.target);
  h5.attribute(root, "propagator", in.propagator);
  h5.attribute(root, "tolerance", in.tolerance);
  h5.attribute(root, "p_only", static_cast<long long>(in.p_only));
  h5.attribute(root, "grid_points", static_cast<long long>(in.grid_ns.size()));
  if (in.setup) {
    h5.attribute(root, "qubits", static_cast<long long>(in.setup->problem.qubits));
    h5.attribute(root, "ground_energy", in.setup->ground.energy);
    h5.attribute(root, "ground_degeneracy", static_cast<long long>(in.setup->ground.degeneracy()));
    std::vector<long long> gs(in.setup->ground.states.begin(), in.setup->ground.states.end());
    h5.write(root + "/ground_states", gs, DataMeaning("1").described("basis index (bit i = qubit i)"));
    std::vector<double> ps, pt;
    for (const auto& w : in.setup->schedule.shape.points()) { pt.push_back(w.t_ns); ps.push_back(w.s); }
    h5.write(root + "/path_shape/t", pt,
             in.setup->schedule.time_in_ns ? DataMeaning("ns").described("stretched to each duration")
                                           : DataMeaning("1").described("fraction of t_f"));
    h5.write(root + "/path_shape/s", ps, "1");
  }
  h5.write(root + "/grid_ns", in.grid_ns, "ns");

  // Every known point (grid and bisection probes), ascending.
  const std::set<double> grid(in.grid_ns.begin(), in.grid_ns.end());
  std::vector<double> t, p, tts, reps, drift, wall, lz, ad;
  std::vector<long long> on_grid, kind, steps;
  std::vector<std::string> used;
  for (const auto& [d, pt] : known) {
    used.push_back(pt.propagator_used.empty() ? "unknown" : pt.propagator_used);
    const auto x = time_to_solution(d, clamp01(pt.ground_probability), in.target);
    t.push_back(d);
    p.push_back(pt.ground_probability);
    tts.push_back(stored_tts(x.tts_ns));
    reps.push_back(stored_tts(x.repetitions));
    kind.push_back(static_cast<long long>(x.kind));
    on_grid.push_back(grid.count(d) ? 1 : 0);
    drift.push_back(pt.norm_drift);
    steps.push_back(pt.steps);
    wall.push_back(pt.wall_seconds);
    if (in.predictions) {
      lz.push_back(in.predictions->lz.applicable ? in.predictions->lz.p_at(d) : kNaN);
      ad.push_back(in.predictions->adiabatic.applicable ? in.predictions->adiabatic.p_at(d) : kNaN);
    }
  }
  const std::string pts = root + "/points";
  h5.write(pts + "/duration_ns", t, "ns");
  h5.write(pts + "/ground_probability", p, "1");
  h5.write(pts + "/tts_ns", tts, tts_meaning("ns"));
  h5.write(pts + "/repetitions", reps, tts_meaning("1"));
  h5.write(pts + "/tts_case", kind,
           DataMeaning("1").flagged({0, 1, 2}, "never repeated single_run")
               .described("0 never (p = 0), 1 repeated (0 < p < p*), 2 single run (p >= p*)"));
  h5.write(pts + "/on_grid", on_grid, DataMeaning("1").flagged({0, 1}, "bisection_probe grid_point"));
  h5.write(pts + "/norm_drift", drift, "1");
  h5.write(pts + "/steps", steps, DataMeaning("1").described("accepted propagator steps"));
  h5.write(pts + "/wall_seconds", wall, "s");
  h5.write_strings(pts + "/propagator_used", used,
                   "the propagator that ran each anneal (with --propagator auto: split-auto or frame, chosen by cost)");
  if (in.predictions) {
    h5.write(pts + "/p_landau_zener", lz, not_applicable("1", "see /durations/predictions/landau_zener@why_not"));
    h5.write(pts + "/p_adiabatic", ad, not_applicable("1", "see /durations/predictions/adiabatic@why_not"));
  }

  if (in.bath && in.open_rows) write_open_durations(h5, root, in, known);

  if (finished) {
    const std::string opt = root + "/tts_optimum";
    h5.group(opt);
    h5.attribute(opt, "duration_ns", finished->optimum.duration_ns);
    h5.attribute_allowing_inf_nan(opt, "tts_ns", stored_tts(finished->optimum.tts_ns));
    h5.attribute(opt, "at_range_edge", static_cast<long long>(finished->optimum.at_range_edge));
    h5.attribute(opt, "lower_ns", finished->optimum.lower_ns);
    h5.attribute(opt, "upper_ns", finished->optimum.upper_ns);
    const TtsOptimum& o = finished->optimum;
    h5.attribute(opt, "near_fraction", o.near_fraction);
    h5.attribute(opt, "near_from_ns", o.near_from_ns);
    h5.attribute(opt, "near_to_ns", o.near_to_ns);
    h5.attribute(opt, "near_count", static_cast<long long>(o.near_count));
    h5.attribute(opt, "near_contiguous", static_cast<long long>(o.near_contiguous));
    h5.attribute_allowing_inf_nan(opt, "random_guess_probability", o.random_guess_probability);  // NaN: not known
    h5.attribute(opt, "random_guess_limited", static_cast<long long>(o.random_guess_limited));
    if (o.random_guess_limited) h5.attribute(opt, "random_guess_note", std::string(kRandomGuessLimitText));
    h5.attribute(opt, "has_local_optimum", static_cast<long long>(o.local.has_value()));
    if (o.local) {
      h5.attribute(opt, "local_duration_ns", o.local->duration_ns);
      h5.attribute_allowing_inf_nan(opt, "local_tts_ns", stored_tts(o.local->tts_ns));
      h5.attribute(opt, "local_lower_ns", o.local->lower_ns);
      h5.attribute(opt, "local_upper_ns", o.local->upper_ns);
    }
    h5.attribute(opt, "grid_extended_below", static_cast<long long>(finished->extended_below));
    h5.attribute(opt, "grid_extended_above", static_cast<long long>(finished->extended_above));
    h5.attribute(opt, "extension_stop", finished->extension_stop);
    if (finished->needed) {
      const auto& dn = *finished->needed;
      const std::string g = root + "/duration_needed";
      h5.group(g);
      h5.attribute(g, "status", std::string(needed_status_name(dn.status)));
      h5.attribute(g, "lost_at_longest", static_cast<long long>(dn.lost_at_longest));
      write_bracket(h5, g + "/first_crossing", dn.first);
      if (dn.stays_reached) write_bracket(h5, g + "/stays_reached", *dn.stays_reached);
      // Stretches of durations over which p decreases: one entry per stretch
      // (the columns have different units, so one dataset each).
      const std::string ds = g + "/decreasing_stretches";
      std::vector<double> from, to, p_from, p_to;
      for (const auto& s : dn.decreasing) {
        from.push_back(s.from_ns); to.push_back(s.to_ns); p_from.push_back(s.p_from); p_to.push_back(s.p_to);
      }
      h5.write(ds + "/from_ns", from, "ns");
      h5.write(ds + "/to_ns", to, "ns");
      h5.write(ds + "/p_from", p_from, "1");
      h5.write(ds + "/p_to", p_to, "1");
    }
  }

  if (in.predictions) {
    const auto& pr = *in.predictions;
    const std::string g = root + "/predictions";
    h5.group(g);
    PredictionVerdicts verdicts;
    if (finished) verdicts = judge_predictions(pr, known, *finished, in.agreement_factor, in.agreement_floor);
    auto write_verdict = [&](const std::string& grp, const std::optional<PredictionVerdict>& v) {
      if (!v) return;
      std::vector<double> from, to;
      for (const auto& r : v->ranges) { from.push_back(r.from_ns); to.push_back(r.to_ns); }
      h5.write(grp + "/agreement_from_ns", from,
               DataMeaning("ns").described("ranges of simulated durations where 1 - p agrees within the factor"));
      h5.write(grp + "/agreement_to_ns", to, "ns");
      h5.attribute_allowing_inf_nan(grp, "duration_ratio", v->duration_ratio);  // NaN: either duration unknown
      h5.attribute(grp, "duration_agrees", static_cast<long long>(v->duration_agrees));
    };
    h5.attribute(g, "agreement_factor", in.agreement_factor);
    h5.attribute(g, "agreement_floor", in.agreement_floor);
    h5.attribute(g, "gap_ghz", pr.gap_ghz);
    h5.attribute(g, "gap_uncertainty_ghz", pr.gap_uncertainty_ghz);
    h5.attribute(g, "s_star", pr.s_star);
    h5.attribute(g, "s_star_uncertainty", pr.s_star_uncertainty);
    h5.attribute(g, "gap_definition", pr.gap_definition);
    h5.attribute(g, "sector", pr.sector);
    h5.attribute(g, "gap_at_end_point", static_cast<long long>(pr.gap_at_end_point));
    h5.write(g + "/gap_curve/s", pr.curve_s, "1");
    h5.write(g + "/gap_curve/gap", pr.curve_gap_ghz, "GHz");
    h5.write(g + "/gap_curve/matrix_element", pr.curve_matrix_element_ghz, DataMeaning("GHz").described("|<g|dH/ds|0>|"));
    h5.write(g + "/gap_minima/s", pr.minima_s, "1");
    h5.write(g + "/gap_minima/gap", pr.minima_gap_ghz, "GHz");
    h5.write_strings(g + "/notes", pr.notes, "caveats of the predictions");
    const std::string l = g + "/landau_zener";
    h5.group(l);
    h5.attribute(l, "applicable", static_cast<long long>(pr.lz.applicable));
    if (std::isfinite(pr.lz.pause_s)) {
      h5.attribute(l, "pause_s", pr.lz.pause_s);
      h5.attribute(l, "pause_distance_widths", pr.lz.pause_distance_widths);
    }
    if (!pr.lz.applicable) h5.attribute(l, "why_not", pr.lz.why_not);
    else {
      h5.attribute(l, "gap_ghz", pr.lz.gap_ghz);
      h5.attribute(l, "slope_difference_ghz", pr.lz.slope_difference_ghz);
      h5.attribute(l, "lower_slope_left_ghz", pr.lz.lower_slope_left);
      h5.attribute(l, "lower_slope_right_ghz", pr.lz.lower_slope_right);
      h5.attribute(l, "upper_slope_left_ghz", pr.lz.upper_slope_left);
      h5.attribute(l, "upper_slope_right_ghz", pr.lz.upper_slope_right);
      h5.attribute(l, "fit_half_width_s", pr.lz.fit_half_width_s);
      h5.attribute(l, "fit_deviation", pr.lz.fit_deviation);
      h5.attribute(l, "path_rate", pr.lz.path_rate);
      h5.attribute(l, "duration_for_target_ns", pr.lz.duration_for(in.target));
      write_verdict(l, verdicts.lz);
    }
    const std::string a = g + "/adiabatic";
    h5.group(a);
    h5.attribute(a, "applicable", static_cast<long long>(pr.adiabatic.applicable));
    if (!pr.adiabatic.applicable) h5.attribute(a, "why_not", pr.adiabatic.why_not);
    else {
      h5.attribute(a, "time_ns", pr.adiabatic.time_ns);
      h5.attribute(a, "s_at_max", pr.adiabatic.s_at_max);
      h5.attribute(a, "duration_for_target_ns", pr.adiabatic.duration_for(in.target));
      write_verdict(a, verdicts.adiabatic);
    }
  }
  h5.commit();
}

TextTable duration_points_table(const DurationStudyInputs& in, const std::map<double, DurationPoint>& known) {
  std::vector<std::string> head{"duration_ns", "kind", "ground_probability", "tts_ns", "repetitions", "tts_case",
                                "p_landau_zener", "p_adiabatic", "norm_drift", "steps", "propagator_used",
                                "wall_seconds"};  // wall_seconds last: the one machine-dependent column
  if (in.open_rows) {
    head.push_back("p_bath");
    head.push_back("tts_bath_ns");
  }
  TextTable t(head);
  const std::set<double> grid(in.grid_ns.begin(), in.grid_ns.end());
  auto num = [](double x) { return fmt::format("{:.17g}", x); };
  for (const auto& [d, pt] : known) {
    const auto x = time_to_solution(d, clamp01(pt.ground_probability), in.target);
    const auto* pr = in.predictions;
    std::vector<std::string> row{num(d), grid.count(d) ? "grid" : "probe", num(pt.ground_probability),
           tts_text(x.tts_ns, 17), tts_text(x.repetitions, 17),
           tts_case_name(x.kind), pr && pr->lz.applicable ? num(pr->lz.p_at(d)) : "",
           pr && pr->adiabatic.applicable ? num(pr->adiabatic.p_at(d)) : "", num(pt.norm_drift),
           std::to_string(pt.steps), pt.propagator_used.empty() ? "unknown" : pt.propagator_used,
           fmt::format("{:.3f}", pt.wall_seconds)};
    if (in.open_rows) {
      const OpenDurationPoint* r = open_at(in, d);
      row.push_back(r ? num(r->open.ground_probability) : "");
      row.push_back(r ? tts_text(r->open_tts.tts_ns, 17) : "");
    }
    t.add(row);
  }
  return t;
}

}  // namespace gapwise
