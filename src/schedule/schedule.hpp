#pragma once
// A schedule: energy scales, the shape of the path s(t), its default duration
// and the start state. The path for a run of a given duration is the shape
// stretched to that duration, so one schedule serves a whole duration sweep.
//
//   Schedule sch = read_schedule_file("schedules/linear.toml");
//   AnnealPath path = sch.path_for(100.0);            // 100 ns
//   AnnealPath def  = sch.path_for(std::nullopt);     // the file's own duration
#include <optional>
#include <string>
#include <vector>

#include "io/input_error.hpp"
#include "problem/ising_problem.hpp"
#include "schedule/anneal_path.hpp"
#include "schedule/energy_scales.hpp"
#include "schedule/path_shapes.hpp"

namespace gapwise {

/// Largest energy scale (GHz) a schedule may give. Superconducting annealers
/// work at a few to tens of GHz (common knowledge of the trade); 1000 GHz is far
/// beyond and catches unit slips (Hz or MHz typed as GHz).
inline constexpr double kMaxEnergyScaleGhz = 1000.0;
/// Longest anneal (ns) gapwise accepts: one second. Longer runs would take
/// ~1e10 integrator steps; a larger value is a unit slip.
inline constexpr double kMaxDurationNs = 1e9;

/// The one check of a run's duration, shared by the schedule reader, the
/// writers of schedule files and -d, --durations overrides: finite, > 0 and at most
/// kMaxDurationNs, else InputError at `place`.
void check_duration_ns(double duration_ns, const SourcePlace& place);

enum class StartKind {
  Ground,     ///< ground state of H(s) at the path's first s (|+>^n for a forward anneal)
  Classical,  ///< a computational basis state given by the user (reverse anneals)
};

struct StartSpec {
  StartKind kind = StartKind::Ground;
  std::vector<int> bits;  ///< qubit 0 first, for Classical
};

struct Schedule {
  EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  AnnealPath shape{{{0.0, 0.0}, {1.0, 1.0}}};  ///< t in ns, or in fractions of the duration
  bool time_in_ns = false;
  std::optional<double> duration_ns;  ///< default duration (required to run when times are fractions)
  StartSpec start;
  /// Set when the file described the path by shape tables ([path.pause],
  /// [path.quench], [path.reverse]) rather than waypoints; `shape` holds the
  /// waypoints generated from it either way.
  std::optional<PathShapeSpec> shape_spec;
  std::string description;
  std::string source;  ///< file name it came from, for messages
  /// Where the file describes the path (`path.points` or the shape table, e.g.
  /// `path.reverse`) and the start state (`path.start`/`path.start_bits`), with
  /// lines, so that commands refusing a schedule can point at the right key.
  /// Empty keys when the schedule was not read from a file.
  SourcePlace path_place, start_place;
  /// path_place with the file name, and "path.points" when the key is unknown.
  SourcePlace path_file_place() const;

  /// Path for a run; `duration_ns` overrides the schedule's own. Throws InputError
  /// when no duration is known.
  AnnealPath path_for(std::optional<double> duration_ns) const;
};

/// The start basis state for a Classical start; throws InputError when the bit
/// count does not match the problem.
BasisIndex start_basis_state(const Schedule& schedule, int qubits);

}  // namespace gapwise
