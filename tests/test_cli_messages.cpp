// Messages that help: command-line errors name the option, the memory refusal
// shows the qubit count the file asked for, a mistyped subcommand is called
// unknown with the nearest name suggested, path errors say loop / too long /
// missing, an error about one instance of a folder names its file, and control
// characters in user text are escaped when printed. Every refusal is exit 2.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "io/terminal_text.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::CommandResult;
using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

std::string quoted(const std::filesystem::path& p) { return "'" + p.string() + "'"; }
std::string sample(const char* rel) { return quoted(source_dir() / rel); }

bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

void check_refused(const CommandResult& r) {
  CHECK(r.exit_code == 2);
  CHECK(has(r.err, "gapwise: error: "));
  CHECK_FALSE(has(r.err, "<input>"));
  CHECK_FALSE(has(r.err, "internal failure"));
}

}  // namespace

TEST_CASE("command-line errors raised inside the library name the option, never <input>") {
  TempDir dir;
  const std::string tri = sample("data-samples/triangle.toml"), lin = sample("schedules/linear.toml");
  struct Case { std::string args, option; };
  const Case cases[] = {
      {"durations " + tri + " " + lin + " --durations 0", "--durations"},
      {"durations " + tri + " " + lin + " -d 5:1:3", "--durations"},
      {"embed-cost " + tri + " " + sample("data-samples/triangle-ring-embedding.toml") + " " + lin +
           " --search-durations log:0:1:3",
       "--search-durations"},
      {"compare-paths " + tri + " " + lin + " --durations=-1", "--durations"},
      {"gap " + tri + " --points 2", "--points"},             // checked by the gap search
      {"gap " + tri + " --s-tolerance 0.5", "--s-tolerance"},
      {"gap " + tri + " --s-first 0.8 --s-last 0.2", "--s-first"},
      {"embed-cost " + tri + " " + sample("data-samples/triangle-ring-embedding.toml") + " " + lin +
           " --term-limit -1 --strengths 2",
       "--term-limit"},
  };
  for (const Case& c : cases) {
    INFO(c.args);
    const auto r = run_gapwise(c.args, dir);
    INFO(r.err);
    check_refused(r);
    CHECK(has(r.err, "gapwise: error: " + c.option + ": "));
    if (c.args.rfind("gap ", 0) == 0) CHECK(r.out.empty());  // refused before the plan is printed
  }
}

TEST_CASE("the memory refusal shows the qubit count the file asked for") {
  TempDir dir;
  for (const char* n : {"100000", "65", "40"}) {
    const auto f = dir.write("big.toml", std::string("qubits = ") + n + "\n");
    const auto r = run_gapwise("inspect " + quoted(f), dir);
    INFO(r.err);
    check_refused(r);
    CHECK(has(r.err, std::string("key 'qubits': ") + n + " qubits need"));
  }
}

TEST_CASE("a mistyped subcommand is unknown, with the nearest name suggested (edit distance)") {
  TempDir dir;
  auto r = run_gapwise("anneall " + sample("data-samples/triangle.toml"), dir);
  check_refused(r);
  CHECK(has(r.err, "unknown subcommand 'anneall'. Did you mean 'anneal'?"));
  r = run_gapwise("gap-pth", dir);
  check_refused(r);
  CHECK(has(r.err, "Did you mean 'gap-path'?"));
  r = run_gapwise("duratoins", dir);  // a transposition is two edits
  CHECK(has(r.err, "Did you mean 'durations'?"));
  r = run_gapwise("xyzzyq", dir);  // nothing close: the list, no guess
  check_refused(r);
  CHECK(has(r.err, "unknown subcommand 'xyzzyq'."));
  CHECK_FALSE(has(r.err, "Did you mean"));
  CHECK(has(r.err, "inspect, anneal"));
  // Real subcommands and the top-level flags are untouched.
  CHECK(run_gapwise("--version", dir).exit_code == 0);
  CHECK(run_gapwise("inspect " + sample("data-samples/triangle.toml"), dir).exit_code == 0);
}

TEST_CASE("path errors say what is wrong: link loop, name too long, missing file, missing folder, dangling link") {
  TempDir dir;
  namespace fs = std::filesystem;
  fs::create_symlink(dir.path / "loop-b.toml", dir.path / "loop-a.toml");
  fs::create_symlink(dir.path / "loop-a.toml", dir.path / "loop-b.toml");
  fs::create_symlink(dir.path / "gone.toml", dir.path / "dangling.toml");
  const std::string lin = sample("schedules/linear.toml"), tri = sample("data-samples/triangle.toml");
  struct Case { std::string args, words; };
  const Case cases[] = {
      {"inspect " + quoted(dir.path / "loop-a.toml"), "loop of symbolic links (ELOOP)"},
      {"anneal " + tri + " " + quoted(dir.path / "loop-a.toml"), "loop of symbolic links (ELOOP)"},  // the schedule
      {"inspect " + quoted(dir.path / (std::string(300, 'a') + ".toml")), "too long for the system (ENAMETOOLONG"},
      {"inspect " + quoted(dir.path / "missing.toml"), "no such file (ENOENT)"},
      {"inspect " + quoted(dir.path / "no-folder" / "p.toml"), "the folder '" + (dir.path / "no-folder").string() + "' does not exist"},
      {"inspect " + quoted(dir.path / "dangling.toml"), "symbolic link to '" + (dir.path / "gone.toml").string() + "', which does not exist"},
      {"ensemble " + quoted(dir.path / "loop-a.toml") + " " + lin + " --out " + quoted(dir.path / "e.h5"),
       "loop of symbolic links (ELOOP)"},
  };
  for (const Case& c : cases) {
    INFO(c.args);
    const auto r = run_gapwise(c.args, dir);
    INFO(r.err);
    check_refused(r);
    CHECK(has(r.err, c.words));
    CHECK(r.out.empty());
  }
}

TEST_CASE("instance folders: a link loop or a refused instance names the file; nothing is left behind") {
  TempDir dir;
  namespace fs = std::filesystem;
  const auto set = dir.path / "set";
  fs::create_directories(set);
  fs::copy_file(source_dir() / "data-samples/triangle.toml", set / "a.toml");
  fs::create_symlink(set / "l2.toml", set / "l1.toml");
  fs::create_symlink(set / "l1.toml", set / "l2.toml");
  const std::string lin = sample("schedules/linear.toml");
  const auto out = dir.path / "study.h5";
  auto r = run_gapwise("ensemble " + quoted(set) + " " + lin + " -d 5 -q --out " + quoted(out), dir);
  INFO(r.err);
  check_refused(r);
  // Either link of the loop may be met first (directory order).
  CHECK((has(r.err, (set / "l1.toml").string() + ": the path runs through a loop of symbolic links") ||
         has(r.err, (set / "l2.toml").string() + ": the path runs through a loop of symbolic links")));
  CHECK(has(r.err, "(in the instance folder)"));
  fs::remove(set / "l1.toml");
  fs::remove(set / "l2.toml");
  // An instance too large for the gap search: refused before any work, naming its file.
  dir.write("set/z.toml", "qubits = 25\n");
  r = run_gapwise("ensemble " + quoted(set) + " " + lin + " -d 5 -q --out " + quoted(out), dir);
  INFO(r.err);
  check_refused(r);
  CHECK(has(r.err, (set / "z.toml").string() + ": key 'qubits': 25 qubits"));
  CHECK_FALSE(fs::exists(out));
  CHECK_FALSE(fs::exists(out.string() + ".journal"));
}

TEST_CASE("terminal_text escapes control characters and keeps printable UTF-8") {
  CHECK(terminal_text("plain label") == "plain label");
  CHECK(terminal_text("a\x1b[2Jb") == "a\\x1b[2Jb");
  CHECK(terminal_text("line\nbreak\ttab\rret") == "line\\nbreak\\ttab\\rret");
  CHECK(terminal_text("keep\nnewline", true) == "keep\nnewline");
  CHECK(terminal_text(std::string("nul\0x", 5)) == "nul\\x00x");
  CHECK(terminal_text("del\x7f") == "del\\x7f");
  CHECK(terminal_text("c1 \xc2\x9b") == "c1 \\u009b");        // U+009B, the 8-bit escape introducer
  CHECK(terminal_text("caf\xc3\xa9 \xce\x94") == "caf\xc3\xa9 \xce\x94");  // e-acute, Delta: printable
}

TEST_CASE("control characters in user text are escaped where gapwise prints it") {
  TempDir dir;
  // A description (inspect), labels (embed-cost's chain list, a refusal that
  // quotes a label) with an escape sequence that would clear the screen.
  const auto p = dir.write("p.toml",
                           "qubits = 3\ndescription = \"evil\\u001b[2J\\u0007 text\"\nlabels = [\"a\\u001b[31m\", \"b\", \"c\"]\n"
                           "fields = [0.3, -0.1, 0.05]\ncouplings = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]\n");
  auto r = run_gapwise("inspect " + quoted(p), dir);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "evil\\x1b[2J\\x07 text"));
  CHECK_FALSE(has(r.out, "\x1b"));
  r = run_gapwise("embed-cost " + quoted(p) + " " + sample("data-samples/triangle-ring-embedding.toml") + " " +
                      sample("schedules/linear.toml") + " --strengths 2 -d 2 -q",
                  dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "a\\x1b[31m=[0,1]"));
  CHECK_FALSE(has(r.out, "\x1b"));
  const auto bad = dir.write("bad.toml", "qubits = 2\nlabels = [\"x\\u001b[2J\", \"x\\u001b[2J\"]\n");
  r = run_gapwise("inspect " + quoted(bad), dir);
  check_refused(r);
  CHECK(has(r.err, "x\\x1b[2J"));
  CHECK_FALSE(has(r.err, "\x1b"));
  // A file name with a control character, in an error message.
  const auto odd = dir.path / "odd\x1b[2J.toml";
  r = run_gapwise("inspect " + quoted(odd), dir);
  check_refused(r);
  CHECK(has(r.err, "odd\\x1b[2J.toml"));
  CHECK_FALSE(has(r.err, "\x1b"));
  // ... and in the headers of the reports that echo the input files.
  std::filesystem::copy_file(source_dir() / "data-samples/triangle.toml", odd);
  const std::string lin = sample("schedules/linear.toml");
  for (const std::string& cmd : {"inspect " + quoted(odd), "gap " + quoted(odd), "anneal " + quoted(odd) + " " + lin + " -d 1",
                                 "diagnose " + quoted(odd) + " " + lin + " -d 1 --samples 0 -q",
                                 "durations " + quoted(odd) + " " + lin + " --durations 1,2"}) {
    INFO(cmd);
    r = run_gapwise(cmd, dir);
    REQUIRE(r.exit_code == 0);
    CHECK(has(r.out, "odd\\x1b[2J.toml"));
    CHECK_FALSE(has(r.out, "\x1b"));
  }
}

TEST_CASE("durations on a path that stays at s = 1: no optimum is claimed and no empty reason is printed") {
  // At s = 1 the transverse scale A is 0, so H is diagonal and a classical state is
  // an eigenstate: a state that is not the ground state stays orthogonal to it for
  // any duration (p = 0 exactly), and the time-to-solution is infinite everywhere.
  TempDir dir;
  const auto s = dir.write("stay.toml",
                           "format = \"gapwise-schedule\"\nformat_version = 1\n[scales]\nkind = \"linear\"\n"
                           "a_max_ghz = 5.0\nb_max_ghz = 5.0\n[path]\ntime = \"fraction\"\nstart = \"classical\"\n"
                           "start_bits = [0, 1, 0]\npoints = [[0.0, 1.0], [1.0, 1.0]]\n");
  const auto r = run_gapwise("durations " + sample("data-samples/triangle.toml") + " " + quoted(s) +
                                 " --no-predictions -d 1,10,100",
                             dir);
  INFO(r.out, r.err);
  CHECK(r.exit_code == 0);
  CHECK(has(r.out, "TTS optimum          none: p = 0 at every duration simulated"));
  CHECK_FALSE(has(r.out, "()"));
}
