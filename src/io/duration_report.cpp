// The report of `gapwise durations` (duration_report.hpp).
#include "io/duration_report.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include <fmt/format.h>

#include "io/infinite_tts.hpp"
#include "io/json_run_keys.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"

namespace gapwise {
namespace {

std::string p_text(double p) { return fmt::format("{:.6f}", std::clamp(p, 0.0, 1.0)); }
std::string ns_text(double t) { return std::isinf(t) ? "inf" : fmt_num(t, 5); }

}  // namespace

void print_duration_report_json(const DurationReport& r, std::ostream& os) {
  const DurationReportOptions& o = r.o;
  const AnnealSetup& setup = *r.setup;
  const DurationStudy& st = *r.study;
  const AnnealPredictions* predictions = r.predictions;
  const std::vector<double>& grid = r.grid;
  const std::map<double, DurationPoint>& known = *r.known;
  const double p_noise = r.p_noise;
  const auto grid_set = std::set<double>(grid.begin(), grid.end());
  const double best_t = st.optimum.duration_ns;
  PredictionVerdicts verdicts;
  if (predictions) verdicts = judge_predictions(*predictions, known, st, o.agreement, p_noise);
  const TtsOptimum& opt = st.optimum;

  toml::table j;
  put_input_files(j, o.problem, o.schedule);
  put(j, "target", o.target);
  put_propagation(j, o.propagator, o.tolerance, o.p_only);
  put_ground_manifold(j, setup.ground);
  toml::array pts;
  for (const auto& [t, pt] : known) {
    toml::table e;
    const auto tts = time_to_solution(t, std::clamp(pt.ground_probability, 0.0, 1.0), o.target);
    put(e, "duration_ns", t);
    put(e, "grid", grid_set.count(t) > 0);
    put(e, "ground_probability", pt.ground_probability);
    put(e, "tts_case", std::string(tts_case_name(tts.kind)));
    put(e, "propagator_used", pt.propagator_used.empty() ? std::string("unknown") : pt.propagator_used);
    put_tts(e, "tts_ns", tts.tts_ns);
    if (predictions && predictions->lz.applicable) put(e, "p_landau_zener", predictions->lz.p_at(t));
    if (predictions && predictions->adiabatic.applicable) put(e, "p_adiabatic", predictions->adiabatic.p_at(t));
    pts.push_back(std::move(e));
  }
  j.insert_or_assign("points", std::move(pts));
  toml::table best;
  put(best, "duration_ns", best_t);
  put_tts(best, "tts_ns", st.optimum.tts_ns);
  put(best, "at_range_edge", st.optimum.at_range_edge);
  put(best, "lower_ns", st.optimum.lower_ns);
  put(best, "upper_ns", st.optimum.upper_ns);
  put(best, "near_fraction", opt.near_fraction);
  put(best, "near_from_ns", opt.near_from_ns);
  put(best, "near_to_ns", opt.near_to_ns);
  put(best, "near_count", static_cast<long long>(opt.near_count));
  put(best, "near_contiguous", opt.near_contiguous);
  if (std::isfinite(opt.random_guess_probability)) put(best, "random_guess_probability", opt.random_guess_probability);
  put(best, "random_guess_limited", opt.random_guess_limited);
  if (opt.random_guess_limited) put(best, "random_guess_note", std::string(kRandomGuessLimitText));
  if (opt.local) {
    toml::table l;
    put(l, "duration_ns", opt.local->duration_ns);
    put_tts(l, "tts_ns", opt.local->tts_ns);
    put(l, "lower_ns", opt.local->lower_ns);
    put(l, "upper_ns", opt.local->upper_ns);
    best.insert_or_assign("local", std::move(l));
  }
  put(best, "grid_extended_below", static_cast<long long>(st.extended_below));
  put(best, "grid_extended_above", static_cast<long long>(st.extended_above));
  put(best, "extension_stop", st.extension_stop);
  j.insert_or_assign("tts_optimum", std::move(best));
  if (st.needed) {
    toml::table n;
    const auto& dn = *st.needed;
    put(n, "status", std::string(dn.status == NeededStatus::Reached ? "reached"
                                 : dn.status == NeededStatus::ReachedAtShortest ? "reached at the shortest duration"
                                                                                : "not reached"));
    put(n, "lower_ns", dn.first.lower_ns);
    put(n, "upper_ns", dn.first.upper_ns);
    put(n, "p_lower", dn.first.p_lower);
    put(n, "p_upper", dn.first.p_upper);
    if (dn.stays_reached) {
      put(n, "stays_reached_lower_ns", dn.stays_reached->lower_ns);
      put(n, "stays_reached_upper_ns", dn.stays_reached->upper_ns);
    }
    put(n, "lost_at_longest", dn.lost_at_longest);
    put(n, "decreasing_stretches", static_cast<long long>(dn.decreasing.size()));
    j.insert_or_assign("duration_needed", std::move(n));
  }
  if (predictions) {
    toml::table pr;
    put(pr, "gap_ghz", predictions->gap_ghz);
    put(pr, "s_star", predictions->s_star);
    put(pr, "gap_definition", predictions->gap_definition);
    put(pr, "landau_zener_applicable", predictions->lz.applicable);
    if (!predictions->lz.applicable) put(pr, "landau_zener_why_not", predictions->lz.why_not);
    if (std::isfinite(predictions->lz.pause_s)) {
      put(pr, "landau_zener_pause_s", predictions->lz.pause_s);
      put(pr, "landau_zener_pause_distance_widths", predictions->lz.pause_distance_widths);
    }
    put(pr, "agreement_factor", o.agreement);
    auto put_verdict = [&](const std::string& key, const std::optional<PredictionVerdict>& v) {
      if (!v) return;
      toml::array a;
      for (const auto& r : v->ranges) {
        toml::table e;
        put(e, "from_ns", r.from_ns);
        put(e, "to_ns", r.to_ns);
        a.push_back(std::move(e));
      }
      pr.insert_or_assign(key + "_agreement", std::move(a));
      if (std::isfinite(v->duration_ratio)) put(pr, key + "_duration_ratio", v->duration_ratio);
      put(pr, key + "_duration_agrees", v->duration_agrees);
    };
    put_verdict("landau_zener", verdicts.lz);
    put_verdict("adiabatic", verdicts.adiabatic);
    if (predictions->lz.applicable) {
      put(pr, "slope_difference_ghz", predictions->lz.slope_difference_ghz);
      put(pr, "path_rate", predictions->lz.path_rate);
      put(pr, "landau_zener_duration_ns", predictions->lz.duration_for(o.target));
    }
    put(pr, "adiabatic_applicable", predictions->adiabatic.applicable);
    if (predictions->adiabatic.applicable) {
      put(pr, "adiabatic_time_ns", predictions->adiabatic.time_ns);
      put(pr, "adiabatic_duration_ns", predictions->adiabatic.duration_for(o.target));
    }
    j.insert_or_assign("predictions", std::move(pr));
  }
  for (auto&& [key, value] : r.open_json) j.insert_or_assign(key, value);
  os << to_json(j) << "\n";
}

void print_duration_report_text(const DurationReport& r, std::ostream& os) {
  const DurationReportOptions& o = r.o;
  const IsingProblem& problem = r.setup->problem;
  const AnnealSetup& setup = *r.setup;
  const DurationStudy& st = *r.study;
  const AnnealPredictions* predictions = r.predictions;
  const std::vector<double>& grid = r.grid;
  const std::map<double, DurationPoint>& known = *r.known;
  const double p_noise = r.p_noise;
  const Schedule& schedule = *r.schedule;
  const int threads = r.threads;
  const bool grid_chosen = r.grid_chosen;
  const auto grid_set = std::set<double>(grid.begin(), grid.end());
  const double best_t = st.optimum.duration_ns;
  auto reached_text = [&](const CrossingBracket& b) {
    return fmt::format("{} ns (p = {}); bracket {} .. {} ns after {} bisection round(s){}", ns_text(b.upper_ns),
                       p_text(b.p_upper), ns_text(b.lower_ns), ns_text(b.upper_ns), b.rounds,
                       b.oscillation_inside ? ", p crossed the target more than once inside it" : "");
  };
  PredictionVerdicts verdicts;
  if (predictions) verdicts = judge_predictions(*predictions, known, st, o.agreement, p_noise);
  const TtsOptimum& opt = st.optimum;
  const int g = static_cast<int>(setup.ground.degeneracy());
  auto ranges_text = [&](const std::vector<AgreementRange>& r) {
    if (r.empty()) return std::string("at none of the simulated durations");
    std::string s;
    for (const auto& x : r)
      s += (s.empty() ? "" : ", ") +
           (x.from_ns == x.to_ns ? fmt::format("{} ns", ns_text(x.from_ns))
                                 : fmt::format("{} .. {} ns", ns_text(x.from_ns), ns_text(x.to_ns)));
    return "for t_f in " + s;
  };

  os << fmt::format("problem     {}: {} qubits; ground energy {:.10g}, degeneracy {}\n", terminal_text(o.problem),
                           problem.qubits, setup.ground.energy, setup.ground.degeneracy());
  os << fmt::format("schedule    {}: {}; path shape of {} waypoints stretched to each t_f\n", terminal_text(o.schedule),
                           schedule.scales.describe(), schedule.shape.points().size());
  os << fmt::format("numerics    propagator {} (tolerance {:.0e}), {} thread(s); {} duration(s) simulated now, {} reused\n",
                           o.propagator, o.tolerance, threads, r.simulated, known.size() - r.simulated);
  if (o.propagator == "auto") {
    std::map<std::string, int> used;
    for (const auto& [t, pt] : known) ++used[pt.propagator_used.empty() ? "unknown" : pt.propagator_used];
    std::string list;
    for (const auto& [name, count] : used) list += fmt::format("{}{} by {}", list.empty() ? "" : ", ", count, name);
    os << fmt::format("            auto chose per duration by predicted cost: {} (column note: frame)\n", list);
  }
  if (predictions)
    os << fmt::format("gap         Delta_min = {:.6g} GHz at s* = {:.6g}  ({}; {}){}\n", predictions->gap_ghz,
                             predictions->s_star, predictions->gap_definition, predictions->sector,
                             predictions->gap_at_end_point ? "  [at an end of the path's s range]" : "");
  os << fmt::format("target      p* = {}\n", o.target);
  os << fmt::format("durations   {} grid point(s), {} .. {} ns{}\n\n", grid.size(), ns_text(grid.front()),
                           ns_text(grid.back()),
                           grid_chosen ? (predictions ? " (default: around the predicted durations; set --durations to change)"
                                                      : " (default; set --durations to change)")
                                       : "");

  TextTable table({"t_f_ns", "p_ground", "TTS_ns", "runs", "p_LZ", "p_adiab", "note"});
  for (const auto& [t, pt] : known) {
    const double p = std::clamp(pt.ground_probability, 0.0, 1.0);
    const auto tts = time_to_solution(t, p, o.target);
    std::string note = grid_set.count(t) ? "" : "bisection";
    if (pt.propagator_used == "frame" && o.propagator == "auto") note += std::string(note.empty() ? "" : ", ") + "frame";
    if (t == best_t) note += std::string(note.empty() ? "" : ", ") + "TTS optimum";
    if (p >= o.target) note += std::string(note.empty() ? "" : ", ") + ">= p*";
    table.add({fmt_num(t, 6), p_text(p), ns_text(tts.tts_ns),
               tts.kind == TtsCase::Never ? "inf" : fmt::format("{:.3g}", tts.repetitions),
               predictions && predictions->lz.applicable ? p_text(predictions->lz.p_at(t)) : "-",
               predictions && predictions->adiabatic.applicable ? p_text(predictions->adiabatic.p_at(t)) : "-", note});
  }
  os << table.render() << "\n";
  if (r.with_bath) os << r.open_text << "\n";

  os << fmt::format("duration needed for p >= {}\n", o.target);
  if (st.needed) {
    const auto& dn = *st.needed;
    switch (dn.status) {
      case NeededStatus::Reached:
        os << "  simulation           " << reached_text(dn.first) << "\n";
        break;
      case NeededStatus::ReachedAtShortest:
        os << fmt::format("  simulation           at most {} ns: already p = {} at the shortest duration simulated; "
                                 "extend the range downwards for the answer\n",
                                 ns_text(dn.first.upper_ns), p_text(dn.first.p_upper));
        break;
      case NeededStatus::NotReached:
        os << fmt::format("  simulation           more than {} ns: p = {} at the longest duration simulated; "
                                 "extend the range upwards\n",
                                 ns_text(dn.first.lower_ns), p_text(dn.first.p_lower));
        break;
    }
    if (dn.stays_reached)
      os << "  stays reached from   " << reached_text(*dn.stays_reached)
                << "\n                       (p falls below the target again between the first crossing and this one)\n";
    if (dn.lost_at_longest)
      os << "  WARNING              p falls below the target again at the longest duration simulated: "
                   "p(t_f) oscillates around p*\n";
  } else {
    os << "  simulation           (search skipped: --no-search)\n";
  }
  const std::string pad = "                       ";
  if (!std::isfinite(opt.tts_ns))
    os << "  TTS optimum          none: p = 0 at every duration simulated, so the time-to-solution is infinite\n";
  else
    os << fmt::format("  TTS optimum          t_f = {} ns per run, TTS = {} ns{}\n", ns_text(best_t), ns_text(opt.tts_ns),
                             !opt.at_range_edge ? fmt::format("  (sampled; the optimum lies between {} and {} ns)",
                                                              ns_text(opt.lower_ns), ns_text(opt.upper_ns))
                             : opt.index == 0   ? "  [the shortest duration simulated]"
                                                : "  [the longest duration simulated]");
  if (st.extended_below + st.extended_above > 0)
    os << fmt::format("{}the default grid was extended by {} point(s) below and {} above while the optimum sat "
                             "at an end: {}\n",
                             pad, st.extended_below, st.extended_above,
                             st.extension_stop.empty() ? "now bracketed" : "stopped, " + st.extension_stop);
  if (opt.random_guess_limited) {
    os << fmt::format("{}TTS keeps falling toward the shortest durations: p = {} at {} ns, close to the\n"
                             "{}random-guess value g/2^n = {}/2^{} = {:.4g}.\n",
                             pad, p_text(known.begin()->second.ground_probability), ns_text(known.begin()->first), pad, g,
                             problem.qubits, opt.random_guess_probability);
    os << pad << kRandomGuessLimitText << "\n";
    if (opt.local)
      os << fmt::format("{}local optimum: t_f = {} ns, TTS = {} ns (between {} and {} ns)\n", pad,
                               ns_text(opt.local->duration_ns), ns_text(opt.local->tts_ns), ns_text(opt.local->lower_ns),
                               ns_text(opt.local->upper_ns));
    else
      os << pad << "no interior local optimum on the grid: TTS rises all the way from the shortest duration\n";
  } else if (opt.at_range_edge && std::isfinite(opt.tts_ns)) {
    os << fmt::format("{}the optimum may lie beyond this end of the range: {}\n", pad,
                             grid_chosen ? "the grid could not be extended further (" + st.extension_stop + ")"
                                         : std::string("widen --durations, or leave it out for a grid that is "
                                                       "extended until the optimum is bracketed"));
    if (opt.local)
      os << fmt::format("{}local optimum inside the range: t_f = {} ns, TTS = {} ns\n", pad,
                               ns_text(opt.local->duration_ns), ns_text(opt.local->tts_ns));
  }
  if (std::isfinite(opt.tts_ns))
    os << fmt::format("{}within {:g} % of the best TTS: t_f = {} .. {} ns ({} of {} grid durations{}){}\n", pad,
                             100 * opt.near_fraction, ns_text(opt.near_from_ns), ns_text(opt.near_to_ns), opt.near_count,
                             st.grid.size(), opt.near_contiguous ? "" : ", not contiguous",
                             opt.near_count > 1 && opt.near_to_ns > 2 * opt.near_from_ns
                                 ? ": TTS is flat there, any of these durations does as well"
                                 : "");
  auto verdict_text = [&](const PredictionVerdict& v) {
    std::string s = fmt::format("{}p and 1 - p within a factor {:g} of the simulation {}\n", pad, o.agreement, ranges_text(v.ranges));
    if (std::isfinite(v.duration_ratio))
      s += fmt::format("{}duration for p*: predicted {} ns vs simulated {} ns, {:.3g} x ({})\n", pad, ns_text(v.predicted_ns),
                       ns_text(v.simulated_ns), v.duration_ratio,
                       v.duration_agrees ? fmt::format("agrees within a factor {:g}", o.agreement)
                                         : fmt::format("does NOT agree within a factor {:g}", o.agreement));
    else
      s += fmt::format("{}duration for p*: predicted {} ns; the simulated one is only bounded, so no ratio\n", pad,
                       ns_text(v.predicted_ns));
    return s;
  };
  if (predictions) {
    const auto& lz = predictions->lz;
    if (lz.applicable)
      os << fmt::format("  Landau-Zener         {} ns  (Delta_min {:.4g} GHz, slope difference {:.4g} GHz, "
                               "path rate ds/d(t/t_f) = {:.4g} at s*, fit misfit {:.1g})\n",
                               ns_text(lz.duration_for(o.target)), lz.gap_ghz, lz.slope_difference_ghz, lz.path_rate,
                               lz.fit_deviation)
                << verdict_text(*verdicts.lz);
    else
      os << "  Landau-Zener         not applicable: " << lz.why_not << "\n";
    const auto& ad = predictions->adiabatic;
    if (ad.applicable)
      os << fmt::format("  adiabatic condition  {} ns  (t_ad = {:.4g} ns at s = {:.4g}; p ~ 1 - (t_ad/t_f)^2)\n",
                               ns_text(ad.duration_for(o.target)), ad.time_ns, ad.s_at_max)
                << verdict_text(*verdicts.adiabatic);
    else
      os << "  adiabatic condition  not applicable: " << ad.why_not << "\n";
  }
  std::vector<std::string> notes;
  if (st.needed)
    for (const auto& d : st.needed->decreasing)
      notes.push_back(fmt::format("p(t_f) falls from {} at {} ns to {} at {} ns: non-monotonic, do not interpolate there",
                                  p_text(d.p_from), ns_text(d.from_ns), p_text(d.p_to), ns_text(d.to_ns)));
  if (predictions)
    for (const auto& n : predictions->notes) notes.push_back(n);
  double worst_drift = 0;
  for (const auto& [t, pt] : known) worst_drift = std::max(worst_drift, pt.norm_drift);
  if (worst_drift > 10 * o.tolerance)
    notes.push_back(fmt::format("largest norm drift {:.1e} exceeds 10 x tolerance: tighten --tolerance", worst_drift));
  if (!notes.empty()) {
    os << "\nnotes\n";
    for (const auto& n : notes) os << "  - " << n << "\n";
  }
  if (!r.journal_path.empty()) {
    os << "\nwritten     ";
    if (!o.out.empty()) os << o.out << " ";
    if (!o.csv.empty()) os << o.csv << " ";
    os << "(journal " << r.journal_path << ")\n";
  }
}

}  // namespace gapwise
