#pragma once
// The report of `gapwise pause-map`: the terminal tables, the --json summary
// and the HDF5 result (format "gapwise-pause-map" 1) of a pause map, with the
// same map with a bath when one was given (studies/open_pause_map).
//
//   PauseMapReport rep{...};   // files, settings, the map, the map with the bath
//   std::cout << (json ? pause_map_report_json(rep) : pause_map_report_text(rep));
//   write_pause_map_result("map.h5", rep, command_line);
#include <string>

#include "problem/ising_problem.hpp"
#include "studies/open_pause_map.hpp"
#include "studies/shape_maps.hpp"

namespace gapwise {

struct PauseMapReport {
  std::string problem_file, schedule_file, out;  ///< as given on the command line
  std::string journal_file;                      ///< where finished points were read back from
  double tolerance = 0;
  const IsingProblem* problem = nullptr;
  const PauseMap* map = nullptr;       ///< its options hold the grid, the cost and the target
  const OpenPauseMap* open = nullptr;  ///< with --bath (open->bath set), else nullptr
};

/// The table of p (rows: pause location, columns: pause length, first row the
/// unpaused reference), the best pause and its TTS; with the bath the same again.
std::string pause_map_report_text(const PauseMapReport& r);
/// The --json summary (one object and a newline).
std::string pause_map_report_json(const PauseMapReport& r);
/// The HDF5 result (heat-map ready), written atomically to `path`.
void write_pause_map_result(const std::string& path, const PauseMapReport& r, const std::string& command_line);

}  // namespace gapwise
