// The schedule file: energy scales, paths, start states, and every validation
// error naming file, line and key.
#include <doctest/doctest.h>

#include <string>

#include "io/input_error.hpp"
#include "io/schedule_file.hpp"
#include "input_error_checks.hpp"

using namespace gapwise;

namespace {

void check_error(const std::string& text, int line, const std::string& key, const std::string& words) {
  testing::check_input_error([&] { (void)parse_schedule_text(text, "bad.toml"); }, "bad.toml", line, key, words);
}

const std::string kLinear = "[scales]\nkind = \"linear\"\na_max_ghz = 5\nb_max_ghz = 5\n";

}  // namespace

TEST_CASE("Linear scales and a pause path") {
  const Schedule s = parse_schedule_text(kLinear + "[path]\nduration_ns = 50\npoints = [[0, 0], [0.4, 0.45], [0.6, 0.45], [1, 1]]\n", "ok");
  CHECK(s.scales.a_ghz(0.2) == doctest::Approx(4.0));
  CHECK(s.scales.b_ghz(0.2) == doctest::Approx(1.0));
  const AnnealPath p = s.path_for(std::nullopt);
  CHECK(p.duration_ns() == 50.0);
  CHECK(p.s_at(25.0) == doctest::Approx(0.45));
  CHECK(s.path_for(200.0).s_at(100.0) == doctest::Approx(0.45));
}

TEST_CASE("Monotone cubic table interpolation never overshoots the table values") {
  // PCHIP (Fritsch & Carlson, SIAM J. Numer. Anal. 17, 238 (1980)) keeps each
  // interval's values between its end values for monotone data.
  const Schedule s = parse_schedule_text(
      "[scales]\nkind = \"table\"\ns = [0, 0.2, 0.25, 0.6, 1]\na_ghz = [6, 1, 0.9, 0.1, 0]\nb_ghz = [0, 0.1, 3, 3.1, 10]\n"
      "[path]\nduration_ns = 10\n", "t");
  const auto& ts = s.scales.table_s();
  for (std::size_t k = 0; k + 1 < ts.size(); ++k)
    for (int j = 0; j <= 50; ++j) {
      const double x = ts[k] + (ts[k + 1] - ts[k]) * j / 50.0;
      const double a = s.scales.a_ghz(x), b = s.scales.b_ghz(x);
      CHECK(a <= s.scales.table_a()[k] + 1e-12);
      CHECK(a >= s.scales.table_a()[k + 1] - 1e-12);
      CHECK(b >= s.scales.table_b()[k] - 1e-12);
      CHECK(b <= s.scales.table_b()[k + 1] + 1e-12);
    }
  CHECK(s.scales.a_ghz(0.2) == doctest::Approx(1.0));  // passes through the points
}

TEST_CASE("Every schedule validation error names the place") {
  check_error(kLinear + "[path]\nduration_ns = 5\npoints = [[0, 0], [1, 1.2]]\n", 7, "path.points[1]", "outside [0, 1]");
  check_error(kLinear + "[path]\nduration_ns = 5\npoints = [[0, 0], [0.5, 0.5], [0.5, 0.7], [1, 1]]\n", 7,
              "path.points[2]", "does not increase");
  check_error("[scales]\nkind = \"linear\"\na_max_ghz = -1\nb_max_ghz = 5\n", 3, "scales.a_max_ghz", "negative");
  check_error("[scales]\nkind = \"table\"\ns = [0, 1]\na_ghz = [1, -0.5]\nb_ghz = [0, 1]\n", 4, "scales.a_ghz[1]", "negative");
  check_error("[scales]\nkind = \"table\"\ns = [0.1, 1]\na_ghz = [1, 0]\nb_ghz = [0, 1]\n[path]\nduration_ns = 3\n", 1,
              "scales.s", "covers s in [0.1, 1]");
  check_error(kLinear + "[path]\ntime = \"ns\"\npoints = [[0, 1], [5, 0.5], [10, 1]]\n", 7, "path.start_bits",
              "reverse anneal");
  check_error(kLinear + "[path]\ntime = \"ns\"\npoints = [[0, 1], [5, 0.5], [10, 1]]\nstart = \"classical\"\n", 5,
              "path.start_bits", "needs the start state");
  check_error(kLinear + "[path]\nduration_ns = 5\npoints = [[0, 0], [0.5, 0.5], [0.9, 1]]\n", 7, "path.points[2]",
              "last time fraction must be 1");
  check_error(kLinear + "[path]\nspeed = 3\n", 6, "path.speed", "unknown key");
  check_error(kLinear + "[path]\nstart = \"classical\"\nstart_bits = [0, 2]\n", 7, "path.start_bits[1]", "0 or 1");
}

TEST_CASE("A reverse anneal with its start state reads; the start bits must fit the problem") {
  const Schedule s = parse_schedule_text(kLinear + "[path]\ntime = \"ns\"\npoints = [[0, 1], [5, 0.5], [10, 1]]\nstart_bits = [1, 0, 1]\n", "r");
  CHECK(s.start.kind == StartKind::Classical);
  CHECK(start_basis_state(s, 3) == 0b101);
  CHECK_THROWS_AS(start_basis_state(s, 4), InputError);
  CHECK(s.path_for(std::nullopt).duration_ns() == 10.0);
}

TEST_CASE("A fraction path without any duration asks for one") {
  const Schedule s = parse_schedule_text(kLinear, "nodur.toml");
  try {
    (void)s.path_for(std::nullopt);
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()).find("--durations") != std::string::npos);
  }
}

TEST_CASE("format_schedule_toml round-trips") {
  const Schedule s = parse_schedule_text(
      "[scales]\nkind = \"table\"\ns = [0, 0.5, 0.7, 1]\na_ghz = [4, 1, 0.5, 0]\nb_ghz = [0, 2, 3, 9]\n"
      "[path]\ntime = \"ns\"\npoints = [[0, 1], [3, 0.6], [7, 0.6], [9, 1]]\nstart_bits = [0, 1]\n", "a");
  const Schedule t = parse_schedule_text(format_schedule_toml(s), "b");
  CHECK(t.scales.b_ghz(0.6) == doctest::Approx(s.scales.b_ghz(0.6)));
  CHECK(t.shape.points().size() == 4);
  CHECK(t.start.bits == s.start.bits);
}
