#pragma once
// The local adiabatic schedule of a problem: its spectrum along s (minimum-gap
// search, src/spectrum/gap_search.hpp), the local adiabatic path built from the
// gap and matrix element on that curve (src/schedule/local_adiabatic_path.hpp), and
// a Schedule with the base schedule's energy scales that can be written out and
// edited (format_schedule_toml).
//
//   LocalAdiabaticSchedule g = local_adiabatic_schedule(H, base_schedule, {}, {.waypoints = 200});
//   write_file_atomically("gap-path.toml", format_schedule_toml(g.schedule));
//   g.report.gap_ghz;  g.path.integral_ns;   // eps of a T ns run = integral_ns / T
#include "schedule/local_adiabatic_path.hpp"
#include "schedule/schedule.hpp"
#include "spectrum/gap_search.hpp"

namespace gapwise {

struct LocalAdiabaticSchedule {
  Schedule schedule;
  LocalAdiabaticPath path;
  MinimumGapReport report;
};

/// Throws InputError when the base schedule does not start at s = 0 in the
/// ground state (the path is a forward anneal over the range its scales cover).
LocalAdiabaticSchedule local_adiabatic_schedule(const TransverseIsingHamiltonian& h, const Schedule& base,
                                        const GapSearchOptions& search, const LocalAdiabaticOptions& options);

}  // namespace gapwise
