// gapwise.anneal: one anneal, as `gapwise anneal` runs it (same propagator, the
// same tolerance and the same convergence re-run at tolerance/10), returned
// under the names of the HDF5 result (/anneal attributes and datasets).
#include <cmath>
#include <limits>
#include <optional>

#include <pybind11/stl.h>

#include "dynamics/accuracy_guard.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "python/call_watch.hpp"
#include "python/keyword_checks.hpp"
#include "python/numpy_out.hpp"
#include "python/python_inputs.hpp"

namespace gapwise::python {
namespace {

py::dict anneal(const PyProblem& problem, const PySchedule& schedule, std::optional<double> duration_ns,
                double tolerance, const std::string& propagator, int trace_points, int top, bool p_only, bool check,
                py::object progress) {
  check_tolerance_arg("anneal", tolerance);
  check_propagator_arg("anneal", propagator);
  check_count_arg("anneal", "trace_points", trace_points, kTracePoints);
  check_count_arg("anneal", "top", top, kTopOutcomes);
  if (duration_ns) check_duration_ns(*duration_ns, keyword_place("anneal", "duration_ns"));
  const IsingProblem& p = problem.file.ising;
  const Schedule& sch = schedule.schedule;

  struct Out {
    AnnealResult r;
    GroundManifold gm;
    std::vector<TraceObserver::Row> rows;
    std::optional<double> delta_p;
    std::vector<AccuracyIssue> accuracy;
  };
  Out out;
  CallWatch watch("anneal", std::move(progress));
  watch.run([&] {
    check_memory(p.qubits, 10, 0, problem.file.qubits_place);
    const TransverseIsingHamiltonian H(p);
    out.gm = find_ground_manifold(p, H.diagonal());
    const AnnealPath path = sch.path_for(duration_ns);
    const QuantumState psi0 = initial_state(H, sch, path);
    SimulationOptions sim;
    sim.propagator = propagator;
    sim.propagation.tolerance = tolerance;
    sim.propagation.progress = watch.propagation_hook("anneal");
    if (p_only) sim.propagation.others_factor = std::numeric_limits<double>::infinity();
    sim.samples_per_piece = trace_points;
    sim.top_outcomes = top;
    TraceObserver trace(H, out.gm);
    std::vector<AnnealObserver*> observers{&trace};
    out.r = simulate_anneal(H, out.gm, sch.scales, path, psi0, sim, observers);
    out.rows = trace.rows();
    if (check) {
      SimulationOptions tight = sim;
      tight.propagation.tolerance = tolerance / 10.0;
      tight.top_outcomes = 0;
      tight.propagation.progress = watch.propagation_hook("convergence check at tolerance/10");
      out.delta_p = std::abs(simulate_anneal(H, out.gm, sch.scales, path, psi0, tight).ground_probability -
                             out.r.ground_probability);
    }
    out.accuracy = check_accuracy(out.r, tolerance, out.delta_p);
  });
  for (const auto& issue : out.accuracy)
    if (issue.check == "non_finite") throw std::runtime_error("the simulation produced a non-finite result: " + issue.message);
  const AnnealResult& r = out.r;

  py::dict d;
  d["duration_ns"] = r.duration_ns;
  d["ground_probability"] = r.ground_probability;
  d["norm_drift"] = r.norm_drift;
  d["integrator_error_estimate"] = r.stats.error_estimate;
  d["accuracy_ok"] = out.accuracy.empty();
  py::list warnings;
  for (const auto& issue : out.accuracy) warnings.append(issue.message);
  d["accuracy_warnings"] = warnings;
  d["tolerance"] = tolerance;
  d["p_only"] = p_only;
  d["propagator"] = r.propagator;
  d["steps"] = r.stats.steps;
  d["error_estimate"] = r.stats.error_estimate;
  d["convergence_delta_p"] = out.delta_p ? *out.delta_p : std::numeric_limits<double>::quiet_NaN();
  d["ground_energy"] = out.gm.energy;
  std::vector<long long> gstates(out.gm.states.begin(), out.gm.states.end());
  d["ground_states"] = to_numpy(gstates);
  std::vector<double> t, s, pg, e, nrm;
  for (const auto& row : out.rows) {
    t.push_back(row.t_ns); s.push_back(row.s); pg.push_back(row.ground_probability);
    e.push_back(row.energy_ghz); nrm.push_back(row.norm);
  }
  py::dict trace;
  trace["t"] = to_numpy(t);
  trace["s"] = to_numpy(s);
  trace["ground_probability"] = to_numpy(pg);
  trace["energy"] = to_numpy(e);
  trace["norm"] = to_numpy(nrm);
  d["trace"] = trace;
  d["final_probabilities"] = to_numpy(probabilities(r.final_state));
  py::list outcomes;
  for (const auto& oc : r.top_outcomes) {
    py::dict o;
    o["state"] = oc.state;
    o["bits"] = bits_string(oc.state, p.qubits);
    o["spins"] = spins_string(oc.state, p.qubits);
    o["energy"] = oc.energy;
    o["probability"] = oc.probability;
    o["ground"] = oc.in_ground_manifold;
    outcomes.append(o);
  }
  d["outcomes"] = outcomes;
  d["wall_seconds"] = r.wall_seconds;
  return d;
}

}  // namespace

void bind_anneal(py::module_& m) {
  m.def("_anneal", &anneal, py::arg("problem"), py::arg("schedule"), py::arg("duration_ns"), py::arg("tolerance"),
        py::arg("propagator"), py::arg("trace_points"), py::arg("top"), py::arg("p_only"), py::arg("check"),
        py::arg("progress"));
}

}  // namespace gapwise::python
