#pragma once
// The report of `gapwise gap`: the plan line printed before the search, the
// terminal text and the --json summary of the minimum-gap search
// (spectrum/gap_search), and the scanned curve as a table (--csv). The HDF5
// result is io/gap_result_file.
//
//   const GapReportInputs in{o.problem, o.schedule, &problem, &schedule.scales};
//   std::cout << (json ? gap_report_json(in, r) : gap_report_text(in, r));
#include <string>

#include "io/text_table.hpp"
#include "problem/ising_problem.hpp"
#include "schedule/energy_scales.hpp"
#include "spectrum/gap_search.hpp"

namespace gapwise {

/// What the report names: the files as given ("" schedule: the default scales).
struct GapReportInputs {
  std::string problem_file, schedule_file;
  const IsingProblem* problem = nullptr;
  const EnergyScales* scales = nullptr;
};

/// "plan  N qubits, sector (dimension D), K levels, solver; memory about ..." (one line).
std::string gap_plan_text(const IsingProblem& problem, const GapSearchPlan& plan);
/// The terminal report: problem, scales, sector, scan, minimum gap with its
/// definition, the adiabatic time scale, local minima, levels at the end, notes.
std::string gap_report_text(const GapReportInputs& in, const MinimumGapReport& r);
/// The --json summary (one object and a newline).
std::string gap_report_json(const GapReportInputs& in, const MinimumGapReport& r);
/// The scanned curve, one row a point (s, A, B, levels, gaps, matrix elements,
/// error bound, origin; the other sector's levels when computed): --csv.
TextTable gap_curve_table(const MinimumGapReport& r);

}  // namespace gapwise
