// The journal of finished points: exact round trip, resume, torn last line,
// refusal of foreign or locked journals. Common practice (append-only log with
// per-record checksums), no outside source.
#include <cerrno>
#include <cmath>
#include <cstring>
#include <fstream>
#include <limits>

#include <doctest/doctest.h>

#include "io/input_error.hpp"
#include "io/result_journal.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {
JournalLayout layout() { return {"test-study", {"a", "b"}, {"x", "y"}}; }
}

TEST_CASE("records round-trip bit for bit and are found again after reopening") {
  testing::TempDir dir;
  const std::string path = (dir.path / "j.journal").string();
  const double third = 1.0 / 3.0, tiny = std::numeric_limits<double>::denorm_min();
  {
    ResultJournal j(path, layout(), input_fingerprint({"problem", "schedule"}));
    CHECK(j.resumed() == 0);
    j.append({0.1, 2.0}, {third, tiny});
    j.append({0.2, 2.0}, {-0.0, std::numeric_limits<double>::infinity()});
    CHECK(j.size() == 2);
  }
  ResultJournal j(path, layout(), input_fingerprint({"problem", "schedule"}));
  CHECK(j.resumed() == 2);
  const auto v = j.find({0.1, 2.0});
  REQUIRE(v);
  CHECK((*v)[0] == third);
  CHECK((*v)[1] == tiny);
  CHECK(std::isinf((*j.find({0.2, 2.0}))[1]));
  CHECK_FALSE(j.find({0.1, 2.0000000000000004}));
}

TEST_CASE("a torn last line (killed mid-write) is dropped and the journal stays usable") {
  testing::TempDir dir;
  const std::string path = (dir.path / "j.journal").string();
  const auto fp = input_fingerprint({"p"});
  { ResultJournal j(path, layout(), fp); j.append({1, 1}, {2, 3}); j.append({2, 1}, {4, 5}); }
  { std::ofstream(path, std::ios::app) << "0x1p+0 0x1p+1 0x1.8p"; }  // no checksum, no newline
  {
    ResultJournal j(path, layout(), fp);
    CHECK(j.resumed() == 2);
    j.append({3, 1}, {6, 7});
  }
  ResultJournal j(path, layout(), fp);
  CHECK(j.resumed() == 3);
  CHECK((*j.find({3, 1}))[1] == 7.0);
}

TEST_CASE("a record whose checksum does not match is not believed") {
  testing::TempDir dir;
  const std::string path = (dir.path / "j.journal").string();
  const auto fp = input_fingerprint({"p"});
  { ResultJournal j(path, layout(), fp); j.append({1, 1}, {2, 3}); }
  std::string text;
  { std::ifstream f(path); text.assign(std::istreambuf_iterator<char>(f), {}); }
  const auto k = text.rfind("0x1p+1");  // the value 2 in the record line
  REQUIRE(k != std::string::npos);
  text.replace(k, 6, "0x1p+2");
  { std::ofstream(path) << text; }
  ResultJournal j(path, layout(), fp);
  CHECK(j.resumed() == 0);  // damaged last line dropped, not misread as 4
}

TEST_CASE("journals of other inputs or other studies are refused, and a journal in use is locked") {
  testing::TempDir dir;
  const std::string path = (dir.path / "j.journal").string();
  ResultJournal j(path, layout(), input_fingerprint({"p"}));
  CHECK_THROWS_AS(ResultJournal(path, layout(), input_fingerprint({"p"})), InputError);  // locked
  j.append({1, 1}, {1, 1});
  // Fingerprints separate the parts: ("ab","c") != ("a","bc").
  CHECK(input_fingerprint({"ab", "c"}) != input_fingerprint({"a", "bc"}));
  const std::string other = (dir.path / "k.journal").string();
  { ResultJournal k(other, layout(), input_fingerprint({"p"})); k.append({1, 1}, {1, 1}); }  // (an empty one is removed)
  CHECK_THROWS_AS(ResultJournal(other, layout(), input_fingerprint({"q"})), InputError);
  CHECK_THROWS_AS(ResultJournal(other, {"other-study", {"a", "b"}, {"x", "y"}}, input_fingerprint({"p"})), InputError);
  const std::string notj = dir.write("plain.txt", "hello\n").string();
  CHECK_THROWS_AS(ResultJournal(notj, layout(), input_fingerprint({"p"})), InputError);
}

TEST_CASE("parse_journal_text: records from text, NaN refused, a damaged middle line dropped with its line named") {
  const auto fp = input_fingerprint({"p"});
  const std::string head = journal_header(layout(), fp);
  const std::string a = journal_record_line({1, 2}, {0.5, std::numeric_limits<double>::infinity()});
  const std::string b = journal_record_line({3, 4}, {0.25, 7});
  const JournalContents c = parse_journal_text(head + a + b, "x.journal", layout(), fp);
  REQUIRE(c.records.size() == 2);
  CHECK(c.valid_bytes == head.size() + a.size() + b.size());
  CHECK(c.warnings.empty());
  CHECK(std::isinf(c.records.at({1, 2}).at(1)));  // an infinite time-to-solution (p = 0) is a value
  // A NaN is no value any study journals: a NaN line with a good checksum is
  // damaged, and dropped wherever it is, with a warning naming file and line.
  const std::string nan_line = journal_record_line({5, 6}, {std::nan(""), 1});
  CHECK(parse_journal_text(head + a + nan_line, "x.journal", layout(), fp).records.size() == 1);
  const JournalContents d = parse_journal_text(head + nan_line + b, "x.journal", layout(), fp);
  CHECK(d.records.size() == 1);
  CHECK(d.records.count({3, 4}) == 1);
  CHECK(d.valid_bytes == head.size());  // the clean journal: the header, then the lines after the dropped one
  CHECK(d.kept_after == b);
  REQUIRE(d.warnings.size() == 1);
  CHECK(d.warnings[0] == "x.journal:3: a damaged record was dropped: it holds a NaN, which no study writes; its point "
                         "will be computed again");
}

// flock(2) (Linux man-pages): EWOULDBLOCK when another process holds the lock,
// ENOLCK when the kernel (or an NFS mount without a lock daemon) has no lock
// records; file systems that cannot lock at all answer EOPNOTSUPP/ENOSYS/EINVAL.
// Before: every failure said "another gapwise run is using this journal".
TEST_CASE("journal locking failures: another run, or a file system without locks, named as such") {
  const InputError busy = journal_lock_error("/scratch/run.h5.journal", EWOULDBLOCK);
  CHECK(busy.problem() == "another gapwise run is using this journal right now");
  for (int err : {ENOLCK, EOPNOTSUPP, ENOSYS, EINVAL}) {
    const InputError e = journal_lock_error("/scratch/run.h5.journal", err);
    CHECK(e.place().file == "/scratch/run.h5.journal");
    CHECK(e.problem().find(std::strerror(err)) != std::string::npos);
    CHECK(e.problem().find("does not support file locks") != std::string::npos);
    CHECK(e.problem().find("another gapwise run") == std::string::npos);
    CHECK(e.fix().find("file system with locks") != std::string::npos);
  }
}

TEST_CASE("a journal held by another open journal is refused as in use") {
  testing::TempDir dir;
  const std::string path = (dir.path / "j.journal").string();
  const JournalLayout layout{"test", {"k"}, {"v"}};
  ResultJournal first(path, layout, "fp");
  try {
    ResultJournal second(path, layout, "fp");
    FAIL("the second open was not refused");
  } catch (const InputError& e) {
    CHECK(e.problem() == "another gapwise run is using this journal right now");
  }
}
