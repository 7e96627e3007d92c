// The result file of `gapwise gap` (gap_result_file.hpp).
#include "io/gap_result_file.hpp"

#include <fmt/format.h>

#include "hamiltonian/spin_flip_sector.hpp"
#include "io/hdf5_output.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

void write_gap_result(const std::string& path, const MinimumGapReport& r, const std::vector<EigenvectorsAt>& vectors,
                      bool first_at_s_star, double s_tolerance, const std::string& command_line,
                      const std::vector<std::string>& input_files) {
  const int k = r.levels, g = r.ground_degeneracy;
  Hdf5Output h5(path, {"gapwise-gap", 1});
  write_provenance(h5, command_line, input_files);
  const std::string G = "/gap";
  h5.group(G);
  h5.attribute(G, "s_star", r.s_star);
  h5.attribute(G, "s_star_uncertainty", r.s_star_uncertainty);
  h5.attribute(G, "gap_ghz", r.gap_ghz);
  h5.attribute(G, "gap_uncertainty_ghz", r.gap_uncertainty_ghz);
  h5.attribute(G, "at_end_point", static_cast<long long>(r.at_end_point));
  h5.attribute(G, "definition", r.definition);
  h5.attribute(G, "sector", sector_name(r.sector));
  h5.attribute(G, "ground_degeneracy_in_sector", static_cast<long long>(g));
  h5.attribute(G, "classical_ground_states", static_cast<long long>(r.classical_ground_states));
  h5.attribute(G, "levels", static_cast<long long>(k));
  h5.attribute(G, "solver", eigen_method_name(r.method));
  h5.attribute(G, "matrix_element_ghz", r.matrix_element_ghz);
  h5.attribute(G, "adiabatic_time_ns", r.adiabatic_time_ns);
  h5.attribute(G, "adiabatic_time_crude_ns", r.adiabatic_time_crude_ns);
  h5.attribute(G, "gap_e1_e0_at_end_ghz", r.gap_10_end_ghz);
  h5.attribute(G, "s_tolerance", s_tolerance);
  const auto [s, a, b, gap, gap10, m, m10, err, energies, slopes, others, origin] = gap_curve_columns(r);
  const std::size_t n = r.curve.size(), kk = static_cast<std::size_t>(k);
  h5.write(G + "/curve/s", s, "1");
  h5.write(G + "/curve/a", a, "GHz");
  h5.write(G + "/curve/b", b, "GHz");
  h5.write_matrix(G + "/curve/energies", energies, n, kk, "GHz", {G + "/curve/s", h5.level_axis(G + "/curve", kk)});
  h5.write_matrix(G + "/curve/slopes", slopes, n, kk, DataMeaning("GHz").described("dE_k/ds"), {G + "/curve/s", h5.level_axis(G + "/curve", kk)});
  h5.write(G + "/curve/gap", gap, "GHz");
  h5.attribute(G + "/curve/gap", "definition", r.definition);
  h5.write(G + "/curve/gap_e1_e0", gap10, "GHz");
  h5.write(G + "/curve/matrix_element", m, "GHz");
  h5.write(G + "/curve/matrix_element_10", m10, "GHz");
  h5.write(G + "/curve/error_bound", err, "GHz");
  h5.write(G + "/curve/origin", origin, DataMeaning("1").flagged({0, 1, 2}, "grid subdivision refinement"));
  if (others.size() == n * kk) h5.write_matrix(G + "/curve/other_sector_energies", others, n, kk, "GHz", {G + "/curve/s", h5.level_axis(G + "/curve", kk)});
  std::vector<double> ms, msu, mg, mgu;
  for (const auto& mm : r.minima) {
    ms.push_back(mm.s); msu.push_back(mm.s_uncertainty); mg.push_back(mm.gap_ghz); mgu.push_back(mm.gap_uncertainty_ghz);
  }
  h5.write(G + "/minima/s", ms, "1");
  h5.write(G + "/minima/s_uncertainty", msu, "1");
  h5.write(G + "/minima/gap", mg, "GHz");
  h5.write(G + "/minima/gap_uncertainty", mgu, "GHz");
  std::vector<double> fe, fpe;
  std::vector<long long> fstate, fground;
  for (const auto& fl : r.final_levels) {
    fe.push_back(fl.energy_ghz); fpe.push_back(fl.problem_energy);
    fstate.push_back(fl.states.empty() ? -1 : static_cast<long long>(fl.states.front()));
    fground.push_back(fl.in_ground_manifold);
  }
  h5.write(G + "/final_levels/energy", fe, "GHz");
  h5.write(G + "/final_levels/problem_energy", fpe, DataMeaning("1").described("classical problem energy, in the problem's own units"));
  h5.write(G + "/final_levels/dominant_state", fstate, DataMeaning("1").described("basis index (bit i = qubit i), -1 when none"));
  h5.write(G + "/final_levels/in_ground_manifold", fground, DataMeaning("1").flagged({0, 1}, "no yes"));
  h5.write_strings(G + "/notes", r.flags.empty() ? std::vector<std::string>{"none"} : r.flags, "caveats of the gap search");
  if (!vectors.empty()) {
    // Layout documented in the user guide (gap, "Eigenvectors").
    const std::string V = G + "/eigenvectors";
    h5.group(V);
    h5.attribute(V, "basis",
                 "full computational basis: column b is the amplitude of |b>, bit i of b is qubit i (z_i; spin "
                 "s_i = 1 - 2 z_i); qubit 0 = bit 0");
    h5.attribute(V, "sector", sector_name(r.sector));
    h5.attribute(V, "sector_handling",
                 r.sector == SpinFlipSector::Full
                     ? std::string("computed in the full space")
                     : fmt::format("computed in the {} in sector coordinates, stored expanded to the full basis: "
                                   "v[b] = x_b/sqrt(2), v[~b] = {}x_b/sqrt(2) for representatives b < 2^(n-1); norm 1",
                                   describe_sector(r.sector), r.sector == SpinFlipSector::Even ? "+" : "-"));
    h5.attribute(V, "count", static_cast<long long>(vectors.size()));
    std::vector<double> vs;
    for (const auto& v : vectors) vs.push_back(v.s);
    h5.write(V + "/s", vs, "1");
    for (std::size_t i = 0; i < vectors.size(); ++i) {
      const auto& v = vectors[i];
      const std::string P = fmt::format("{}/{}", V, i);
      h5.group(P);
      h5.attribute(P, "s", v.s);
      h5.attribute(P, "a_ghz", v.a_ghz);
      h5.attribute(P, "b_ghz", v.b_ghz);
      h5.attribute(P, "at", first_at_s_star && i == 0 ? std::string("s_star") : std::string("requested s"));
      h5.write(P + "/energies", v.energies_ghz, "GHz");
      h5.write(P + "/residuals", v.residuals_ghz, "GHz");
      std::vector<long long> basis(v.dimension);
      for (std::size_t b = 0; b < v.dimension; ++b) basis[b] = static_cast<long long>(b);
      h5.write(P + "/basis_state", basis, DataMeaning("1").described("computational basis state b (bit i = qubit i)"));
      h5.write_matrix(P + "/vectors", v.vectors, v.energies_ghz.size(), v.dimension, "1",
                      {h5.level_axis(P, v.energies_ghz.size()), P + "/basis_state"});
      h5.attribute(P + "/vectors", "layout", "row j = level j (ascending energy), column b = basis state b");
    }
  }
  h5.commit();
}

}  // namespace gapwise
