#pragma once
// The gapwise schedule file (TOML, format_version 1). Key by key in
// notebooks-free-docs/user-guide.md. Example (a mid-anneal pause):
//
//   format = "gapwise-schedule"
//   format_version = 1
//   [scales]
//   kind = "linear"          # A(s) = a_max_ghz (1 - s), B(s) = b_max_ghz s
//   a_max_ghz = 5.0
//   b_max_ghz = 5.0
//   [path]
//   time = "fraction"        # or "ns"
//   duration_ns = 100
//   points = [[0, 0], [0.4, 0.45], [0.6, 0.45], [1, 1]]   # [time, s]
//
//   Schedule s = read_schedule_file("pause.toml");
#include <string>
#include <string_view>

#include "schedule/schedule.hpp"

namespace gapwise {

Schedule read_schedule_file(const std::string& path);
Schedule parse_schedule_text(std::string_view text, const std::string& name);
/// A schedule in the same format (for generated paths the user can edit and reuse).
std::string format_schedule_toml(const Schedule& schedule);

}  // namespace gapwise
