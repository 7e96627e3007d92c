// Outputs never replace inputs or special files; FIFOs as inputs never block;
// journals drop a damaged line instead of refusing the whole file, a refused
// run leaves no journal, and Ctrl-C before the first point claims no result.
// Common practice for command-line tools that write files (no outside source):
// an output that is an input (same device and inode, through any link) or a
// special file is refused with exit 2 before any work, naming the option.
#include <doctest/doctest.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <thread>

#include <sys/stat.h>

#include "io/result_journal.hpp"
#include "io/toml_reader.hpp"
#include "test_support.hpp"

using namespace gapwise;
namespace fs = std::filesystem;

namespace {

std::string q(const fs::path& p) { return "'" + p.string() + "'"; }

struct Inputs {
  testing::TempDir dir;
  fs::path problem, schedule;
  Inputs() {
    const auto src = testing::source_dir();
    problem = dir.path / "p.toml";
    schedule = dir.path / "s.toml";
    fs::copy_file(src / "data-samples/weak-field-ring.toml", problem);  // a problem with fields
    fs::copy_file(src / "schedules/linear.toml", schedule);
  }
  std::string both() const { return q(problem) + " " + q(schedule); }
};

// Refused with exit 2 before any work, the message naming `needle`; no
// temporary, probe or journal file is left in the folder.
void check_refused(const Inputs& in, const std::string& args, const std::string& needle) {
  const std::string p_before = read_text_file(in.problem.string()), s_before = read_text_file(in.schedule.string());
  const auto r = testing::run_gapwise(args, in.dir);
  INFO("gapwise " << args << "\nstderr: " << r.err);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find(needle) != std::string::npos);
  CHECK(read_text_file(in.problem.string()) == p_before);
  CHECK(read_text_file(in.schedule.string()) == s_before);
  for (const auto& e : fs::directory_iterator(in.dir.path)) {
    const std::string name = e.path().filename().string();
    CHECK(name.find(".tmp-") == std::string::npos);
    CHECK(name.find(".probe-") == std::string::npos);
    CHECK(name.find(".journal") == std::string::npos);
  }
}

}  // namespace

TEST_CASE("test_output_is_input: every output flag of every subcommand refuses an input, also through links") {
  Inputs in;
  fs::create_hard_link(in.problem, in.dir.path / "hard.toml");
  fs::create_symlink(in.problem, in.dir.path / "soft.toml");
  const std::string hard = q(in.dir.path / "hard.toml"), soft = q(in.dir.path / "soft.toml");
  const std::string P = q(in.problem), S = q(in.schedule);
  const std::string same = "is the same file as the problem input";
  check_refused(in, "anneal " + in.both() + " -d 5 --csv " + P, same);
  check_refused(in, "anneal " + in.both() + " -d 5 --out " + hard, same);
  check_refused(in, "anneal " + in.both() + " -d 5 --csv " + soft, same);
  check_refused(in, "anneal " + in.both() + " -d 5 --out " + S, "is the same file as the schedule input");
  check_refused(in, "durations " + in.both() + " --durations 5 --csv " + soft, same);
  check_refused(in, "gap " + in.both() + " --out " + hard, same);
  check_refused(in, "gap " + in.both() + " --csv " + P, same);
  check_refused(in, "gap-path " + in.both() + " --out " + S, "is the same file as the schedule input");
  check_refused(in, "pause-map " + in.both() + " -d 5 --out " + soft, same);
  check_refused(in, "reverse-map " + in.both() + " --start-bits 0000 --out " + hard, same);
  check_refused(in, "compare-paths " + in.both() + " -d 5 --csv " + hard, same);
  check_refused(in, "diagnose " + in.both() + " -d 5 --out " + soft, same);
  // A journal beside the output would be an input: the problem file named like one.
  const fs::path jp = in.dir.path / "r.h5.journal";
  fs::copy_file(in.problem, jp);
  const std::string jp_before = read_text_file(jp.string());
  const auto r = testing::run_gapwise("durations " + q(jp) + " " + S + " --durations 5 --out " + q(in.dir.path / "r.h5"), in.dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("the journal '" + jp.string() + "' is the same file as the problem input") != std::string::npos);
  CHECK(read_text_file(jp.string()) == jp_before);
}

TEST_CASE("test_output_is_input: merge-shards, embed-cost's --write-physical, figure") {
  Inputs in;
  const auto src = testing::source_dir();
  // embed-cost: the embedding file given again as --write-physical.
  const fs::path logical = in.dir.path / "logical.toml", emb = in.dir.path / "emb.toml";
  fs::copy_file(src / "data-samples/triangle.toml", logical);
  fs::copy_file(src / "data-samples/triangle-ring-embedding.toml", emb);
  check_refused(in, "embed-cost " + q(logical) + " " + q(emb) + " " + q(in.schedule) + " --write-physical " + q(emb),
                "--write-physical '" + emb.string() + "' is the same file as the embedding input");
  // merge-shards: --out is one of the shards (the check comes before reading them).
  const fs::path shard = in.dir.path / "part-0.h5";
  { std::ofstream(shard) << "not read"; }
  check_refused(in, "merge-shards " + q(shard) + " --out " + q(shard), "is the same file as the shard input");
  // figure: a figure's file name hard-linked to the result it draws.
  const fs::path h5 = in.dir.path / "run.h5", figs = in.dir.path / "figs";
  REQUIRE(testing::run_gapwise("anneal " + in.both() + " -d 5 --no-check --out " + q(h5), in.dir).exit_code == 0);
  fs::create_directories(figs);
  fs::create_hard_link(h5, figs / "run-anneal-trace.svg");
  const std::string h5_before = read_text_file(h5.string());
  const auto r = testing::run_gapwise("figure " + q(h5) + " --out-dir " + q(figs), in.dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("figure '" + (figs / "run-anneal-trace.svg").string() + "' is the same file as the result input") !=
        std::string::npos);
  CHECK(read_text_file(h5.string()) == h5_before);
  // Two results whose figures would share names.
  fs::create_directories(in.dir.path / "other");
  fs::copy_file(h5, in.dir.path / "other/run.h5");
  const auto r2 = testing::run_gapwise("figure " + q(h5) + " " + q(in.dir.path / "other/run.h5") + " --out-dir " +
                                           q(in.dir.path / "figs2"),
                                       in.dir);
  CHECK(r2.exit_code == 2);
  CHECK(r2.err.find("have the same name stem 'run'") != std::string::npos);
  CHECK_FALSE(fs::exists(in.dir.path / "figs2/run-anneal-trace.svg"));
}

TEST_CASE("test_outputs_collide: two outputs of one run naming the same file are refused") {
  Inputs in;
  const std::string x = q(in.dir.path / "x.h5");
  check_refused(in, "anneal " + in.both() + " -d 5 --out " + x + " --csv " + x, "are the same file");
  check_refused(in, "gap " + in.both() + " --out " + x + " --csv " + q(in.dir.path / "sub/../x.h5"), "are the same file");
  // The journal durations keeps beside --out, given as --csv.
  check_refused(in, "durations " + in.both() + " --durations 5 --out " + x + " --csv " + q(in.dir.path / "x.h5.journal"),
                "and the journal '" + (in.dir.path / "x.h5.journal").string() + "' are the same file");
  check_refused(in, "embed-cost " + q(testing::source_dir() / "data-samples/triangle.toml") + " " +
                        q(testing::source_dir() / "data-samples/triangle-ring-embedding.toml") + " " + q(in.schedule) +
                        " --csv " + x + " --write-physical " + x,
                "are the same file");
}

TEST_CASE("test_special_output: FIFOs, links to devices and to /proc/self/fd/1 are refused, never replaced") {
  Inputs in;
  const fs::path fifo = in.dir.path / "pipe.csv", fd1 = in.dir.path / "fd1.csv", null_link = in.dir.path / "null.csv";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  fs::create_symlink("/proc/self/fd/1", fd1);
  fs::create_symlink("/dev/null", null_link);
  check_refused(in, "anneal " + in.both() + " -d 5 --csv " + q(fifo), "exists and is a FIFO (named pipe)");
  check_refused(in, "gap " + in.both() + " --out " + q(fifo), "exists and is a FIFO (named pipe)");
  check_refused(in, "anneal " + in.both() + " -d 5 --csv " + q(fd1), "in a system folder (/dev, /proc or /sys)");
  check_refused(in, "gap-path " + in.both() + " --out " + q(null_link), "in a system folder (/dev, /proc or /sys)");
  CHECK(fs::is_fifo(fifo));
  CHECK(fs::is_symlink(fd1));
  CHECK(fs::read_symlink(fd1) == "/proc/self/fd/1");
  CHECK(fs::read_symlink(null_link) == "/dev/null");
  CHECK(fs::is_character_file("/dev/null"));
}

TEST_CASE("test_fifo_input: a FIFO (or device) given as an input is refused at once instead of blocking") {
  Inputs in;
  const fs::path fifo = in.dir.path / "problem.toml";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  // `timeout` ends a run that blocks on opening the FIFO (exit 124): the failure before the fix.
  for (const std::string& cmd : {"inspect " + q(fifo), "anneal " + q(fifo) + " " + q(in.schedule) + " -d 5",
                                 "anneal " + q(in.problem) + " " + q(fifo) + " -d 5",
                                 "ensemble " + q(fifo) + " " + q(in.schedule) + " --out " + q(in.dir.path / "e.h5")}) {
    const std::string line = "timeout 20 '" + testing::gapwise_exe() + "' " + cmd + " 2>'" +
                             (in.dir.path / "err.txt").string() + "'";
    const int rc = std::system(line.c_str());
    INFO(cmd);
    CHECK(WEXITSTATUS(rc) == 2);
    CHECK(read_text_file((in.dir.path / "err.txt").string()).find("is a FIFO (named pipe), not a regular file") !=
          std::string::npos);
  }
}

TEST_CASE("test_empty_output_path: --out \"\" and --csv \"\" are refused before any work, naming the option") {
  Inputs in;
  for (const std::string& cmd :
       {"anneal " + in.both() + " -d 5 --out ''", "anneal " + in.both() + " -d 5 --csv ''",
        "durations " + in.both() + " --durations 5 --csv ''", "gap-path " + in.both() + " --out ''",
        std::string("generate --out ''"), "figure " + q(in.problem) + " --out-dir ''"}) {
    const auto r = testing::run_gapwise(cmd, in.dir);
    INFO(cmd << "\n" << r.err);
    CHECK(r.exit_code == 2);
    CHECK(r.err.find("the path is empty") != std::string::npos);
    CHECK((r.err.find("--out") != std::string::npos || r.err.find("--csv") != std::string::npos));
    CHECK(r.out.empty());
  }
}

TEST_CASE("test_journal_damaged_line: a damaged line in the middle is dropped with a warning and redone") {
  testing::TempDir dir;
  const JournalLayout layout{"test-study", {"a"}, {"x"}};
  const auto fp = input_fingerprint({"p"});
  const std::string path = (dir.path / "j.journal").string();
  { ResultJournal j(path, layout, fp); j.append({1}, {10}); j.append({2}, {20}); j.append({3}, {30}); }
  std::string text = read_text_file(path);
  const auto at = text.find("0x1p+1 ");  // the record of key 2 (line 4)
  REQUIRE(at != std::string::npos);
  text[at + 2] = '7';  // its checksum no longer matches
  { std::ofstream(path, std::ios::binary) << text; }
  std::vector<std::string> seen;
  auto old = ResultJournal::set_warning_sink([&](const std::string& m) { seen.push_back(m); });
  {
    ResultJournal j(path, layout, fp);
    CHECK(j.resumed() == 2);
    CHECK(j.find({1}));
    CHECK_FALSE(j.find({2}));  // redone by the study
    CHECK((*j.find({3}))[0] == 30.0);
    REQUIRE(j.warnings().size() == 1);
    CHECK(j.warnings()[0].find(path + ":4: a damaged record was dropped: its checksum does not match") == 0);
    j.append({2}, {20});
  }
  ResultJournal::set_warning_sink(old);
  CHECK(seen.size() == 1);
  // Compacted: the damaged line is gone, every record is read back, no warning.
  ResultJournal j(path, layout, fp);
  CHECK(j.resumed() == 3);
  CHECK(j.warnings().empty());
  CHECK((*j.find({2}))[0] == 20.0);
}

TEST_CASE("test_journal_damaged_line: a sweep resumes over a damaged journal line and recomputes that point") {
  Inputs in;
  const fs::path out = in.dir.path / "r.h5", journal = in.dir.path / "r.h5.journal";
  const std::string cmd = "durations " + in.both() + " --durations 2,4,6 --no-search --no-predictions --quiet --out " + q(out);
  REQUIRE(testing::run_gapwise(cmd, in.dir).exit_code == 0);
  const std::string clean = read_text_file(journal.string());
  std::string text = clean;
  const auto line4 = text.find('\n', text.find('\n', text.find('\n') + 1) + 1) + 1;  // the second record
  text[line4] = 'z';
  { std::ofstream(journal, std::ios::binary) << text; }
  const auto r = testing::run_gapwise(cmd, in.dir);
  CHECK(r.exit_code == 0);
  CHECK(r.err.find("gapwise: warning: " + journal.string() + ":4: a damaged record was dropped") != std::string::npos);
  CHECK(testing::journal_records(journal) == 3);
}

TEST_CASE("test_refused_run_leaves_no_journal: a refusal after the journal is opened removes it") {
  Inputs in;
  // pause-map checks a pause against the duration inside the study (the journal is open by then).
  const fs::path out = in.dir.path / "m.h5";
  const auto r = testing::run_gapwise("pause-map " + in.both() + " -d 5 --pause-ns 5 --out " + q(out), in.dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--pause-ns") != std::string::npos);
  CHECK_FALSE(fs::exists(fs::path(out.string() + ".journal")));
  CHECK_FALSE(fs::exists(out));
  // A journal with results from before is kept by a refused run.
  const fs::path out2 = in.dir.path / "n.h5";
  const std::string ok = "pause-map " + in.both() + " -d 10 --at 0.5 --pause-ns 0,2 --out " + q(out2);
  REQUIRE(testing::run_gapwise(ok, in.dir).exit_code == 0);
  const std::string journal_before = read_text_file(out2.string() + ".journal");
  REQUIRE(testing::journal_records(out2.string() + ".journal") > 0);
  CHECK(testing::run_gapwise(ok + " --at 0.5,2", in.dir).exit_code == 2);
  CHECK(read_text_file(out2.string() + ".journal") == journal_before);
}

TEST_CASE("test_interrupt_before_first_point: Ctrl-C says nothing was written and leaves no journal") {
  Inputs in;
  const fs::path out = in.dir.path / "long.h5", csv = in.dir.path / "long.csv";
  const fs::path journal = out.string() + ".journal", err = in.dir.path / "err.txt";
  // One long anneal (the first point takes seconds); SIGINT once its journal is open.
  const std::string line = "'" + testing::gapwise_exe() + "' durations " + in.both() +
                           " --durations 100000 --no-search --no-predictions --quiet --out " + q(out) + " --csv " +
                           q(csv) + " 2>" + q(err) + " & pid=$!; for i in $(seq 200); do [ -e " + q(journal) +
                           " ] && break; sleep 0.05; done; sleep 0.3; kill -INT $pid; wait $pid";
  const int rc = std::system(line.c_str());
  CHECK(WEXITSTATUS(rc) == 128 + SIGINT);
  const std::string said = read_text_file(err.string());
  INFO(said);
  CHECK(said.find("interrupted before the first point finished: nothing was written") != std::string::npos);
  CHECK(said.find("saved in") == std::string::npos);  // no claim of a result file
  CHECK_FALSE(fs::exists(journal));
  CHECK_FALSE(fs::exists(out));
  CHECK_FALSE(fs::exists(csv));
}

TEST_CASE("test_ensemble_interrupt_before_first_instance: Ctrl-C during ensemble says nothing was written") {
  Inputs in;
  const fs::path set = in.dir.path / "set";
  fs::create_directory(set);
  fs::copy_file(in.problem, set / "ring.toml");  // 8 qubits with fields: one long anneal takes many seconds
  const fs::path out = in.dir.path / "e.h5", csv = in.dir.path / "e.csv";
  const fs::path journal = out.string() + ".journal", err = in.dir.path / "err.txt";
  // Before this notice the shell's background job ignored SIGINT and the run went on to the end.
  const std::string line = "'" + testing::gapwise_exe() + "' ensemble " + q(set) + " " + q(in.schedule) +
                           " -d 100000 -q --threads 1 --out " + q(out) + " --csv " + q(csv) + " 2>" + q(err) +
                           " & pid=$!; for i in $(seq 200); do [ -e " + q(journal) +
                           " ] && break; sleep 0.05; done; sleep 0.3; kill -INT $pid; wait $pid";
  const int rc = std::system(line.c_str());
  CHECK(WEXITSTATUS(rc) == 128 + SIGINT);
  const std::string said = read_text_file(err.string());
  INFO(said);
  CHECK(said.find("interrupted before the first instance finished: nothing was written") != std::string::npos);
  CHECK(said.find("saved in") == std::string::npos);
  CHECK_FALSE(fs::exists(journal));
  CHECK_FALSE(fs::exists(out));
  CHECK_FALSE(fs::exists(csv));
}

TEST_CASE("test_ensemble_interrupt_after_an_instance: Ctrl-C says how many instances the journal holds") {
  Inputs in;
  const fs::path set = in.dir.path / "set";
  fs::create_directory(set);
  fs::copy_file(in.problem, set / "ring.toml");  // slow at 100000 ns
  fs::copy_file(testing::source_dir() / "data-samples/triangle.toml", set / "tri.toml");  // done in well under a second
  const fs::path out = in.dir.path / "e.h5", journal = out.string() + ".journal", err = in.dir.path / "err.txt";
  // Two threads: the triangle finishes while the ring still runs; SIGINT once its record is in the journal.
  const std::string line = "'" + testing::gapwise_exe() + "' ensemble " + q(set) + " " + q(in.schedule) +
                           " -d 1,100000 -q --threads 2 --out " + q(out) + " 2>" + q(err) +
                           " & pid=$!; for i in $(seq 400); do [ -e " + q(journal) + " ] && [ $(wc -l < " + q(journal) +
                           ") -ge 3 ] && break; sleep 0.05; done; kill -INT $pid; wait $pid";
  const int rc = std::system(line.c_str());
  CHECK(WEXITSTATUS(rc) == 128 + SIGINT);
  const std::string said = read_text_file(err.string());
  INFO(said);
  CHECK(said.find("interrupted; 1 finished instance(s) are saved in the journal " + journal.string() +
                  ". Run the same command again to continue") != std::string::npos);
  CHECK(testing::journal_records(journal) == 1);
  CHECK_FALSE(fs::exists(out));
}

TEST_CASE("test_ensemble_refused_late_leaves_no_journal: an instance refused after others finished leaves no journal") {
  Inputs in;
  const fs::path set = in.dir.path / "set";
  fs::create_directory(set);
  fs::copy_file(testing::source_dir() / "data-samples/triangle.toml", set / "tri.toml");  // 3 qubits: computed first
  { std::ofstream(set / "flat.toml") << "qubits = 2\n"; }  // no fields, no couplings: no gap to find, refused late
  const fs::path out = in.dir.path / "e.h5";
  const auto r = testing::run_gapwise("ensemble " + q(set) + " " + q(in.schedule) + " -d 1 -q --threads 1 --out " + q(out), in.dir);
  INFO(r.err);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("flat.toml") != std::string::npos);
  CHECK_FALSE(fs::exists(fs::path(out.string() + ".journal")));
  CHECK_FALSE(fs::exists(out));
}
