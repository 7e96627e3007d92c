// Number lists on the command line: "20,50,100" or a linear range "0.3:0.7:9"
// (first:last:count, both ends included); output options that refuse "".
#include <cmath>
#include <sstream>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "io/input_error.hpp"
#include "studies/duration_sweep.hpp"

namespace gapwise::cli {

std::vector<double> parse_value_list(const std::string& text, const std::string& option) {
  auto number = [&](const std::string& x) {
    try {
      std::size_t used = 0;
      const double v = std::stod(x, &used);
      if (used != x.size() || !std::isfinite(v)) throw std::invalid_argument(x);
      return v;
    } catch (const std::exception&) {
      throw InputError({option, 0, 0, option}, fmt::format("\"{}\" is not a number", x),
                       "write numbers like 0.45, a list 0.3,0.5 or a range FIRST:LAST:COUNT");
    }
  };
  std::vector<double> out;
  if (text.find(':') != std::string::npos) {
    const auto a = text.find(':'), b = text.find(':', a + 1);
    if (b == std::string::npos || text.find(':', b + 1) != std::string::npos)
      throw InputError({option, 0, 0, option}, fmt::format("\"{}\" is not a range", text), "write FIRST:LAST:COUNT, e.g. 0.3:0.7:9");
    const double first = number(text.substr(0, a)), last = number(text.substr(a + 1, b - a - 1));
    const double count = number(text.substr(b + 1));
    if (!(count >= 1) || count != std::floor(count) || count > 10000)
      throw InputError({option, 0, 0, option}, fmt::format("count {} in \"{}\" is not a whole number from 1 to 10000", count, text),
                       "write FIRST:LAST:COUNT with a whole COUNT");
    const int n = static_cast<int>(count);
    for (int k = 0; k < n; ++k) out.push_back(n == 1 ? first : first + (last - first) * k / (n - 1));
    if (n > 1) out.back() = last;
    return out;
  }
  std::size_t pos = 0;
  while (pos <= text.size()) {
    const auto comma = text.find(',', pos);
    out.push_back(number(text.substr(pos, comma == std::string::npos ? std::string::npos : comma - pos)));
    if (comma == std::string::npos) break;
    pos = comma + 1;
  }
  return out;
}

void refuse_empty_output_paths(CLI::App& app) {
  const CLI::Validator non_empty(
      [](std::string& path) -> std::string {
        return path.empty() ? "the path is empty (\"\"); give a file name, e.g. result.h5, or leave the option out" : "";
      },
      "", "non-empty path");
  for (CLI::App* sub : app.get_subcommands([](CLI::App*) { return true; }))
    for (const char* name : {"--out", "--csv", "--write-physical", "--out-dir"})
      if (CLI::Option* opt = sub->get_option_no_throw(name)) opt->check(non_empty);
}

std::vector<double> parse_log_range(const std::string& text, const std::string& option) {
  double first = 0, last = 0;
  long long count = 0;
  char c1 = 0, c2 = 0;
  std::istringstream in(text);
  if (!(in >> first >> c1 >> last >> c2 >> count) || c1 != ':' || c2 != ':' || !(in >> std::ws).eof())
    throw InputError({option, 0, 0, option}, fmt::format("cannot read the range '{}'", text),
                     fmt::format("write FIRST:LAST:COUNT in ns, e.g. {} 1:1000:13 (log-spaced, both ends included)", option));
  // The same cap as a linear range: a longer list is a typo, not a study.
  if (count < 1 || count > 10000)
    throw InputError({option, 0, 0, option}, fmt::format("count {} in \"{}\" is not a whole number from 1 to 10000", count, text),
                     "write FIRST:LAST:COUNT with a whole COUNT");
  try {
    return log_spaced_durations(first, last, static_cast<int>(count));
  } catch (const InputError& e) {
    throw InputError({option, 0, 0, option}, e.problem(), e.fix());
  }
}

}  // namespace gapwise::cli
