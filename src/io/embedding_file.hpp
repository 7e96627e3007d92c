#pragma once
// The gapwise embedding file (TOML, format_version 1): for each logical qubit
// of a problem, its chain of physical qubits; optionally the physical couplers
// that exist, a default chain strength and the device's term limit. Key by key
// in notebooks-free-docs/user-guide.md ("Embedding file"). Example:
//
//   format = "gapwise-embedding"
//   format_version = 1
//   description = "triangle on a six-qubit ring"
//   chains = [[0, 1], [2, 3], [4, 5]]        # chain of logical qubit 0, 1, 2
//   couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 0]]   # optional
//   chain_strength_relative = 2.0            # or chain_strength = 1.5 (absolute)
//   term_limit = 1.0                         # optional: largest |h|, |J| accepted
//
//   Embedding e = read_embedding_file("ring-embedding.toml");   // validated
//   check_embedding_serves(e, logical, "triangle.toml");
#include <string>
#include <string_view>

#include "problem/embedding.hpp"

namespace gapwise {

/// Parses and validates (validate_embedding) an embedding; every problem is an
/// InputError naming file, line, key and the fix. `name` stands for the file
/// name in messages (for tests and fuzzing).
Embedding parse_embedding_text(std::string_view text, const std::string& name);
Embedding read_embedding_file(const std::string& path);

}  // namespace gapwise
