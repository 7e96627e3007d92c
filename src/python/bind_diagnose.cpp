// gapwise.diagnose: why an anneal loses the ground state, as `gapwise diagnose`
// computes it (same options and defaults), returned under the names of the
// HDF5 result (/diagnosis; the overlap and crossing columns come from
// io/diagnosis_output, as the file's do; runs as a list indexed like
// /diagnosis/runs/<r>, NaN where the file has NaN).
#include <cmath>
#include <limits>
#include <optional>

#include <pybind11/stl.h>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "hamiltonian/spin_flip_sector.hpp"
#include "io/diagnosis_output.hpp"
#include "io/input_error.hpp"
#include "python/call_watch.hpp"
#include "python/keyword_checks.hpp"
#include "python/numpy_out.hpp"
#include "python/python_inputs.hpp"
#include "studies/loss_diagnosis.hpp"

namespace gapwise::python {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

py::dict diagnose_py(const PyProblem& problem, const PySchedule& schedule, const std::vector<double>& durations_ns,
                     double tolerance, const std::string& propagator, int levels, double window, double target_loss,
                     double check_max_ns, long long samples, std::optional<double> sigma_h, std::optional<double> sigma_j,
                     bool relative, unsigned long long seed, bool control_gaps, std::optional<double> control_tolerance,
                     int threads, py::object progress) {
  const std::string fn = "diagnose";
  auto at = [&](const char* key) { return keyword_place(fn, key); };
  check_durations_arg(fn, durations_ns);
  check_tolerance_arg(fn, tolerance);
  check_propagator_arg(fn, propagator);
  check_count_arg(fn, "levels", levels, kSpectrumLevels);
  check_threads_arg(fn, threads);
  check_count_arg(fn, "samples", samples, kControlSamples);
  if (sigma_h) check_sigma_value(*sigma_h, at("sigma_h"));
  if (sigma_j) check_sigma_value(*sigma_j, at("sigma_j"));
  if (control_tolerance) check_tolerance_arg(fn, *control_tolerance, "control_tolerance");
  check_target_loss_value(target_loss, at("target_loss"));
  check_max_check_ns_value(check_max_ns, at("check_max_ns"));
  check_window_value(window, at("window"));

  DiagnosisOptions d;
  d.durations_ns = durations_ns;
  d.simulation.propagator = propagator;
  d.simulation.propagation.tolerance = tolerance;
  d.gap.levels = levels;
  d.overlap.levels = levels;
  d.window_factor = window;
  d.target_loss = target_loss;
  d.check_max_ns = check_max_ns;
  d.control_sigma_h_given = sigma_h.has_value();
  d.control_sigma_j_given = sigma_j.has_value();
  d.control_gaps = control_gaps;
  d.control_tolerance = control_tolerance;
  if (samples > 0) {
    ControlEnsembleOptions c;
    c.model = {sigma_h.value_or(0.03), sigma_j.value_or(0.03), relative};
    c.samples = static_cast<std::uint64_t>(samples);
    c.seed = seed;
    c.threads = threads;
    d.control = c;
  }
  std::optional<Diagnosis> result;
  CallWatch watch("diagnose", std::move(progress));
  d.simulation.propagation.progress = watch.propagation_hook();
  d.gap.progress = watch.gap_hook();
  d.progress = [&](const DiagnosisProgress& p) {
    watch.report(p.stage, static_cast<double>(p.done), static_cast<double>(p.total));
  };
  watch.run([&] {
    check_memory(problem.file.ising.qubits, 12, 0, problem.file.qubits_place);
    result = diagnose_anneal(problem.file.ising, schedule.schedule, d);
  });
  const Diagnosis& r = *result;

  py::dict out;
  out["ground_energy"] = r.ground.energy;
  out["gap_ghz"] = r.gap.gap_ghz;
  out["s_star"] = r.gap.s_star;
  out["gap_definition"] = r.gap.definition;
  out["sector"] = sector_name(r.gap.sector);
  out["durations"] = to_numpy(r.durations_ns);
  out["ground_states"] = to_numpy(std::vector<long long>(r.ground.states.begin(), r.ground.states.end()));
  {
    std::vector<double> s, gap;
    for (const SpectrumPoint& p : r.gap.curve) { s.push_back(p.s); gap.push_back(p.gap_ghz); }
    py::dict spectrum;
    spectrum["s"] = to_numpy(s);
    spectrum["gap"] = to_numpy(gap);
    out["spectrum"] = spectrum;
  }
  {
    const OverlapColumns o = overlap_columns(r);
    py::dict overlap;
    overlap["s"] = to_numpy(o.s);
    overlap["ground_weight"] = to_numpy(o.ground_weight, o.s.size(), o.levels);
    overlap["energy"] = to_numpy(o.energy, o.s.size(), o.levels);
    overlap["dominant_excited_weight"] = to_numpy(o.dominant_excited_weight, o.s.size(), o.levels);
    overlap["perturbative_crossing_s"] = to_numpy(o.perturbative_crossing_s);
    out["overlap"] = overlap;
  }
  {
    const std::size_t m = r.crossings.size(), nr = r.runs.size();
    const CrossingColumns x = crossing_columns(r);
    py::dict c;
    c["crossing"] = to_numpy(x.crossing);
    c["s_star"] = to_numpy(x.s_star);
    c["delta_min"] = to_numpy(x.delta_min);
    c["diabatic_slope"] = to_numpy(x.diabatic_slope);
    c["perturbative_crossing_index"] = to_numpy(x.perturbative_crossing_index);
    c["population_before"] = to_numpy(x.population_before, m, nr);
    c["population_after"] = to_numpy(x.population_after, m, nr);
    c["transferred"] = to_numpy(x.transferred, m, nr);
    c["landau_zener_loss"] = to_numpy(x.landau_zener_loss, m, nr);
    c["end_gap"] = to_numpy(x.end_gap);
    c["broad"] = to_numpy(x.broad);
    c["landau_zener_duration"] = to_numpy(x.landau_zener_duration);
    c["check_run"] = to_numpy(x.check_run);
    c["check_ground_probability"] = to_numpy(x.check_ground_probability);
    c["check_transferred"] = to_numpy(x.check_transferred);
    out["crossings"] = c;
  }
  py::list runs;
  for (const DurationDiagnosis& run : r.runs) {
    py::dict g;
    g["duration_ns"] = run.duration_ns;
    g["ground_probability"] = run.anneal.ground_probability;
    g["unattributed_loss"] = run.unattributed_loss;
    g["final_probabilities"] = to_numpy(probabilities(run.anneal.final_state));
    std::vector<std::string> kinds, verdicts;
    std::vector<double> losses, regained;
    for (const Channel& k : run.channels) {
      kinds.push_back(channel_kind_name(k.kind));
      verdicts.push_back(k.verdict);
      losses.push_back(k.loss);
      regained.push_back(k.regained);
    }
    g["channel_kind"] = kinds;
    g["channel_verdict"] = verdicts;
    g["channel_loss"] = to_numpy(losses);
    g["channel_regained"] = to_numpy(regained);
    runs.append(g);
  }
  out["runs"] = runs;
  if (r.control) {
    const ControlEnsemble& e = *r.control;
    py::dict g;
    g["seed"] = e.options.seed;
    g["sigma_h"] = e.options.model.sigma_h;
    g["sigma_j"] = e.options.model.sigma_j;
    g["relative"] = e.options.model.relative;
    g["ground_change_rate"] = e.ground_change_rate;
    g["sigmas_are_defaults"] = !r.control_sigma_h_given || !r.control_sigma_j_given;
    std::vector<long long> idx, changed;
    std::vector<double> p;
    for (const ControlSample& s : e.samples) {
      idx.push_back(static_cast<long long>(s.index));
      changed.push_back(s.ground_changed);
      for (std::size_t k = 0; k < r.runs.size(); ++k) p.push_back(k < s.p_intended.size() ? s.p_intended[k] : kNaN);
    }
    g["sample"] = to_numpy(idx);
    g["ground_changed"] = to_numpy(changed);
    g["classical_margin"] = to_numpy(e.column(&ControlSample::classical_margin));
    if (!e.samples.empty() && std::isfinite(e.samples.front().delta_min_ghz)) {
      g["delta_min"] = to_numpy(e.column(&ControlSample::delta_min_ghz));
      g["s_star"] = to_numpy(e.column(&ControlSample::s_star));
    }
    g["ground_probability"] = to_numpy(p, e.samples.size(), r.runs.size());
    out["control"] = g;
  }
  return out;
}

}  // namespace

void bind_diagnose(py::module_& m) {
  m.def("_diagnose", &diagnose_py, py::arg("problem"), py::arg("schedule"), py::arg("durations_ns"), py::arg("tolerance"),
        py::arg("propagator"), py::arg("levels"), py::arg("window"), py::arg("target_loss"), py::arg("check_max_ns"),
        py::arg("samples"), py::arg("sigma_h"), py::arg("sigma_j"), py::arg("relative"), py::arg("seed"),
        py::arg("control_gaps"), py::arg("control_tolerance"), py::arg("threads"),
        py::arg("progress"));
}

}  // namespace gapwise::python
