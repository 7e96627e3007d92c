#include "io/input_error.hpp"

#include <fmt/format.h>

namespace gapwise {

std::string format_input_error(const SourcePlace& place, const std::string& problem,
                               const std::string& fix) {
  std::string where = place.file.empty() ? std::string("<input>") : place.file;
  if (place.line > 0) where += fmt::format(":{}", place.line);
  if (place.line > 0 && place.column > 0) where += fmt::format(":{}", place.column);
  std::string msg = where + ": ";
  if (!place.key.empty()) msg += fmt::format("key '{}': ", place.key);
  msg += problem;
  if (!fix.empty()) msg += ". Fix: " + fix;
  return msg;
}

InputError::InputError(SourcePlace place, std::string problem, std::string fix)
    : std::runtime_error(format_input_error(place, problem, fix)),
      place_(std::move(place)),
      problem_(std::move(problem)),
      fix_(std::move(fix)) {}

}  // namespace gapwise
