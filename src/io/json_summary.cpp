#include "io/json_summary.hpp"

#include <cmath>
#include <sstream>
#include <stdexcept>

namespace gapwise {

void put(toml::table& t, std::string_view key, double value) {
  if (!std::isfinite(value))
    throw std::runtime_error("refusing to write a non-finite number into JSON key '" + std::string(key) + "'");
  t.insert_or_assign(key, value);
}

std::string to_json(const toml::table& t) {
  std::ostringstream os;
  os << toml::json_formatter{t};
  return os.str();
}

}  // namespace gapwise
