// One command-line grammar (user guide, "Command-line grammar"): every option of
// every subcommand's --help is checked against the guide's table of option
// names and meanings. An option missing from the table, a command the table
// does not list for it, a short name other than the table's, a table row for an
// option a command does not have, or one name in two rows (two meanings) fails.
// Also the grammar of number lists itself (lin:/log: ranges, repeats, refusals)
// and help wrapped to the terminal width. The rules are the project's own
// design; evenly spaced and log-spaced grids with both ends included are common
// practice (numpy.linspace / numpy.logspace behave the same way).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <map>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "cli/value_lists.hpp"
#include "io/input_error.hpp"
#include "io/toml_reader.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::run_gapwise;
using testing::TempDir;

namespace {

struct Row {
  std::string short_name, long_name;
  std::set<std::string> commands;
};

/// The message of the InputError `f` throws, or a text no check matches.
template <class F>
std::string message_of(F&& f) {
  const auto e = testing::input_error_of(std::forward<F>(f));
  return e ? std::string(e->what()) : std::string("<no InputError>");
}

std::string trim(const std::string& s) {
  const auto a = s.find_first_not_of(' '), b = s.find_last_not_of(' ');
  return a == std::string::npos ? "" : s.substr(a, b - a + 1);
}

/// The table under "**Every option, one meaning.**" in the user guide.
std::vector<Row> documented_options() {
  const std::string guide = read_text_file((testing::source_dir() / "notebooks-free-docs/user-guide.md").string());
  const auto at = guide.find("**Every option, one meaning.**");
  REQUIRE(at != std::string::npos);
  std::istringstream in(guide.substr(at));
  std::vector<Row> rows;
  bool in_table = false;
  for (std::string line; std::getline(in, line);) {
    if (line.rfind("| `", 0) != 0) {
      if (in_table && line.rfind("|", 0) != 0) break;
      continue;
    }
    in_table = true;
    std::vector<std::string> cells;
    std::size_t pos = 1;
    for (auto bar = line.find(" | ", pos); bar != std::string::npos; bar = line.find(" | ", pos)) {
      cells.push_back(trim(line.substr(pos, bar - pos)));
      pos = bar + 3;
    }
    cells.push_back(trim(line.substr(pos, line.rfind(" |") - pos)));
    REQUIRE(cells.size() == 3);
    Row r;
    std::string names = cells[0];
    names.erase(std::remove(names.begin(), names.end(), '`'), names.end());
    const auto comma = names.find(", ");
    if (comma != std::string::npos) {
      r.short_name = names.substr(0, comma);
      r.long_name = names.substr(comma + 2);
    } else {
      r.long_name = names;
    }
    std::istringstream cmds(cells[2]);
    for (std::string c; std::getline(cmds, c, ',');) r.commands.insert(trim(c));
    rows.push_back(r);
  }
  return rows;
}

/// Option names in a --help text: {long name -> short name or ""}.
std::map<std::string, std::string> help_options(const std::string& help) {
  std::map<std::string, std::string> out;
  const std::regex name_line(R"(^  (-[A-Za-z],)?(--[a-z0-9-]+))");
  std::istringstream in(help);
  for (std::string line; std::getline(in, line);) {
    std::smatch m;
    if (std::regex_search(line, m, name_line))
      out[m[2]] = m[1].matched ? m[1].str().substr(0, m[1].length() - 1) : "";
  }
  return out;
}

std::vector<std::string> subcommands(const std::string& main_help) {
  std::vector<std::string> out;
  const auto at = main_help.find("Subcommands:");
  REQUIRE(at != std::string::npos);
  std::istringstream in(main_help.substr(at));
  const std::regex name(R"(^  ([a-z][a-z-]*)\s)");
  for (std::string line; std::getline(in, line);) {
    std::smatch m;
    if (std::regex_search(line, m, name)) out.push_back(m[1]);
  }
  return out;
}

}  // namespace

TEST_CASE("every option of every subcommand's --help is in the documented grammar, with one meaning") {
  TempDir dir;
  const std::vector<Row> rows = documented_options();
  std::map<std::string, const Row*> by_name;
  for (const Row& r : rows) {
    INFO("table row " << r.long_name);
    CHECK(by_name.count(r.long_name) == 0);  // a name in two rows would have two meanings
    by_name[r.long_name] = &r;
  }
  const auto main_help = run_gapwise("--help", dir);
  REQUIRE(main_help.exit_code == 0);
  const std::vector<std::string> commands = subcommands(main_help.out);
  CHECK(commands.size() >= 14);
  std::map<std::string, std::map<std::string, std::string>> seen;
  for (const std::string& cmd : commands) {
    const auto h = run_gapwise(cmd + " --help", dir);
    REQUIRE(h.exit_code == 0);
    seen[cmd] = help_options(h.out);
    CHECK(seen[cmd].count("--help") == 1);
    for (const auto& [name, short_name] : seen[cmd]) {
      INFO("gapwise " << cmd << " " << name);
      REQUIRE(by_name.count(name) == 1);  // an option the grammar does not document
      const Row& r = *by_name[name];
      CHECK(r.commands.count(cmd) == 1);  // documented, but not for this command
      if (!short_name.empty()) CHECK(short_name == r.short_name);
    }
  }
  for (const Row& r : rows)
    for (const std::string& cmd : r.commands) {
      INFO("table row " << r.long_name << " lists " << cmd);
      REQUIRE(seen.count(cmd) == 1);          // not a subcommand
      CHECK(seen[cmd].count(r.long_name) == 1);  // a stale row: the command has no such option
    }
  // The names the grammar retired are gone from every command.
  for (const auto& [cmd, opts] : seen)
    for (const char* old : {"--duration-ns", "--durations-ns", "--restart", "--range"}) {
      INFO(cmd << " " << old);
      CHECK(opts.count(old) == 0);
    }
  CHECK(seen["anneal"].count("--samples") == 0);
  CHECK(seen["anneal"].count("--trace-points") == 1);
}

TEST_CASE("number lists: lin and log ranges with both ends, mixed items, repeats joined") {
  using cli::ListOf;
  using cli::parse_value_list;
  // Evenly spaced (numpy.linspace-like; common practice) and log-spaced (numpy.logspace-like) grids.
  const auto lin = parse_value_list("lin:1:1000:4", "--x");
  REQUIRE(lin.size() == 4);
  CHECK(lin[0] == 1.0);
  CHECK(lin[1] == doctest::Approx(334.0));
  CHECK(lin[2] == doctest::Approx(667.0));
  CHECK(lin[3] == 1000.0);
  const auto log = parse_value_list("log:1:1000:4", "--x");
  REQUIRE(log.size() == 4);
  CHECK(log[1] == doctest::Approx(10.0));
  CHECK(log[2] == doctest::Approx(100.0));
  CHECK(log[3] == 1000.0);
  const auto mixed = parse_value_list("log:1:100:3,500, 0.25", "--x");
  CHECK(mixed == std::vector<double>{1.0, mixed[1], 100.0, 500.0, 0.25});
  CHECK(mixed[1] == doctest::Approx(10.0));
  CHECK(parse_value_list("lin:0.3:0.3:1", "--x") == std::vector<double>{0.3});

  auto refusal = [](const std::string& text, ListOf kind = ListOf::Numbers) {
    return message_of([&] { parse_value_list(text, "--x", kind); });
  };
  // A bare FIRST:LAST:COUNT says neither spacing: both are offered, with their values.
  const std::string bare = refusal("1:1000:4");
  CHECK(bare.find("lin:1:1000:4 (evenly spaced: 1, 334, 667, 1000)") != std::string::npos);
  CHECK(bare.find("log:1:1000:4 (evenly spaced in log: 1, 10, 100, 1000)") != std::string::npos);
  CHECK(refusal("0:1:3").find("log:0:1:3 needs FIRST and LAST above 0") != std::string::npos);
  CHECK(refusal("log:0:1:3").find("needs FIRST and LAST above 0") != std::string::npos);
  CHECK(refusal("lin:0:1:2.5").find("is not a whole number from 1 to 10000") != std::string::npos);
  CHECK(refusal("lin:0:1:10001").find("is not a whole number from 1 to 10000") != std::string::npos);
  CHECK(refusal("geo:1:2:3").find("neither a number nor a range") != std::string::npos);
  CHECK(refusal("inf").find("is not a finite number") != std::string::npos);
  CHECK(refusal("").find("no value given") != std::string::npos);
  // Numbers a double cannot hold: named as such (std::stod's out_of_range once read "is not a number").
  CHECK(refusal("1e400").find("too large for a double") != std::string::npos);
  CHECK(refusal("-1e400").find("too large for a double") != std::string::npos);
  CHECK(refusal("1e-400").find("too small for a double") != std::string::npos);
  CHECK(refusal("5e-324").find("too small for a double") != std::string::npos);  // subnormal
  CHECK(refusal("5e-324", ListOf::Durations).find("below the smallest duration gapwise accepts") != std::string::npos);
  CHECK(refusal("5e-324", ListOf::Durations).find("sudden limit") != std::string::npos);
  CHECK(refusal("lin:1e-400:1:3").find("too small for a double") != std::string::npos);
  CHECK(parse_value_list("0,2.3e-308", "--x").size() == 2);  // the smallest normal doubles are fine
  // One value where a command runs one duration.
  CHECK(cli::parse_single_value("20", "-d", ListOf::Durations, "w", "f") == 20.0);
  CHECK(message_of([] { cli::parse_single_value("5,10", "--durations", ListOf::Durations, "anneal runs one duration", "use durations"); })
            .find("2 values given") != std::string::npos);
}

TEST_CASE("a LIST option given twice is one list; anneal refuses several durations") {
  TempDir dir;
  const std::string tri = (testing::source_dir() / "data-samples/triangle.toml").string();
  const std::string lin = (testing::source_dir() / "schedules/linear.toml").string();
  const auto twice = run_gapwise("durations '" + tri + "' '" + lin + "' -d 1 -d 2 --no-search --no-predictions -q --json", dir);
  REQUIRE(twice.exit_code == 0);
  CHECK(twice.out.find("\"duration_ns\" : 1.0") != std::string::npos);
  CHECK(twice.out.find("\"duration_ns\" : 2.0") != std::string::npos);
  const auto one = run_gapwise("anneal '" + tri + "' '" + lin + "' -d 1 -d 2", dir);
  CHECK(one.exit_code == 2);
  CHECK(one.err.find("2 values given") != std::string::npos);
}

TEST_CASE("help text is wrapped to the terminal width (COLUMNS), 100 columns without a terminal") {
  TempDir dir;
  // The lines the formatter wraps: paragraph text, option lines and their continuations
  // (indented lists, tables and examples are kept as written, so their columns line up).
  auto longest = [](const std::string& text) {
    std::size_t n = 0;
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) {
      const bool paragraph = !line.empty() && line[0] != ' ' && line.rfind("Example", 0) != 0 && line.rfind("Usage:", 0) != 0;
      const bool option = line.rfind("  -", 0) == 0 && line.size() > 3 && line[3] != ' ';
      const bool continuation = line.rfind(std::string(30, ' '), 0) == 0;
      if (paragraph || option || continuation) n = std::max(n, line.size());
    }
    return n;
  };
  ::setenv("COLUMNS", "70", 1);
  const auto narrow = run_gapwise("durations --help", dir);
  ::setenv("COLUMNS", "160", 1);
  const auto wide = run_gapwise("durations --help", dir);
  ::unsetenv("COLUMNS");
  const auto plain = run_gapwise("durations --help", dir);  // stdout is a file here: the default width
  REQUIRE(narrow.exit_code == 0);
  CHECK(longest(narrow.out) <= 70);
  CHECK(longest(wide.out) > 100);
  CHECK(longest(wide.out) <= 160);
  CHECK(longest(plain.out) <= 100);
  CHECK(longest(plain.out) > 70);
  // Every word survives the re-wrapping.
  auto words = [](const std::string& t) {
    std::multiset<std::string> w;
    std::istringstream in(t);
    for (std::string x; in >> x;) w.insert(x);
    return w;
  };
  CHECK(words(narrow.out) == words(wide.out));
}
