// gapwise.gap_scan: the minimum-gap search as `gapwise gap` runs it, returned
// under the names of the HDF5 result (/gap attributes, /gap/curve, /gap/minima,
// /gap/final_levels, /gap/notes).
#include <optional>

#include <pybind11/stl.h>

#include "hamiltonian/spin_flip_sector.hpp"
#include "io/input_error.hpp"
#include "python/call_watch.hpp"
#include "python/keyword_checks.hpp"
#include "python/numpy_out.hpp"
#include "python/python_inputs.hpp"
#include "spectrum/gap_search.hpp"

namespace gapwise::python {
namespace {

py::dict gap_scan(const PyProblem& problem, const PySchedule& schedule, int levels, int points, int max_points,
                  double s_tolerance, const std::string& sector, const std::string& solver, std::optional<double> s_first,
                  std::optional<double> s_last, bool other_sector, bool level_check, py::object progress) {
  const IsingProblem& p = problem.file.ising;
  auto at = [&](const char* key) { return keyword_place("gap_scan", key); };
  check_count_arg("gap_scan", "levels", levels, kSpectrumLevels);
  GapSearchOptions opt;
  opt.levels = levels;
  if (sector == "full") opt.sector = SpinFlipSector::Full;
  else if (sector == "even") opt.sector = SpinFlipSector::Even;
  else if (sector == "odd") opt.sector = SpinFlipSector::Odd;
  else if (sector != "auto")
    throw InputError(at("sector"), "unknown sector \"" + sector + "\"", "use auto, full, even or odd");
  if (opt.sector && *opt.sector != SpinFlipSector::Full && p.has_fields())
    throw InputError(at("sector"), "the " + sector + " sector exists only when every field is zero; this problem has fields",
                     "leave sector=\"auto\" (the full space is used for problems with fields)");
  if (solver != "auto" && solver != "dense" && solver != "lanczos")
    throw InputError(at("solver"), "unknown solver \"" + solver + "\"", "use auto, dense or lanczos");
  opt.method = solver == "dense" ? EigenMethod::Dense : solver == "lanczos" ? EigenMethod::Lanczos : EigenMethod::Auto;
  opt.coarse_points = points;
  opt.max_points = max_points;
  opt.points_option = "points";
  opt.max_points_option = "max_points";
  opt.s_tolerance = s_tolerance;
  opt.s_first = s_first;
  opt.s_last = s_last;
  opt.other_sector = other_sector;
  opt.check_missed_levels = level_check;
  const Schedule& sch = schedule.schedule;

  MinimumGapReport r;
  CallWatch watch("gap_scan", std::move(progress));
  opt.progress = watch.gap_hook();
  watch.run([&] {
    check_gap_search_size(p.qubits, opt.sector.value_or(default_sector(p)), levels, opt.method, problem.file.qubits_place);
    check_gap_point_budget(opt);
    const TransverseIsingHamiltonian H(p);
    check_gap_search_options(opt, sch.scales);
    r = find_minimum_gap(H, sch.scales, opt);
  });

  py::dict d;
  d["s_star"] = r.s_star;
  d["s_star_uncertainty"] = r.s_star_uncertainty;
  d["gap_ghz"] = r.gap_ghz;
  d["gap_uncertainty_ghz"] = r.gap_uncertainty_ghz;
  d["at_end_point"] = r.at_end_point;
  d["definition"] = r.definition;
  d["sector"] = sector_name(r.sector);
  d["ground_degeneracy_in_sector"] = r.ground_degeneracy;
  d["classical_ground_states"] = r.classical_ground_states;
  d["levels"] = r.levels;
  d["solver"] = eigen_method_name(r.method);
  d["matrix_element_ghz"] = r.matrix_element_ghz;
  d["adiabatic_time_ns"] = r.adiabatic_time_ns;
  d["adiabatic_time_crude_ns"] = r.adiabatic_time_crude_ns;
  d["gap_e1_e0_at_end_ghz"] = r.gap_10_end_ghz;
  d["s_tolerance"] = s_tolerance;
  d["wall_seconds"] = r.wall_seconds;

  const auto [s, a, b, gap, gap10, m, m10, err, energies, slopes, others, origin] = gap_curve_columns(r);
  const std::size_t n = r.curve.size(), k = static_cast<std::size_t>(r.levels);
  py::dict curve;
  curve["s"] = to_numpy(s);
  curve["a"] = to_numpy(a);
  curve["b"] = to_numpy(b);
  curve["energies"] = to_numpy(energies, n, k);
  curve["slopes"] = to_numpy(slopes, n, k);
  curve["gap"] = to_numpy(gap);
  curve["gap_e1_e0"] = to_numpy(gap10);
  curve["matrix_element"] = to_numpy(m);
  curve["matrix_element_10"] = to_numpy(m10);
  curve["error_bound"] = to_numpy(err);
  curve["origin"] = to_numpy(origin);
  if (others.size() == n * k) curve["other_sector_energies"] = to_numpy(others, n, k);
  d["curve"] = curve;

  d["minima"] = columns_dict(r.minima, {{"s", &GapMinimum::s},
                                        {"s_uncertainty", &GapMinimum::s_uncertainty},
                                        {"gap", &GapMinimum::gap_ghz},
                                        {"gap_uncertainty", &GapMinimum::gap_uncertainty_ghz}});

  std::vector<double> fe, fpe;
  std::vector<long long> fstate, fground;
  for (const auto& fl : r.final_levels) {
    fe.push_back(fl.energy_ghz); fpe.push_back(fl.problem_energy);
    fstate.push_back(fl.states.empty() ? -1 : static_cast<long long>(fl.states.front()));
    fground.push_back(fl.in_ground_manifold);
  }
  py::dict final_levels;
  final_levels["energy"] = to_numpy(fe);
  final_levels["problem_energy"] = to_numpy(fpe);
  final_levels["dominant_state"] = to_numpy(fstate);
  final_levels["in_ground_manifold"] = to_numpy(fground);
  d["final_levels"] = final_levels;
  d["notes"] = r.flags;
  return d;
}

}  // namespace

void bind_gap(py::module_& m) {
  m.def("_gap_scan", &gap_scan, py::arg("problem"), py::arg("schedule"), py::arg("levels"), py::arg("points"),
        py::arg("max_points"), py::arg("s_tolerance"), py::arg("sector"), py::arg("solver"), py::arg("s_first"),
        py::arg("s_last"), py::arg("other_sector"), py::arg("level_check"),
        py::arg("progress"));
}

}  // namespace gapwise::python
