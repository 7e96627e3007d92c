#include "studies/gap_adapted_schedule.hpp"

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

GapAdaptedSchedule gap_adapted_schedule(const TransverseIsingHamiltonian& h, const Schedule& base,
                                        const GapSearchOptions& search, const GapAdaptedOptions& options) {
  if (base.start.kind != StartKind::Ground)
    throw InputError({base.source, 0, 0, "path.start"}, "a gap-adapted path is a forward anneal from the ground state",
                     "use a forward schedule (start = \"ground\") as the base");
  GapAdaptedSchedule out;
  out.report = find_minimum_gap(h, base.scales, search);
  GapProfile prof;
  for (const SpectrumPoint& p : out.report.curve) {
    if (!prof.s.empty() && !(p.s > prof.s.back())) continue;
    prof.s.push_back(p.s);
    prof.gap_ghz.push_back(p.gap_ghz);
    prof.matrix_element_ghz.push_back(p.matrix_element_ghz);
  }
  out.path = gap_adapted_path(prof, options);
  out.schedule.scales = base.scales;
  out.schedule.shape = out.path.shape;
  out.schedule.time_in_ns = false;
  out.schedule.duration_ns = base.duration_ns;
  out.schedule.start = {};
  out.schedule.source = base.source;
  out.schedule.description = fmt::format(
      "gap-adapted path (local adiabatic condition, ds/dt ~ Delta^2/|M|): Delta_min = {:.6g} GHz at s = {:.6g}, "
      "I = {:.6g} ns",
      out.report.gap_ghz, out.report.s_star, out.path.integral_ns);
  return out;
}

}  // namespace gapwise
