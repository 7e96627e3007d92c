// The command line's number lists (value_lists.hpp): one grammar for every
// option that takes several numbers, and the shared check that output options
// refuse an empty path.
#include "cli/value_lists.hpp"

#include <algorithm>
#include <cerrno>
#include <cfloat>
#include <cmath>
#include <cstdlib>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "io/input_error.hpp"
#include "io/terminal_text.hpp"

namespace gapwise::cli {
namespace {

constexpr int kMaxCount = 10000;  // a longer list is a typo, not a study
const char* const kGrammar = "write a number such as 20, a list 10,20,50, or a range lin:FIRST:LAST:COUNT (evenly spaced) "
                             "or log:FIRST:LAST:COUNT (evenly spaced in log)";

SourcePlace place(const std::string& option) { return {option, 0, 0, option}; }

std::string trimmed(const std::string& s) {
  const auto a = s.find_first_not_of(" \t"), b = s.find_last_not_of(" \t");
  return a == std::string::npos ? std::string() : s.substr(a, b - a + 1);
}

/// One number; the refusals say what is wrong with it (not a number, not finite,
/// beyond what a double holds) and the fix.
double number(const std::string& x, const std::string& option, ListOf kind) {
  const std::string shown = terminal_text(x);
  if (x.empty()) throw InputError(place(option), "an item of the list is empty", kGrammar);
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(x.c_str(), &end);
  if (end != x.c_str() + x.size()) throw InputError(place(option), fmt::format("\"{}\" is not a number", shown), kGrammar);
  if (!std::isfinite(v) && errno != ERANGE)
    throw InputError(place(option), fmt::format("\"{}\" is not a finite number", shown), kGrammar);
  const bool durations = kind == ListOf::Durations;
  if (errno == ERANGE && std::fabs(v) > 1.0)
    throw InputError(place(option),
                     fmt::format("\"{}\" is too large for a double (the largest is about {:.2g})", shown, DBL_MAX),
                     durations ? "give a duration in ns below 1e9 (a second), e.g. 20"
                               : fmt::format("give a number below {:.2g} in magnitude", DBL_MAX));
  if (errno == ERANGE || (v != 0.0 && std::fabs(v) < DBL_MIN)) {
    if (durations)
      throw InputError(place(option),
                       fmt::format("{} ns is below the smallest duration gapwise accepts ({:.2g} ns, the smallest double "
                                   "held at full precision)",
                                   shown, DBL_MIN),
                       "give a duration of at least 1e-12 ns: every shorter run gives the sudden limit (the start state, "
                       "unchanged)");
    throw InputError(place(option),
                     fmt::format("\"{}\" is too small for a double: nonzero numbers below {:.2g} in magnitude lose their "
                                 "precision or become 0",
                                 shown, DBL_MIN),
                     fmt::format("write 0, or a number of magnitude at least {:.2g}", DBL_MIN));
  }
  return v;
}

std::vector<std::string> split(const std::string& text, char sep) {
  std::vector<std::string> out;
  std::size_t pos = 0;
  while (true) {
    const auto at = text.find(sep, pos);
    out.push_back(trimmed(text.substr(pos, at == std::string::npos ? std::string::npos : at - pos)));
    if (at == std::string::npos) return out;
    pos = at + 1;
  }
}

std::vector<double> spaced(double first, double last, int n, bool log) {
  std::vector<double> out;
  const double a = log ? std::log(first) : first, b = log ? std::log(last) : last;
  for (int k = 0; k < n; ++k) {
    const double x = n == 1 ? a : a + (b - a) * k / (n - 1);
    out.push_back(log ? std::exp(x) : x);
  }
  out.front() = first;  // the ends exactly as written
  if (n > 1) out.back() = last;
  return out;
}

/// "1, 10, 100, 1000" (the first three and the last when longer).
std::string preview(const std::vector<double>& v) {
  std::string s;
  for (std::size_t k = 0; k < v.size(); ++k) {
    if (v.size() > 4 && k == 3) { s += ", ..."; k = v.size() - 1; }
    s += (s.empty() ? "" : ", ") + fmt::format("{:.4g}", v[k]);
  }
  return s;
}

int whole_count(const std::string& x, const std::string& item, const std::string& option, const std::string& fix) {
  const double c = number(x, option, ListOf::Numbers);
  if (!(c >= 1) || c != std::floor(c) || c > kMaxCount)
    throw InputError(place(option),
                     fmt::format("count {} in \"{}\" is not a whole number from 1 to {}", x, terminal_text(item), kMaxCount),
                     fix);
  return static_cast<int>(c);
}

/// lin:FIRST:LAST:COUNT, log:FIRST:LAST:COUNT; a bare FIRST:LAST:COUNT is refused with both spellings.
std::vector<double> range(const std::string& item, const std::string& option, ListOf kind) {
  const std::vector<std::string> parts = split(item, ':');
  const std::string shown = terminal_text(item);
  const bool has_spacing = parts[0] == "lin" || parts[0] == "log";
  const std::size_t numbers = parts.size() - (has_spacing ? 1 : 0);
  if (numbers != 3)
    throw InputError(place(option), fmt::format("\"{}\" is neither a number nor a range", shown),
                     "write a range as lin:FIRST:LAST:COUNT or log:FIRST:LAST:COUNT, e.g. log:1:1000:4");
  if (!has_spacing) {
    // Say what the two spellings would give, so the choice is an informed one.
    std::string choices;
    try {
      const double first = number(parts[0], option, kind), last = number(parts[1], option, kind);
      const int n = whole_count(parts[2], item, option, "");
      choices = fmt::format("lin:{} (evenly spaced: {})", item, preview(spaced(first, last, n, false)));
      if (first > 0 && last > 0)
        choices += fmt::format(" or log:{} (evenly spaced in log: {})", item, preview(spaced(first, last, n, true)));
      else choices += fmt::format(" (log:{} needs FIRST and LAST above 0)", item);
    } catch (const InputError&) {
      choices = fmt::format("lin:{} or log:{}", shown, shown);
    }
    throw InputError(place(option), fmt::format("the range \"{}\" does not say how its values are spaced", shown),
                     "write " + choices);
  }
  const bool log = parts[0] == "log";
  const double first = number(parts[1], option, kind), last = number(parts[2], option, kind);
  const int n = whole_count(parts[3], item, option, fmt::format("write {}:FIRST:LAST:COUNT with a whole COUNT", parts[0]));
  if (log && !(first > 0 && last > 0))
    throw InputError(place(option), fmt::format("the log-spaced range \"{}\" needs FIRST and LAST above 0", shown),
                     fmt::format("start it above 0 (e.g. log:0.1:{}:{}), or write lin:{}:{}:{} for even spacing", parts[2],
                                 parts[3], parts[1], parts[2], parts[3]));
  return spaced(first, last, n, log);
}

}  // namespace

std::vector<double> parse_value_list(const std::string& given, const std::string& option, ListOf kind) {
  std::string text = given;  // a repeated option arrives joined by '\n'
  std::replace(text.begin(), text.end(), '\n', ',');
  if (trimmed(text).empty()) throw InputError(place(option), "no value given", kGrammar);
  std::vector<double> out;
  for (const std::string& item : split(text, ',')) {
    if (item.find(':') != std::string::npos) {
      for (double v : range(item, option, kind)) out.push_back(v);
    } else {
      out.push_back(number(item, option, kind));
    }
    if (out.size() > static_cast<std::size_t>(kMaxCount))
      throw InputError(place(option), fmt::format("the list holds more than {} values", kMaxCount),
                       "give fewer values: a longer list is a typo, not a study");
  }
  return out;
}

double parse_single_value(const std::string& text, const std::string& option, ListOf kind, const std::string& why,
                          const std::string& fix) {
  const std::vector<double> v = parse_value_list(text, option, kind);
  if (v.size() != 1)
    throw InputError(place(option), fmt::format("{} values given (\"{}\"), but {}", v.size(), terminal_text(text), why), fix);
  return v[0];
}

CLI::Option* add_list_option(CLI::App* sub, const std::string& names, std::string& text, const std::string& help) {
  // Join without a delimiter: with join(',') CLI11 also splits each value at the
  // commas and drops empty items, so "-d 1,,2" would pass silently. Repeated
  // options arrive joined by '\n', which parse_value_list reads as a comma.
  return sub->add_option(names, text, help)->multi_option_policy(CLI::MultiOptionPolicy::Join)->type_name("LIST");
}

CLI::Option* add_durations_option(CLI::App* sub, std::string& text, const std::string& help) {
  return add_list_option(sub, "-d,--durations", text, help);
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

}  // namespace gapwise::cli
