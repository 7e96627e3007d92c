// gapwise.embed_cost: what an embedding costs, as `gapwise embed-cost` computes
// it (chain strengths scanned, the logical problem as the reference), returned
// under the names of the HDF5 result (/embedding attributes, /embedding/logical,
// /embedding/scan).
#include <cmath>
#include <optional>

#include <pybind11/stl.h>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/embed_cost_report.hpp"
#include "io/embedding_file.hpp"
#include "io/input_error.hpp"
#include "io/toml_reader.hpp"
#include "python/call_watch.hpp"
#include "python/keyword_checks.hpp"
#include "python/numpy_out.hpp"
#include "python/python_inputs.hpp"
#include "studies/chain_strength_scan.hpp"
#include "studies/duration_study.hpp"

namespace gapwise::python {
namespace {

struct PyEmbedding {
  Embedding embedding;
  std::string source;
};

py::dict embed_cost(const PyProblem& problem, const PyEmbedding& emb, const PySchedule& schedule,
                    std::optional<std::vector<double>> strengths, bool absolute, std::optional<double> term_limit,
                    bool use_file_term_limit, std::optional<double> duration_ns,
                    std::optional<std::vector<double>> search_durations, double target, double tolerance,
                    double resolution, const std::string& propagator, int threads, py::object progress) {
  const std::string fn = "embed_cost";
  auto at = [&](const char* key) { return keyword_place(fn, key); };
  check_tolerance_arg(fn, tolerance);
  check_target_arg(fn, target);
  check_propagator_arg(fn, propagator);
  check_threads_arg(fn, threads);
  check_resolution_value(resolution, at("resolution"));
  if (strengths) {
    if (strengths->empty()) throw InputError(at("strengths"), "no chain strengths given", "give at least one, e.g. [1, 2, 3]");
    for (double s : *strengths)
      if (!(s > 0.0) || !std::isfinite(s))
        throw InputError(at("strengths"), fmt::format("chain strength {} is not positive", s),
                         "give magnitudes > 0 (the chain coupling is always ferromagnetic)");
  }
  if (term_limit && !(*term_limit > 0.0 && std::isfinite(*term_limit)))
    throw InputError(at("term_limit"), fmt::format("term limit {} is not a positive number", *term_limit),
                     "give the largest |h| or |J| the device accepts, or leave it out");
  if (duration_ns) check_duration_ns(*duration_ns, at("duration_ns"));
  if (search_durations) check_durations_arg(fn, *search_durations);
  const IsingProblem& logical = problem.file.ising;
  const Embedding& embedding = emb.embedding;
  const Schedule& sch = schedule.schedule;
  check_embedding_serves(embedding, logical, problem.source);

  ChainScanOptions scan;
  const std::vector<double> values = strengths.value_or(std::vector<double>{0.5, 1, 1.5, 2, 3, 4});
  for (double v : values)
    scan.strengths.push_back(absolute ? ChainStrength::absolute(v) : ChainStrength::relative_to_largest(v));
  if (embedding.chain_strength) scan.strengths.push_back(*embedding.chain_strength);  // the file's default, always
  scan.term_limit = term_limit ? term_limit : (use_file_term_limit ? embedding.term_limit : std::nullopt);
  scan.duration_ns = sch.path_for(duration_ns).duration_ns();
  scan.grid_ns = normalised_grid(search_durations ? *search_durations : log_spaced_durations(1.0, 1000.0, 13));
  scan.needed.target = target;
  scan.needed.relative_width = resolution;
  scan.needed.noise = std::max(10.0 * tolerance, 1e-5);
  scan.simulation.propagator = propagator;
  scan.simulation.propagation.tolerance = tolerance;
  scan.threads = threads;
  std::optional<ChainScanResult> result;
  CallWatch watch("embed_cost", std::move(progress));
  scan.simulation.propagation.progress = watch.propagation_hook();
  scan.progress = [&](const std::string& stage) { watch.report(stage, 0, 0); };
  watch.run([&] {
    check_memory(embedding.physical_qubits, 10, 0, emb.source);
    result = scan_chain_strength(logical, embedding, sch, scan);
  });
  const ChainScanResult& r = *result;
  const ChainScanPoint& best = r.points[r.best];

  py::dict d;
  d["target"] = target;
  d["duration_ns"] = scan.duration_ns;
  d["chain_coupling_bound"] = r.chain_bound;
  d["best_chain_coupling"] = best.chain_coupling;
  d["price_of_embedding"] = r.price.ratio;
  d["price_relation"] = r.price.relation;
  d["best_index"] = r.best;
  py::dict lg;
  lg["min_gap_ghz"] = r.logical_m.gap.gap_ghz;
  lg["s_star"] = r.logical_m.gap.s_star;
  lg["ground_probability"] = r.logical_m.p_success;
  lg["needed_ns"] = r.logical_m.needed.ns;
  lg["needed"] = r.logical_m.needed.describe();
  lg["needed_bound"] = needed_bound_code(r.logical_m.needed);
  d["logical"] = lg;
  std::vector<double> coupling, scale, gap, sstar, pl, pp, broken, needed;
  std::vector<long long> bound, intact;
  std::vector<std::string> strength_text;
  for (const auto& p : r.points) {
    coupling.push_back(p.chain_coupling); scale.push_back(p.scale); gap.push_back(p.m.gap.gap_ghz);
    sstar.push_back(p.m.gap.s_star); pl.push_back(p.m.p_success); pp.push_back(p.m.p_physical);
    broken.push_back(p.m.decoded.mean_broken_fraction); needed.push_back(p.m.needed.ns);
    bound.push_back(needed_bound_code(p.m.needed));
    intact.push_back(p.ground_intact ? 1 : 0);
    strength_text.push_back(p.strength.describe());
  }
  py::dict s;
  s["chain_coupling"] = to_numpy(coupling);
  s["scale"] = to_numpy(scale);
  s["min_gap"] = to_numpy(gap);
  s["s_star"] = to_numpy(sstar);
  s["p_logical"] = to_numpy(pl);
  s["p_physical"] = to_numpy(pp);
  s["broken_chain_share"] = to_numpy(broken);
  s["needed_duration"] = to_numpy(needed);
  s["needed_bound"] = to_numpy(bound);
  s["ground_intact"] = to_numpy(intact);
  s["strength"] = strength_text;
  d["scan"] = s;
  return d;
}

PyEmbedding embedding_from_text(const std::string& text, const std::string& name) {
  try {
    return PyEmbedding{parse_embedding_text(text, name), name};
  } catch (const InputError& e) {  // a rendered dict: its lines mean nothing to the caller
    SourcePlace place = e.place();
    place.line = 0;
    place.column = 0;
    throw InputError(place, e.problem(), e.fix());
  }
}

}  // namespace

void bind_embed_cost(py::module_& m) {
  py::class_<PyEmbedding>(m, "Embedding", "A minor embedding: chains of physical qubits per logical qubit.")
      .def_property_readonly("chains", [](const PyEmbedding& e) { return e.embedding.chains; })
      .def_property_readonly("physical_qubits", [](const PyEmbedding& e) { return e.embedding.physical_qubits; })
      .def_property_readonly("source", [](const PyEmbedding& e) { return e.source; });
  m.def("_embedding_from_file", [](const std::string& path) { return PyEmbedding{read_embedding_file(path), path}; });
  m.def("_embedding_from_text", &embedding_from_text);
  m.def("_embed_cost", &embed_cost, py::arg("problem"), py::arg("embedding"), py::arg("schedule"), py::arg("strengths"),
        py::arg("absolute"), py::arg("term_limit"), py::arg("use_file_term_limit"), py::arg("duration_ns"),
        py::arg("search_durations"), py::arg("target"), py::arg("tolerance"), py::arg("resolution"),
        py::arg("propagator"), py::arg("threads"), py::arg("progress"));
}

}  // namespace gapwise::python
