#include "io/input_error.hpp"

#include <fmt/format.h>

#include "io/terminal_text.hpp"

namespace gapwise {

std::string format_input_error(const SourcePlace& place, const std::string& problem,
                               const std::string& fix) {
  // Without a file the place is a command-line option (its key, "--name"); a
  // bare "<input>" is left only for text parsed from memory without a name.
  std::string where = !place.file.empty() ? place.file : place.key.rfind("--", 0) == 0 ? place.key : std::string("<input>");
  where = terminal_text(where);  // file names and keys are user text: no control characters reach the terminal
  if (place.line > 0) where += fmt::format(":{}", place.line);
  if (place.line > 0 && place.column > 0) where += fmt::format(":{}", place.column);
  std::string msg = where + ": ";
  // An option named as the place is not named again as its key ("--range: key '--range':").
  const bool key_is_place = (place.file.empty() || place.file == place.key) && place.line <= 0 && place.key.rfind("--", 0) == 0;
  if (!place.key.empty() && !key_is_place) msg += fmt::format("key '{}': ", terminal_text(place.key));
  msg += terminal_text(problem, true);
  if (!fix.empty()) msg += ". Fix: " + terminal_text(fix, true);
  return msg;
}

InputError::InputError(SourcePlace place, std::string problem, std::string fix)
    : std::runtime_error(format_input_error(place, problem, fix)),
      place_(std::move(place)),
      problem_(std::move(problem)),
      fix_(std::move(fix)) {}

}  // namespace gapwise
