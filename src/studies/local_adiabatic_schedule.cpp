#include "studies/local_adiabatic_schedule.hpp"

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

LocalAdiabaticSchedule local_adiabatic_schedule(const TransverseIsingHamiltonian& h, const Schedule& base,
                                        const GapSearchOptions& search, const LocalAdiabaticOptions& options) {
  if (base.start.kind != StartKind::Ground)
    throw InputError({base.source, 0, 0, "path.start"}, "a local adiabatic schedule is a forward anneal from the ground state",
                     "use a forward schedule (start = \"ground\") as the base");
  LocalAdiabaticSchedule out;
  out.report = find_minimum_gap(h, base.scales, search);
  GapProfile prof;
  for (const SpectrumPoint& p : out.report.curve) {
    if (!prof.s.empty() && !(p.s > prof.s.back())) continue;
    prof.s.push_back(p.s);
    prof.gap_ghz.push_back(p.gap_ghz);
    prof.matrix_element_ghz.push_back(p.matrix_element_ghz);
  }
  out.path = local_adiabatic_path(prof, options);
  out.schedule.scales = base.scales;
  out.schedule.shape = out.path.shape;
  out.schedule.time_in_ns = false;
  out.schedule.duration_ns = base.duration_ns;
  out.schedule.start = {};
  out.schedule.source = base.source;
  out.schedule.description = fmt::format(
      "local adiabatic schedule (ds/dt ~ Delta^2/|M|): Delta_min = {:.6g} GHz at s = {:.6g}, "
      "I = {:.6g} ns",
      out.report.gap_ghz, out.report.s_star, out.path.integral_ns);
  return out;
}

}  // namespace gapwise
