#pragma once
// Result files of the anneal-time study (`gapwise durations`): HDF5 with every
// curve, the inputs and the tool version, and CSV with one row per simulated
// duration. Both are rewritten atomically after each finished point, so the
// file on disk is always complete for the points done so far (attribute
// `complete` = 0 until the study ends). Layout in notebooks-free-docs/user-guide.md.
//
//   DurationStudyInputs in{...};
//   write_duration_study_hdf5("run.h5", in, evaluator.known(), nullptr);   // partial
//   write_duration_study_hdf5("run.h5", in, evaluator.known(), &study);    // final
//   write_file_atomically("run.csv", duration_points_table(in, evaluator.known(), &study).csv());
#include <map>
#include <string>
#include <vector>

#include "io/text_table.hpp"
#include "studies/anneal_predictions.hpp"
#include "studies/duration_study.hpp"
#include "studies/open_duration_scan.hpp"

namespace gapwise {

struct DurationStudyInputs {
  std::string problem_file, schedule_file, command_line;
  std::string propagator;
  double tolerance = 0;
  bool p_only = false;  ///< only p held to the tolerance (--p-only)
  double target = kDefaultTargetProbability;
  std::vector<double> grid_ns;     ///< the sampled grid (ascending)
  const AnnealSetup* setup = nullptr;
  const AnnealPredictions* predictions = nullptr;  ///< null when not computed
  double agreement_factor = kDefaultAgreementFactor;  ///< see judge_prediction
  double agreement_floor = 1e-5;                      ///< accuracy of the simulated 1 - p
  /// `durations --bath`: the bath and the open-system anneal at each grid
  /// duration (null without a bath, or before the open-system runs are done).
  const OhmicBath* bath = nullptr;
  const std::vector<OpenDurationPoint>* open_rows = nullptr;
};

/// The needed duration's status as the result file (and the Python module) spells it:
/// "reached", "reached at the shortest duration", "not reached".
const char* needed_status_name(NeededStatus status);

void write_duration_study_hdf5(const std::string& path, const DurationStudyInputs& in,
                               const std::map<double, DurationPoint>& known, const DurationStudy* finished);

/// One row per known duration (grid points and bisection probes), ascending:
/// duration_ns, kind (grid/probe), ground_probability, tts_ns, repetitions,
/// tts_case, p_landau_zener, p_adiabatic, norm_drift, steps, wall_seconds; with
/// in.open_rows also p_bath and tts_bath_ns (empty for bisection probes, which
/// are not run with the bath).
TextTable duration_points_table(const DurationStudyInputs& in, const std::map<double, DurationPoint>& known);

}  // namespace gapwise
