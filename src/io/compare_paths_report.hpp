#pragma once
// The report of `gapwise compare-paths`: the terminal table, the --json
// summary, the CSV table and the HDF5 result (format "gapwise-compare-paths" 1)
// of paths compared at equal total duration, with the same paths coupled to a
// bath when one was given (studies/open_path_comparison).
//
//   ComparePathsReport rep{...};   // files, the candidates, the comparison, the bath runs
//   std::cout << (json ? compare_paths_report_json(rep) : compare_paths_report_text(rep));
//   write_compare_paths_result("cmp.h5", rep, command_line);
#include <optional>
#include <string>
#include <vector>

#include "dynamics/ohmic_bath.hpp"
#include "problem/ising_problem.hpp"
#include "studies/local_adiabatic_schedule.hpp"
#include "studies/open_path_comparison.hpp"
#include "studies/shape_comparison.hpp"

namespace gapwise {

struct ComparePathsReport {
  std::string problem_file;                  ///< as given on the command line
  std::vector<std::string> schedule_files;   ///< as given on the command line
  double target_probability = 0;
  int levels = 0;                            ///< instantaneous levels followed
  const IsingProblem* problem = nullptr;
  const std::vector<ShapeCandidate>* candidates = nullptr;  ///< the paths, in the comparison's row order
  const ShapeComparison* comparison = nullptr;
  const LocalAdiabaticSchedule* local_adiabatic = nullptr;  ///< with --local-adiabatic, else nullptr
  const OpenPathComparison* open = nullptr;                 ///< with --bath, else nullptr
  const OhmicBath* bath = nullptr;                          ///< set exactly when `open` is
};

/// The table (one row per path and duration; p_bath and its TTS with a bath)
/// and the notes below it.
std::string compare_paths_report_text(const ComparePathsReport& r);
/// The same table as CSV.
std::string compare_paths_report_csv(const ComparePathsReport& r);
/// The --json summary (one object and a newline).
std::string compare_paths_report_json(const ComparePathsReport& r);
/// The HDF5 result, written atomically to `path`.
void write_compare_paths_result(const std::string& path, const ComparePathsReport& r, const std::string& command_line);

}  // namespace gapwise
