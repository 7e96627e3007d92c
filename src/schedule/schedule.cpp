#include "schedule/schedule.hpp"

#include <cmath>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

void check_duration_ns(double d, const SourcePlace& place) {
  if (!std::isfinite(d))
    throw InputError(place, fmt::format("duration {} ns is not a finite number", d), "give a duration > 0 ns");
  if (!(d > 0.0)) throw InputError(place, fmt::format("duration {} ns is not positive", d), "give a duration > 0 ns");
  if (d > kMaxDurationNs)
    throw InputError(place,
                     fmt::format("duration {} ns is longer than the {:g} ns (one second) gapwise simulates", d,
                                 kMaxDurationNs),
                     "check the unit: durations are in ns");
}

SourcePlace Schedule::path_file_place() const {
  SourcePlace p = path_place;
  p.file = source;
  if (p.key.empty()) p.key = "path.points";
  return p;
}

AnnealPath Schedule::path_for(std::optional<double> d) const {
  if (d) {
    check_duration_ns(*d, {source, 0, 0, "duration_ns"});
    try {
      return shape.scaled_to(*d);
    } catch (const InputError& e) {  // waypoints that a tiny duration cannot keep apart
      throw InputError({source, 0, 0, e.place().key}, e.problem(), e.fix());
    }
  }
  if (time_in_ns) return shape;
  if (duration_ns) return shape.scaled_to(*duration_ns);
  throw InputError({source, 0, 0, "path.duration_ns"},
                   "the path's times are fractions of the duration, but no duration is given",
                   "pass --durations (-d) or add `duration_ns = <ns>` to [path]");
}

BasisIndex start_basis_state(const Schedule& schedule, int qubits) {
  const auto& bits = schedule.start.bits;
  if (static_cast<int>(bits.size()) != qubits)
    throw InputError({schedule.source, 0, 0, "path.start_bits"},
                     fmt::format("start_bits has {} entries but the problem has {} qubits", bits.size(), qubits),
                     "give one bit (0 or 1) per qubit, qubit 0 first");
  BasisIndex b = 0;
  for (int i = 0; i < qubits; ++i)
    if (bits[static_cast<std::size_t>(i)]) b |= BasisIndex{1} << i;
  return b;
}

}  // namespace gapwise
