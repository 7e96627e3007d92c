// Deeply nested TOML (dotted keys, [table] and [[array]] headers, inline tables
// thousands of levels down) overflowed the stack inside toml++ (it recurses per
// level; it caps only nested arrays and inline tables). TomlReader now measures
// the nesting before parsing and refuses more than kMaxTomlNesting levels with
// an InputError naming file and line, for every gapwise TOML input.
#include <doctest/doctest.h>

#include <string>

#include "io/embedding_file.hpp"
#include "io/input_error.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "io/toml_reader.hpp"
#include "input_error_checks.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

std::string dotted(const std::string& part, int n) {
  std::string s = part;
  for (int k = 1; k < n; ++k) s += "." + part;
  return s;
}

template <class Parse>
void check_refused_at(Parse parse, const std::string& text, int line) {
  testing::check_input_error([&] { parse(text); }, "deep.toml", line, "", "levels deep");
}

}  // namespace

TEST_CASE("the nesting depth counts headers, dotted keys, arrays and inline tables, and skips strings") {
  CHECK(!deepest_toml_nesting("# only a comment\n").has_value());
  CHECK(deepest_toml_nesting("qubits = 3\n")->depth == 1);
  CHECK(deepest_toml_nesting("a.b.c = 1\n")->depth == 3);
  CHECK(deepest_toml_nesting("[path]\nx = 1\n")->depth == 2);
  CHECK(deepest_toml_nesting("[path.pause]\ns = 0.5\n")->depth == 3);
  CHECK(deepest_toml_nesting("[[a.b]]\nc = 1\n")->depth == 4);  // array + table + key
  CHECK(deepest_toml_nesting("x = [[1, 2], [3]]\n")->depth == 2);      // x's array, the inner arrays
  CHECK(deepest_toml_nesting("x = {a.b = {c = 1}}\n")->depth == 4);    // x, a, b, c
  // Dots and brackets inside strings and comments are not nesting.
  CHECK(deepest_toml_nesting("d = \"a.b.c.d.e [[[ {{\"\n# x.y.z [[[\n")->depth == 1);
  CHECK(deepest_toml_nesting("d = '''\n[a.b.c.d]\n'''\ne = 1\n")->depth == 1);
  CHECK(deepest_toml_nesting("\"a.b.c\" = 1\n")->depth == 1);  // one quoted key
  // Floats and dates are values, not keys.
  CHECK(deepest_toml_nesting("x = 1.5\ny = 1979-05-27T07:32:00.999\n")->depth == 1);
  // The line where the deepest point is first reached.
  CHECK(deepest_toml_nesting("a = 1\n\n" + dotted("k", 9) + " = 2\n")->line == 3);
}

TEST_CASE("deep dotted keys and headers are refused with file and line by every TOML parser") {
  const int deep = 200000;  // overflowed the 8 MiB stack before the cap
  auto problem = [](const std::string& t) { (void)parse_problem_text(t, "deep.toml"); };
  auto schedule = [](const std::string& t) { (void)parse_schedule_text(t, "deep.toml"); };
  auto embedding = [](const std::string& t) { (void)parse_embedding_text(t, "deep.toml"); };
  auto reader = [](const std::string& t) { (void)TomlReader::from_string(t, "deep.toml"); };
  check_refused_at(problem, "qubits = 2\n" + dotted("a", deep) + " = 1\n", 2);
  check_refused_at(problem, "qubits = 2\n\n[" + dotted("a", deep) + "]\n", 3);
  check_refused_at(schedule, "[path]\n" + dotted("p", deep) + " = 1\n", 2);
  check_refused_at(schedule, "[[" + dotted("s", deep) + "]]\n", 1);
  check_refused_at(embedding, "x = {" + dotted("c", deep) + " = 1}\n", 1);
  check_refused_at(reader, "x = [{a = [{" + dotted("b", deep) + " = 2}]}]\n", 1);
  // Just at the cap the text reaches toml++ (and the parser's own key checks).
  check_refused_at(reader, dotted("a", kMaxTomlNesting + 1) + " = 1\n", 1);
  CHECK_NOTHROW(TomlReader::from_string(dotted("a", kMaxTomlNesting) + " = 1\n", "ok.toml"));
}

TEST_CASE("gapwise's own files pass the depth check") {
  const auto src = testing::source_dir();
  for (const char* f : {"schedules/pause-quench.toml", "schedules/reverse-dwell.toml", "schedules/hardware-like.toml",
                        "data-samples/meeting-slots-qubo.toml", "data-samples/garden-beds-square-embedding.toml"})
    CHECK_NOTHROW(TomlReader::open((src / f).string()));
}

TEST_CASE("the command line refuses a deep header with exit 2 naming file and line") {
  testing::TempDir dir;
  dir.write("deep.toml", "qubits = 2\n[" + dotted("a", 200000) + "]\n");
  const auto r = testing::run_gapwise("inspect '" + (dir.path / "deep.toml").string() + "'", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("deep.toml:2: tables, keys and arrays nest 200000 levels deep here") != std::string::npos);
}
