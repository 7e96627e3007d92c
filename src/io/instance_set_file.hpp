#pragma once
// Instance sets: many problems studied together. Two forms are read:
//
//  * a directory of gapwise problem files (*.toml, read in name order; each
//    instance is named by its file stem), for sets you assemble by hand;
//  * one HDF5 file (format "gapwise-instance-set", version 1), written by
//    `gapwise generate`, that also keeps each instance's seed, family and, for
//    planted instances, the known ground energy and a planted ground state.
//
// HDF5 layout (every name below is ours; documented in the user guide):
//   /                        @format = "gapwise-instance-set", @format_version = 1,
//                            @family, @family_seed (optional), @generator (settings, text)
//   /instance_names          [N] strings: the set order
//   /instances/<name>        @qubits, @offset, @description, @family,
//                            @seed, @planted_ground_energy, @planted_state (optional)
//   /instances/<name>/fields          [n]  h_i
//   /instances/<name>/coupling_i      [m]  first qubit  (i < j)
//   /instances/<name>/coupling_j      [m]  second qubit
//   /instances/<name>/coupling_value  [m]  J_ij
//   /provenance              tool, version, command line
//
//   InstanceSet set = read_instance_set("spin-glasses.h5");      // or a directory
//   InstanceSet same = parse_instance_set_bytes(bytes, "spin-glasses.h5");
//   write_instance_set("copy.h5", set, "gapwise generate ...");
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "problem/instance_families.hpp"

namespace gapwise {

struct InstanceSet {
  std::string source;                       ///< path it was read from
  std::string family;                       ///< "" when mixed or unknown
  std::optional<std::uint64_t> family_seed;
  std::string generator;                    ///< generator settings as text ("" when unknown)
  std::vector<Instance> instances;

  /// 16 hex digits: FNV-1a over every instance's name, size, fields, couplings and
  /// offset (exact bit patterns), in set order. Two sets with the same
  /// fingerprint hold the same problems; results and journals record it.
  std::string fingerprint() const;
};

/// A directory of *.toml problem files, or an HDF5 instance-set file.
InstanceSet read_instance_set(const std::string& path);
/// An HDF5 instance-set file held in memory; `name` is used in messages.
InstanceSet parse_instance_set_bytes(std::string_view bytes, const std::string& name);

/// Atomic: the target appears complete or not at all.
void write_instance_set(const std::string& path, const InstanceSet& set, const std::string& command_line);
/// One problem file per instance, <dir>/<name>.toml (dir is created if missing).
void write_instance_directory(const std::string& dir, const InstanceSet& set);

}  // namespace gapwise
