#pragma once
// JSON summaries for scripts (`--json`), built as a toml++ table and printed
// with toml++'s JSON formatter (no extra dependency). Keys carry their units
// (duration_ns, gap_ghz). Non-finite numbers are refused so output stays valid JSON.
//
//   toml::table j;
//   put(j, "ground_probability", 0.93);
//   std::cout << to_json(j) << "\n";
#define TOML_HEADER_ONLY 0
#include <string>

#include <toml++/toml.h>

namespace gapwise {

void put(toml::table& t, std::string_view key, double value);
inline void put(toml::table& t, std::string_view key, long long value) { t.insert_or_assign(key, value); }
inline void put(toml::table& t, std::string_view key, const std::string& value) { t.insert_or_assign(key, value); }
inline void put(toml::table& t, std::string_view key, bool value) { t.insert_or_assign(key, value); }
std::string to_json(const toml::table& t);

}  // namespace gapwise
