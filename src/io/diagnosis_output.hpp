#pragma once
// The diagnosis as a readable ranked report, as JSON, and as an HDF5 file.
// Layout of the HDF5 file and the meaning of every field: user guide,
// section "diagnose".
//
//   Diagnosis d = diagnose_anneal(problem, schedule, options);
//   std::cout << diagnosis_report_text(d, context);
//   std::cout << to_json(diagnosis_json(d, context)) << "\n";
//   write_diagnosis_hdf5(d, context, "why.h5");
#include <functional>
#include <string>
#include <vector>

#include "io/hdf5_output.hpp"

#include "io/json_summary.hpp"
#include "studies/loss_diagnosis.hpp"

namespace gapwise {

/// What the report says about the inputs.
struct DiagnosisContext {
  std::string problem_file, schedule_file, command_line;
  int qubits = 0;
  std::string schedule_description;
};

std::string diagnosis_report_text(const Diagnosis& d, const DiagnosisContext& c);
toml::table diagnosis_json(const Diagnosis& d, const DiagnosisContext& c);
/// Atomic (temporary file renamed on success), with provenance. `extra`, when
/// given, adds groups of its own (e.g. diagnose --bath's /thermal) before commit.
void write_diagnosis_hdf5(const Diagnosis& d, const DiagnosisContext& c, const std::string& path,
                          const std::function<void(Hdf5Output&)>& extra = {});

/// The overlap track as the columns of /diagnosis/overlap (the file and the
/// Python module read them from here): matrices row-major, points x `levels`,
/// NaN where a level is not tracked at that s.
struct OverlapColumns {
  std::size_t levels = 0;
  std::vector<double> s, ground_weight, energy, dominant_excited_weight, perturbative_crossing_s;
};
OverlapColumns overlap_columns(const Diagnosis& d);

/// The crossings as the columns of /diagnosis/crossings: one entry per
/// crossing, matrices row-major crossings x durations; NaN where a number does
/// not apply (end gaps have no Landau-Zener numbers; crossings not checked by a
/// simulation have no check probability); -1: no perturbative crossing.
struct CrossingColumns {
  std::vector<long long> crossing, perturbative_crossing_index, end_gap, broad, check_run;
  std::vector<double> s_star, delta_min, diabatic_slope, landau_zener_duration, check_ground_probability,
      check_transferred;
  std::vector<double> population_before, population_after, transferred, landau_zener_loss;
};
CrossingColumns crossing_columns(const Diagnosis& d);

}  // namespace gapwise
