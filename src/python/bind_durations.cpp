// gapwise.duration_study: the anneal-time study as `gapwise durations` runs it
// (same default grid and extension, bisection, predictions), returned under the
// names of the HDF5 result (/durations attributes, /durations/points,
// /durations/tts_optimum, /durations/duration_needed, /durations/predictions).
// Infinite time to solution is float('inf'); "not applicable" is NaN, as in the file.
#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <set>

#include <pybind11/stl.h>

#include "io/duration_study_file.hpp"
#include "io/input_error.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "platform/thread_count.hpp"
#include "python/call_watch.hpp"
#include "python/keyword_checks.hpp"
#include "python/numpy_out.hpp"
#include "python/python_inputs.hpp"
#include "studies/anneal_predictions.hpp"
#include "studies/duration_study.hpp"

namespace gapwise::python {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

py::dict bracket_dict(const CrossingBracket& b) {
  py::dict d;
  d["lower_ns"] = b.lower_ns;
  d["upper_ns"] = b.upper_ns;
  d["p_lower"] = b.p_lower;
  d["p_upper"] = b.p_upper;
  d["bisection_rounds"] = b.rounds;
  d["oscillation_inside"] = b.oscillation_inside;
  return d;
}

py::dict duration_study(const PyProblem& problem, const PySchedule& schedule, std::optional<std::vector<double>> durations,
                        double target, double tolerance, const std::string& propagator, bool p_only, bool search,
                        bool predictions_on, double resolution, int probes, double agreement, int threads,
                        py::object progress) {
  const std::string fn = "duration_study";
  check_tolerance_arg(fn, tolerance);
  check_target_arg(fn, target);
  check_propagator_arg(fn, propagator);
  check_count_arg(fn, "probes", probes, kBisectionProbes);
  check_threads_arg(fn, threads);
  check_resolution_value(resolution, keyword_place(fn, "resolution"));
  check_agreement_value(agreement, keyword_place(fn, "agreement"));
  std::vector<double> grid;
  if (durations) {
    check_durations_arg(fn, *durations);
    grid = normalised_grid(*durations);
  }
  const IsingProblem& p = problem.file.ising;

  struct Out {
    std::optional<AnnealSetup> setup;
    std::optional<AnnealPredictions> predictions;
    std::map<double, DurationPoint> known;
    DurationStudy st;
    PredictionVerdicts verdicts;
  } out;
  const double p_noise = std::max(10.0 * tolerance, 1e-9);
  CallWatch watch("duration_study", std::move(progress));
  watch.run([&] {
#ifdef _OPENMP
    const int nthreads = thread_count_or_default(threads);
#else
    const int nthreads = 1;
#endif
    check_memory(p.qubits, 10 * std::max(1, nthreads), 0, problem.file.qubits_place);
    SimulationOptions sim;
    sim.propagator = propagator;
    sim.propagation.tolerance = tolerance;
    sim.propagation.progress = watch.propagation_hook();
    if (p_only) sim.propagation.others_factor = std::numeric_limits<double>::infinity();
    const AnnealSetup& setup = out.setup.emplace(p, schedule.schedule, sim);
    if (predictions_on) {
      PredictionOptions po;
      po.progress = watch.gap_hook();
      out.predictions = predict_anneal(setup, po);
    }
    const bool grid_chosen = grid.empty();
    if (grid_chosen) grid = default_duration_grid(out.predictions ? &*out.predictions : nullptr, target);
    DurationEvaluator ev(setup, nullptr);
    std::size_t planned = 0, finished = 0;  // under the evaluator's lock
    ev.on_batch = [&](const std::vector<double>& batch) { planned += batch.size(); };
    ev.on_finished = [&](const DurationPoint&) {
      watch.report("anneals", static_cast<double>(++finished), static_cast<double>(planned));
    };
    DurationStudyOptions so;
    so.durations_ns = grid;
    so.target = target;
    so.search_needed = search;
    so.needed.relative_width = resolution;
    so.needed.probes_per_round = probes;
    so.needed.noise = p_noise;
    so.threads = nthreads;
    so.random_guess_probability = sudden_limit_probability(setup);
    so.extend_to_bracket = grid_chosen;
    out.st = run_duration_study(ev, so);
    out.known = ev.known();
    if (out.predictions) out.verdicts = judge_predictions(*out.predictions, out.known, out.st, agreement, p_noise);
  });
  const AnnealSetup& setup = *out.setup;
  const DurationStudy& st = out.st;
  grid.clear();
  for (const auto& pt : st.grid) grid.push_back(pt.duration_ns);

  py::dict d;
  d["target_probability"] = target;
  d["propagator"] = propagator;
  d["tolerance"] = tolerance;
  d["p_only"] = p_only;
  d["grid_points"] = grid.size();
  d["qubits"] = p.qubits;
  d["ground_energy"] = setup.ground.energy;
  d["ground_degeneracy"] = setup.ground.degeneracy();
  d["ground_states"] = to_numpy(std::vector<long long>(setup.ground.states.begin(), setup.ground.states.end()));
  d["grid_ns"] = to_numpy(grid);

  const std::set<double> on(grid.begin(), grid.end());
  std::vector<double> t, pg, tts, reps, drift, wall, lz, ad;
  std::vector<long long> on_grid, kind, steps;
  for (const auto& [dur, pt] : out.known) {
    const auto x = time_to_solution(dur, std::clamp(pt.ground_probability, 0.0, 1.0), target);
    t.push_back(dur);
    pg.push_back(pt.ground_probability);
    tts.push_back(x.tts_ns);
    reps.push_back(x.repetitions);
    kind.push_back(static_cast<long long>(x.kind));
    on_grid.push_back(on.count(dur) ? 1 : 0);
    drift.push_back(pt.norm_drift);
    steps.push_back(pt.steps);
    wall.push_back(pt.wall_seconds);
    if (out.predictions) {
      lz.push_back(out.predictions->lz.applicable ? out.predictions->lz.p_at(dur) : kNaN);
      ad.push_back(out.predictions->adiabatic.applicable ? out.predictions->adiabatic.p_at(dur) : kNaN);
    }
  }
  py::dict points;
  points["duration_ns"] = to_numpy(t);
  points["ground_probability"] = to_numpy(pg);
  points["tts_ns"] = to_numpy(tts);
  points["repetitions"] = to_numpy(reps);
  points["tts_case"] = to_numpy(kind);
  points["on_grid"] = to_numpy(on_grid);
  points["norm_drift"] = to_numpy(drift);
  points["steps"] = to_numpy(steps);
  points["wall_seconds"] = to_numpy(wall);
  if (out.predictions) {
    points["p_landau_zener"] = to_numpy(lz);
    points["p_adiabatic"] = to_numpy(ad);
  }
  d["points"] = points;

  const TtsOptimum& o = st.optimum;
  py::dict opt;
  opt["duration_ns"] = o.duration_ns;
  opt["tts_ns"] = o.tts_ns;
  opt["at_range_edge"] = o.at_range_edge;
  opt["lower_ns"] = o.lower_ns;
  opt["upper_ns"] = o.upper_ns;
  opt["near_fraction"] = o.near_fraction;
  opt["near_from_ns"] = o.near_from_ns;
  opt["near_to_ns"] = o.near_to_ns;
  opt["near_count"] = o.near_count;
  opt["near_contiguous"] = o.near_contiguous;
  opt["random_guess_probability"] = o.random_guess_probability;
  opt["random_guess_limited"] = o.random_guess_limited;
  opt["has_local_optimum"] = o.local.has_value();
  if (o.local) {
    opt["local_duration_ns"] = o.local->duration_ns;
    opt["local_tts_ns"] = o.local->tts_ns;
    opt["local_lower_ns"] = o.local->lower_ns;
    opt["local_upper_ns"] = o.local->upper_ns;
  }
  opt["grid_extended_below"] = st.extended_below;
  opt["grid_extended_above"] = st.extended_above;
  opt["extension_stop"] = st.extension_stop;
  d["tts_optimum"] = opt;

  if (st.needed) {
    const auto& dn = *st.needed;
    py::dict n;
    n["status"] = needed_status_name(dn.status);
    n["lost_at_longest"] = dn.lost_at_longest;
    n["first_crossing"] = bracket_dict(dn.first);
    if (dn.stays_reached) n["stays_reached"] = bracket_dict(*dn.stays_reached);
    n["decreasing_stretches"] = columns_dict(dn.decreasing, {{"from_ns", &PStretch::from_ns},
                                                             {"to_ns", &PStretch::to_ns},
                                                             {"p_from", &PStretch::p_from},
                                                             {"p_to", &PStretch::p_to}});
    n["simulated_duration_ns"] = simulated_duration_needed(st);
    d["duration_needed"] = n;
  }

  if (out.predictions) {
    const auto& pr = *out.predictions;
    py::dict g;
    g["agreement_factor"] = agreement;
    g["agreement_floor"] = p_noise;
    g["gap_ghz"] = pr.gap_ghz;
    g["gap_uncertainty_ghz"] = pr.gap_uncertainty_ghz;
    g["s_star"] = pr.s_star;
    g["s_star_uncertainty"] = pr.s_star_uncertainty;
    g["gap_definition"] = pr.gap_definition;
    g["sector"] = pr.sector;
    g["gap_at_end_point"] = pr.gap_at_end_point;
    py::dict curve;
    curve["s"] = to_numpy(pr.curve_s);
    curve["gap"] = to_numpy(pr.curve_gap_ghz);
    curve["matrix_element"] = to_numpy(pr.curve_matrix_element_ghz);
    g["gap_curve"] = curve;
    py::dict minima;
    minima["s"] = to_numpy(pr.minima_s);
    minima["gap"] = to_numpy(pr.minima_gap_ghz);
    g["gap_minima"] = minima;
    g["notes"] = pr.notes;
    auto verdict = [&](py::dict& into, const std::optional<PredictionVerdict>& v) {
      if (!v) return;
      std::vector<double> from, to;
      for (const auto& r : v->ranges) { from.push_back(r.from_ns); to.push_back(r.to_ns); }
      into["agreement_from_ns"] = to_numpy(from);
      into["agreement_to_ns"] = to_numpy(to);
      into["duration_ratio"] = v->duration_ratio;
      into["duration_agrees"] = v->duration_agrees;
    };
    py::dict l;
    l["applicable"] = pr.lz.applicable;
    if (std::isfinite(pr.lz.pause_s)) {
      l["pause_s"] = pr.lz.pause_s;
      l["pause_distance_widths"] = pr.lz.pause_distance_widths;
    }
    if (!pr.lz.applicable) l["why_not"] = pr.lz.why_not;
    else {
      l["gap_ghz"] = pr.lz.gap_ghz;
      l["slope_difference_ghz"] = pr.lz.slope_difference_ghz;
      l["fit_half_width_s"] = pr.lz.fit_half_width_s;
      l["fit_deviation"] = pr.lz.fit_deviation;
      l["path_rate"] = pr.lz.path_rate;
      l["duration_for_target_ns"] = pr.lz.duration_for(target);
      verdict(l, out.verdicts.lz);
    }
    g["landau_zener"] = l;
    py::dict a;
    a["applicable"] = pr.adiabatic.applicable;
    if (!pr.adiabatic.applicable) a["why_not"] = pr.adiabatic.why_not;
    else {
      a["time_ns"] = pr.adiabatic.time_ns;
      a["s_at_max"] = pr.adiabatic.s_at_max;
      a["duration_for_target_ns"] = pr.adiabatic.duration_for(target);
      verdict(a, out.verdicts.adiabatic);
    }
    g["adiabatic"] = a;
    d["predictions"] = g;
  }
  return d;
}

}  // namespace

void bind_durations(py::module_& m) {
  m.def("_duration_study", &duration_study, py::arg("problem"), py::arg("schedule"), py::arg("durations_ns"),
        py::arg("target"), py::arg("tolerance"), py::arg("propagator"), py::arg("p_only"), py::arg("search"),
        py::arg("predictions"), py::arg("resolution"), py::arg("probes"), py::arg("agreement"), py::arg("threads"),
        py::arg("progress"));
}

}  // namespace gapwise::python
