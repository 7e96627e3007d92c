#pragma once
// The one grammar of number lists on gapwise's command line (user guide,
// "Command-line grammar"), parsed here and nowhere else:
//
//   LIST  = ITEM[,ITEM...]            an option taking a LIST may also be repeated: -d 5 -d 10 is -d 5,10
//   ITEM  = NUMBER                    0.45, 20, 1e3
//         | lin:FIRST:LAST:COUNT      COUNT values evenly spaced, both ends included
//         | log:FIRST:LAST:COUNT      COUNT values evenly spaced in log, both ends included (FIRST, LAST > 0)
//
// A bare FIRST:LAST:COUNT is refused: the message shows what both spellings
// would give, since 1:1000:4 is 1, 10, 100, 1000 in log and 1, 334, 667, 1000 in lin.
//
//   std::vector<double> t = parse_value_list("log:1:1000:4,2000", "--durations", ListOf::Durations);
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

namespace gapwise::cli {

/// What a list holds; refusals of durations speak of ns and the sudden limit.
enum class ListOf { Numbers, Durations };

/// Parses a LIST (see above); InputError naming `option` for anything else.
std::vector<double> parse_value_list(const std::string& text, const std::string& option, ListOf kind = ListOf::Numbers);

/// A LIST option of a command that runs one value: the single value, or an
/// InputError that says why one (`why`) and what to do instead (`fix`).
double parse_single_value(const std::string& text, const std::string& option, ListOf kind, const std::string& why,
                          const std::string& fix);

/// Registers a LIST option (repeats join with commas). `names` e.g. "-d,--durations".
CLI::Option* add_list_option(CLI::App* sub, const std::string& names, std::string& text, const std::string& help);
/// `-d, --durations LIST`: durations in ns, the one name in every command.
CLI::Option* add_durations_option(CLI::App* sub, std::string& text, const std::string& help);

}  // namespace gapwise::cli
