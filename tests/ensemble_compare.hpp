#pragma once
// Test helper: are two ensemble result files the same study result, bit for bit?
// Compares every dataset under /ensemble (per-instance records and per-size
// tables) and the identifying attributes; /timing and /provenance may differ.
#include <string>
#include <vector>

#include <fmt/format.h>

#include "io/hdf5_input.hpp"

namespace gapwise::testing {

/// "" when equal, else the first difference found.
inline std::string ensemble_difference(const std::string& a_path, const std::string& b_path) {
  const Hdf5Input a(a_path), b(b_path);
  for (const std::string group : {"/ensemble", "/ensemble/instances", "/ensemble/by_size"}) {
    const auto names = a.members(group);
    if (names != b.members(group)) return group + ": different members";
    for (const auto& n : names) {
      const std::string path = group + "/" + n;
      if (n == "instances" || n == "by_size" || n == "bath") continue;  // groups (bath: attributes only)
      if (n == "name" || n == "propagator_used") {  // string datasets
        if (a.read_strings(path) != b.read_strings(path)) return path + " differs";
        continue;
      }
      const auto x = a.read(path), y = b.read(path);
      if (x.size() != y.size()) return path + ": different lengths";
      for (std::size_t k = 0; k < x.size(); ++k)
        if (x[k] != y[k]) return fmt::format("{}[{}]: {:.17g} != {:.17g}", path, k, x[k], y[k]);
    }
  }
  for (const char* attr : {"set_fingerprint", "numerics_fingerprint", "schedule_text", "propagator"})
    if (a.attribute_string("/ensemble", attr) != b.attribute_string("/ensemble", attr))
      return std::string("/ensemble@") + attr + " differs";
  for (const char* attr : {"target_probability", "tolerance", "confidence_level", "gap_s_tolerance"})
    if (a.attribute_double("/ensemble", attr) != b.attribute_double("/ensemble", attr))
      return std::string("/ensemble@") + attr + " differs";
  return "";
}

}  // namespace gapwise::testing
