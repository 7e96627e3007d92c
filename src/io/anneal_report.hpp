#pragma once
// The report of `gapwise anneal`: the terminal text, the --json summary, the
// trace as CSV and the HDF5 result file (format "gapwise-anneal" 1) of one
// anneal with its accuracy checks. The command line gathers the pieces in an
// AnnealReport and hands it to the writers it was asked for.
//
//   AnnealReport rep{...};   // files, settings, the run and its observers
//   std::cout << (json ? anneal_report_json(rep) : anneal_report_text(rep));
//   write_file_atomically(csv, anneal_trace_table(rep).csv());
//   write_anneal_result("run.h5", rep, command_line);
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "dynamics/anneal_observer.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/level_population_observer.hpp"
#include "hamiltonian/spin_flip_sector.hpp"
#include "io/hdf5_output.hpp"
#include "io/text_table.hpp"
#include "schedule/schedule.hpp"

namespace gapwise {

struct AnnealReport {
  std::string problem_file, schedule_file;          ///< as given on the command line
  double tolerance = 0;
  bool p_only = false;
  int levels = 0;                                    ///< --levels: populations per observation (0: none)
  bool observed = false;                             ///< --observe-s was given
  const IsingProblem* problem = nullptr;
  const Schedule* schedule = nullptr;
  const AnnealPath* path = nullptr;
  const GroundManifold* ground = nullptr;
  const AnnealResult* result = nullptr;
  std::optional<double> delta_p;                     ///< |dp| of the check at tolerance/10 (none: --no-check)
  bool accuracy_ok = true;                           ///< every accuracy check passed
  const std::vector<TraceObserver::Row>* trace = nullptr;
  std::vector<LevelPopulationObserver::Row> level_rows;  ///< one per requested observation when levels > 0
  SpinFlipSector sector = SpinFlipSector::Full;      ///< where the level populations were taken
  /// --bath: the open-system section of each output (filled by the command).
  bool with_bath = false;
  std::string open_text;
  toml::table open_json;
  std::function<void(Hdf5Output&)> write_open_hdf5;
};

/// The terminal report: problem, schedule, path, propagator, p and its checks,
/// the most probable outcomes and the requested observations.
std::string anneal_report_text(const AnnealReport& a);
/// The --json summary (one object and a newline).
std::string anneal_report_json(const AnnealReport& a);
/// The trace: t, s, p_ground, energy, norm (and `requested` with --observe-s): --csv.
TextTable anneal_trace_table(const AnnealReport& a);
/// The HDF5 result, written atomically to `path`.
void write_anneal_result(const std::string& path, const AnnealReport& a, const std::string& command_line);

}  // namespace gapwise
