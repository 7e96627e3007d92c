#pragma once
// The report of `gapwise durations`: the terminal text and the --json summary
// of a finished duration study (studies/duration_study), with the predictions
// judged against the simulation. The command line gathers the pieces in a
// DurationReport and prints one of the two.
//
//   DurationReport rep{opts, &setup, &study, predictions, grid, grid_chosen, &evaluator.known()};
//   if (json) print_duration_report_json(rep, std::cout); else print_duration_report_text(rep, std::cout);
#include <cstddef>
#include <map>
#include <ostream>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "studies/anneal_predictions.hpp"
#include "studies/duration_study.hpp"

namespace gapwise {

/// What the user asked for, as the report names it.
struct DurationReportOptions {
  std::string problem, schedule, propagator, out, csv;
  double target = 0, tolerance = 0, agreement = 0;
  bool p_only = false;
};

struct DurationReport {
  DurationReportOptions o;
  const AnnealSetup* setup = nullptr;
  const Schedule* schedule = nullptr;
  const DurationStudy* study = nullptr;
  const AnnealPredictions* predictions = nullptr;  ///< nullptr under --no-predictions
  std::vector<double> grid;                         ///< the grid durations as finally simulated
  bool grid_chosen = false;                         ///< the default grid (not --durations)
  const std::map<double, DurationPoint>* known = nullptr;  ///< every simulated point
  double p_noise = 0;                               ///< 1 - p is known to about this
  int threads = 1;
  std::size_t simulated = 0;                        ///< points simulated by this run (the rest reused)
  std::string journal_path;                         ///< "" when no journal is kept
  bool with_bath = false;                           ///< --bath: open_text / open_json hold its section
  std::string open_text;
  toml::table open_json;
};

void print_duration_report_json(const DurationReport& r, std::ostream& os);
void print_duration_report_text(const DurationReport& r, std::ostream& os);

}  // namespace gapwise
