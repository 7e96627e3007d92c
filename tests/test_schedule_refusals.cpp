// Schedules that would give silently wrong numbers are refused at their line:
//  * B(s) = 0 at every s: the problem Hamiltonian never acts (like A = 0 at the
//    start of a forward anneal, which is refused when the run starts);
//  * start_bits without start on a forward path (ambiguous: it used to turn a
//    forward anneal into a classical start without a word);
//  * a schedule gapwise writes (gap-path) must pass the reader's own checks
//    (check_duration_ns is shared by both; the written text is read back).
#include <doctest/doctest.h>

#include <cmath>
#include <filesystem>
#include <limits>
#include <string>

#include "io/input_error.hpp"
#include "io/schedule_file.hpp"
#include "input_error_checks.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

void check_refused(const std::string& text, int line, const std::string& key, const std::string& words) {
  testing::check_input_error([&] { (void)parse_schedule_text(text, "s.toml"); }, "s.toml", line, key, words);
}

std::string sample(const std::string& rel) { return "'" + (testing::source_dir() / rel).string() + "' "; }

}  // namespace

TEST_CASE("B(s) zero everywhere is refused, linear and table; B zero only at s = 0 is the usual start") {
  check_refused("[scales]\nkind = \"linear\"\na_max_ghz = 5\nb_max_ghz = 0\n", 4, "scales.b_max_ghz", "B(s) is 0 at every s");
  check_refused("[scales]\nkind = \"table\"\ns = [0, 0.5, 1]\na_ghz = [5, 2, 0]\nb_ghz = [0, 0.0, 0]\n", 5, "scales.b_ghz",
                "B(s) is 0 at every s");
  CHECK_NOTHROW(parse_schedule_text("[scales]\nkind = \"table\"\ns = [0, 0.5, 1]\na_ghz = [5, 2, 0]\nb_ghz = [0, 0, 1e-3]\n", "ok"));
  CHECK_NOTHROW(parse_schedule_text("[scales]\nkind = \"linear\"\na_max_ghz = 0\nb_max_ghz = 5\n[path]\nstart = \"classical\"\n"
                                    "start_bits = [0]\n", "ok"));
}

TEST_CASE("start_bits without start on a forward path is refused; with start, or on a reverse path, it is read") {
  check_refused("[path]\nduration_ns = 10\nstart_bits = [0, 1, 1]\n", 3, "path.start_bits", "without `start`");
  check_refused("[path]\nduration_ns = 10\nstart_bits = [1]\n[path.pause]\ns = 0.5\nduration = 0.2\n", 3, "path.start_bits",
                "without `start`");
  const Schedule cls = parse_schedule_text("[path]\nduration_ns = 10\nstart = \"classical\"\nstart_bits = [0, 1]\n", "c");
  CHECK(cls.start.kind == StartKind::Classical);
  // A path starting above s = 0 needs a classical start: there start_bits alone says it.
  const Schedule rev = parse_schedule_text("[path]\ntime = \"ns\"\npoints = [[0, 1], [5, 0.5], [10, 1]]\nstart_bits = [1, 0]\n", "r");
  CHECK(rev.start.kind == StartKind::Classical);
  const Schedule shape = parse_schedule_text(
      "[path]\ntime = \"ns\"\nstart_bits = [0, 1]\n[path.reverse]\nturn_s = 0.5\ndown = 3\ndwell = 4\n", "r2");
  CHECK(shape.start.kind == StartKind::Classical);
}

TEST_CASE("format_schedule_toml refuses what the reader would refuse") {
  Schedule s = parse_schedule_text("[path]\nduration_ns = 10\n", "base.toml");
  CHECK_NOTHROW(parse_schedule_text(format_schedule_toml(s), "again"));
  for (double bad : {-5.0, 0.0, std::numeric_limits<double>::quiet_NaN(), 1e300}) {
    INFO(bad);
    s.duration_ns = bad;
    CHECK_THROWS_AS((void)format_schedule_toml(s), InputError);
  }
  // Scales built in code that the reader refuses (B = 0 everywhere) are caught by re-reading.
  Schedule w = parse_schedule_text("[path]\nduration_ns = 10\n", "base.toml");
  w.scales = EnergyScales::linear(5.0, 0.0);
  try {
    (void)format_schedule_toml(w);
    FAIL("written");
  } catch (const InputError& e) {
    CHECK(e.place().file == "base.toml");
    CHECK(e.place().key == "scales.b_max_ghz");
    CHECK(e.problem().find("would be refused when read back") != std::string::npos);
  }
}

TEST_CASE("gap-path refuses a --durations its file could not hold, writes nothing, and its files read back") {
  testing::TempDir dir;
  const std::string out = (dir.path / "g.toml").string();
  for (const char* d : {"-5", "0", "nan", "1e300", "inf"}) {
    INFO(d);
    const auto r = testing::run_gapwise("gap-path " + sample("data-samples/triangle.toml") + sample("schedules/linear.toml") +
                                            "-d " + d + " --out '" + out + "'",
                                        dir);
    CHECK(r.exit_code == 2);
    CHECK(r.err.find("--durations") != std::string::npos);
    CHECK(!std::filesystem::exists(out));
  }
  const auto ok = testing::run_gapwise("gap-path " + sample("data-samples/weak-field-ring.toml") + sample("schedules/linear.toml") +
                                           "-d 40 --out '" + out + "'",
                                       dir);
  REQUIRE(ok.exit_code == 0);
  const Schedule back = read_schedule_file(out);
  CHECK(back.duration_ns == 40.0);
}
