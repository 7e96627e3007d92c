// gapwise.pause_map: ground-state probability over pause location x pause
// duration, as `gapwise pause-map` computes it, returned under the names of the
// HDF5 result (/pause_map datasets and attributes; matrices location-major).
#include <pybind11/stl.h>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/input_error.hpp"
#include "python/call_watch.hpp"
#include "python/keyword_checks.hpp"
#include "python/numpy_out.hpp"
#include "python/python_inputs.hpp"
#include "studies/shape_maps.hpp"

namespace gapwise::python {
namespace {

void check_values(const std::vector<double>& v, double lo, double hi, const std::string& key, const std::string& what) {
  const SourcePlace at = keyword_place("pause_map", key);
  if (v.empty()) throw InputError(at, fmt::format("no {} given", what), fmt::format("give {} values", what));
  for (double x : v)
    if (!(x >= lo && x <= hi))
      throw InputError(at, fmt::format("{} {} is outside [{}, {}]", what, x, lo, hi),
                       fmt::format("give {} between {} and {}", what, lo, hi));
}

py::dict pause_map_py(const PyProblem& problem, const PySchedule& schedule, double duration_ns,
                      const std::vector<double>& pause_s, const std::vector<double>& pause_ns, const std::string& cost,
                      double target, double tolerance, const std::string& propagator, int threads,
                      py::object progress) {
  const std::string fn = "pause_map";
  check_tolerance_arg(fn, tolerance);
  check_target_arg(fn, target);
  check_propagator_arg(fn, propagator);
  check_threads_arg(fn, threads);
  check_duration_ns(duration_ns, keyword_place(fn, "duration_ns"));
  check_values(pause_s, 0.0, 1.0, "pause_s", "pause location s");
  check_values(pause_ns, 0.0, 1e12, "pause_ns", "pause duration (ns)");
  if (cost != "total" && cost != "added")
    throw InputError(keyword_place(fn, "cost"), fmt::format("unknown cost \"{}\"", cost),
                     "use \"total\" (every run takes duration_ns) or \"added\" (the pause adds to it)");
  PauseMapOptions mo;
  mo.pause_s = pause_s;
  mo.pause_ns = pause_ns;
  mo.duration_ns = duration_ns;
  mo.cost = cost == "added" ? PauseCost::AddedTime : PauseCost::EqualTotal;
  mo.target_probability = target;
  mo.threads = threads;
  SimulationOptions sim;
  sim.propagator = propagator;
  sim.propagation.tolerance = tolerance;
  PauseMap m;
  CallWatch watch("pause_map", std::move(progress));
  sim.propagation.progress = watch.propagation_hook();
  watch.run([&] {
    check_memory(problem.file.ising.qubits, 10, 0, problem.file.qubits_place);
    const AnnealSetup setup(problem.file.ising, schedule.schedule, sim);
    m = pause_map(setup, mo, nullptr, [&](std::size_t done, std::size_t total) {
      watch.report("anneals", static_cast<double>(done), static_cast<double>(total));
    });
  });
  const std::size_t ni = pause_s.size(), nj = pause_ns.size();
  std::vector<double> pg, tts, tot, nd;
  for (std::size_t i = 0; i < ni; ++i)
    for (std::size_t j = 0; j < nj; ++j) {
      pg.push_back(m.at(i, j).ground_probability);
      tts.push_back(m.tts_ns(i, j));
      tot.push_back(m.at(i, j).total_ns);
      nd.push_back(m.at(i, j).norm_drift);
    }
  std::vector<double> rp, rt;
  for (const auto& r : m.reference) { rp.push_back(r.ground_probability); rt.push_back(r.total_ns); }
  py::dict d;
  d["pause_s"] = to_numpy(pause_s);
  d["pause_ns"] = to_numpy(pause_ns);
  d["ground_probability"] = to_numpy(pg, ni, nj);
  d["tts_ns"] = to_numpy(tts, ni, nj);
  d["total_ns"] = to_numpy(tot, ni, nj);
  d["norm_drift"] = to_numpy(nd, ni, nj);
  d["reference_ground_probability"] = to_numpy(rp);
  d["reference_total_ns"] = to_numpy(rt);
  d["duration_ns"] = duration_ns;
  d["cost"] = mo.cost == PauseCost::EqualTotal ? "equal-total" : "added-time";
  d["target_probability"] = target;
  d["tolerance"] = tolerance;
  return d;
}

}  // namespace

void bind_pause_map(py::module_& m) {
  m.def("_pause_map", &pause_map_py, py::arg("problem"), py::arg("schedule"), py::arg("duration_ns"), py::arg("pause_s"),
        py::arg("pause_ns"), py::arg("cost"), py::arg("target"), py::arg("tolerance"), py::arg("propagator"),
        py::arg("threads"), py::arg("progress"));
}

}  // namespace gapwise::python
