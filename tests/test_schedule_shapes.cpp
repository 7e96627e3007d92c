// Shape tables in schedule files ([path.pause], [path.quench], [path.reverse]):
// what they produce, that format_schedule_toml writes them back, and that every
// bad shape is refused with file, line and key.
#include <doctest/doctest.h>

#include <string>

#include "io/input_error.hpp"
#include "io/schedule_file.hpp"
#include "input_error_checks.hpp"

using namespace gapwise;

namespace {

const std::string kHead = "[scales]\nkind = \"linear\"\na_max_ghz = 5\nb_max_ghz = 5\n";

void check_refused(const std::string& text, int line, const std::string& key, const std::string& words) {
  testing::check_input_error([&] { (void)parse_schedule_text(text, "bad.toml"); }, "bad.toml", line, key, words);
}

}  // namespace

TEST_CASE("a pause table gives the same path as the waypoints it stands for") {
  const Schedule s = parse_schedule_text(kHead + "[path]\nduration_ns = 50\n[path.pause]\ns = 0.45\nduration = 0.2\n", "p");
  REQUIRE(s.shape_spec);
  REQUIRE(s.shape.points().size() == 4);
  CHECK(s.shape.points()[1].t_ns == doctest::Approx(0.36));
  CHECK(s.shape.points()[2].t_ns == doctest::Approx(0.56));
  CHECK(s.shape.duration_ns() == 1.0);
  CHECK(s.path_for(std::nullopt).duration_ns() == 50.0);
  CHECK(s.start.kind == StartKind::Ground);
}

TEST_CASE("pause and quench in ns") {
  const Schedule s = parse_schedule_text(
      kHead + "[path]\ntime = \"ns\"\nduration_ns = 100\n[path.pause]\ns = 0.6\nduration = 10\n[path.quench]\ns = 0.6\nduration = 2\n",
      "q");
  const AnnealPath p = s.path_for(std::nullopt);
  CHECK(p.duration_ns() == 100.0);
  CHECK(p.s_at(93.0) == doctest::Approx(0.6));
  CHECK(p.s_at(99.0) == doctest::Approx(0.8));
}

TEST_CASE("reverse table, ns and fractions") {
  const Schedule s = parse_schedule_text(
      kHead + "[path]\ntime = \"ns\"\nstart_bits = [0, 1, 1]\n[path.reverse]\nturn_s = 0.55\ndown = 5\ndwell = 10\n", "r");
  CHECK(s.start.kind == StartKind::Classical);
  CHECK(s.shape.duration_ns() == 20.0);  // up defaults to down
  CHECK(s.shape.s_at(10.0) == doctest::Approx(0.55));
  const Schedule f = parse_schedule_text(
      kHead + "[path]\nduration_ns = 40\nstart_bits = [1]\n[path.reverse]\nturn_s = 0.3\ndown = 0.25\ndwell = 0.5\nup = 0.25\n", "f");
  CHECK(f.path_for(std::nullopt).duration_ns() == 40.0);
  CHECK(f.path_for(std::nullopt).s_at(20.0) == doctest::Approx(0.3));
}

TEST_CASE("format_schedule_toml writes shape tables that read back to the same path") {
  for (const std::string body :
       {std::string("[path]\nduration_ns = 50\n[path.pause]\ns = 0.45\nduration = 0.2\n[path.quench]\ns = 0.7\nduration = 0.05\n"),
        std::string("[path]\ntime = \"ns\"\nstart_bits = [0, 1]\n[path.reverse]\nturn_s = 0.5\ndown = 3\ndwell = 4\nup = 2\n"),
        std::string("[path]\ntime = \"ns\"\nduration_ns = 30\n[path.pause]\ns = 0.2\nduration = 5\n")}) {
    const Schedule a = parse_schedule_text("description = \"a \\\"quoted\\\" note\"\n" + kHead + body, "a");
    const std::string text = format_schedule_toml(a);
    INFO(text);
    const Schedule b = parse_schedule_text(text, "b");
    REQUIRE(b.shape_spec);
    CHECK(b.description == a.description);
    REQUIRE(b.shape.points().size() == a.shape.points().size());
    for (std::size_t k = 0; k < a.shape.points().size(); ++k) {
      CHECK(b.shape.points()[k].t_ns == a.shape.points()[k].t_ns);
      CHECK(b.shape.points()[k].s == a.shape.points()[k].s);
    }
  }
}

TEST_CASE("bad shapes are refused with file, line and key") {
  const std::string P = kHead + "[path]\nduration_ns = 50\n";  // [path] is line 5
  check_refused(P + "[path.pause]\ns = 1.3\nduration = 0.1\n", 8, "path.pause.s", "outside [0, 1]");
  check_refused(P + "[path.pause]\ns = 0.4\nduration = -0.1\n", 9, "path.pause.duration", "negative");
  check_refused(P + "[path.pause]\ns = 0.4\nduration = 1.0\n", 9, "path.pause.duration", "no time for the ramp");
  check_refused(P + "[path.pause]\ns = 0.4\n", 7, "path.pause.duration", "missing");
  check_refused(P + "[path.pause]\ns = 0.4\nduration = 0.1\nlength = 3\n", 10, "path.pause.length", "");
  check_refused(P + "[path.quench]\ns = 0.5\nduration = 0\n", 9, "path.quench.duration", "not positive");
  check_refused(P + "[path.pause]\ns = 0.8\nduration = 0.1\n[path.quench]\ns = 0.5\nduration = 0.1\n", 8, "path.pause.s",
                "after the quench");
  check_refused(P + "points = [[0, 0], [1, 1]]\n[path.pause]\ns = 0.4\nduration = 0.1\n", 7, "path.points", "both");
  const std::string R = kHead + "[path]\ntime = \"ns\"\nstart_bits = [0, 1]\n";
  check_refused(R + "[path.reverse]\nturn_s = 0.5\ndown = 2\ndwell = -1\n", 11, "path.reverse.dwell", "negative");
  check_refused(R + "[path.reverse]\nturn_s = 1.5\ndown = 2\ndwell = 1\n", 9, "path.reverse.turn_s", "outside [0, 1]");
  check_refused(kHead + "[path]\ntime = \"ns\"\n[path.reverse]\nturn_s = 0.5\ndown = 2\ndwell = 1\n", 7, "path.start_bits",
                "classical start state");
  check_refused(kHead + "[path]\nstart = \"ground\"\n[path.reverse]\nturn_s = 0.5\ndown = 0.5\ndwell = 0.0\n", 7,
                "path.start_bits", "classical start state");
  check_refused(kHead + "[path]\nstart_bits = [0]\n[path.reverse]\nturn_s = 0.5\ndown = 0.3\ndwell = 0.3\nup = 0.3\n", 7,
                "path.reverse", "add up to 1");
  check_refused(R + "duration_ns = 20\n[path.reverse]\nturn_s = 0.5\ndown = 2\ndwell = 1\n", 8, "path.duration_ns", "implied");
  check_refused(kHead + "[path]\ntime = \"ns\"\n[path.pause]\ns = 0.4\nduration = 2\n", 5, "path.duration_ns",
                "needs its total duration");
  check_refused(R + "[path.reverse]\nturn_s = 0.5\ndown = 2\ndwell = 1\n[path.pause]\ns = 0.4\nduration = 2\n", 12, "path.pause",
                "cannot also have");
}
