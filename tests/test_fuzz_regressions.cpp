// Every input a fuzz target ever broke a parser with, kept under
// tests/fuzz-regressions/<parser>/ and replayed through the same contract the
// fuzz targets check (fuzz/parser_checks.hpp): the parser returns a valid model
// that survives a write/re-read round trip, or throws InputError naming the file.
#include <doctest/doctest.h>

#include <algorithm>
#include <filesystem>
#include <limits>
#include <vector>

#include "io/toml_reader.hpp"
#include "parser_checks.hpp"
#include "test_support.hpp"

namespace fs = std::filesystem;
using namespace gapwise;

namespace {
std::vector<fs::path> inputs_in(const std::string& parser) {
  std::vector<fs::path> out;
  const fs::path dir = testing::source_dir() / "tests" / "fuzz-regressions" / parser;
  for (const auto& e : fs::directory_iterator(dir))
    if (e.is_regular_file() && e.path().filename() != "README.md") out.push_back(e.path());
  std::sort(out.begin(), out.end());
  return out;
}

// Every saved input of `parser` through its contract check.
template <class Check>
void replay(const std::string& parser, Check check) {
  const auto files = inputs_in(parser);
  CHECK(!files.empty());
  for (const auto& f : files) {
    INFO("input: " << f.string());
    const std::string bytes = read_text_file(f.string());
    CHECK_NOTHROW(check(bytes));
  }
}
}  // namespace

TEST_CASE("saved fuzz inputs for the problem parser keep the parser contract") {
  replay("problem", [](const std::string& b) { fuzzing::check_problem_input(b); });
}

TEST_CASE("saved fuzz inputs for the schedule parser keep the parser contract") {
  replay("schedule", [](const std::string& b) { fuzzing::check_schedule_input(b); });
}

TEST_CASE("saved fuzz inputs for the embedding parser keep the parser contract") {
  replay("embedding", [](const std::string& b) { fuzzing::check_embedding_input(b); });
}

TEST_CASE("saved fuzz inputs for the instance-set reader keep the reader contract") {
  // Each file is a fuzz input: its first byte picks raw, re-sealed image or built
  // file (mod 4). The saved inputs are gapwise's own files (or inputs that broke
  // our reader, never HDF5), so valid seals and re-sealed images are parsed too.
  fuzzing::InstanceSetFuzzOptions all;
  all.parse_valid_seals = true;
  all.reseal_images = true;
  replay("instance-set", [&](const std::string& b) { fuzzing::check_instance_set_input(b, all); });
}

TEST_CASE("saved fuzz inputs for the result journal reader keep the reader contract") {
  // First byte: 0 mod 3 raw, 1 header + recomputed checksums, 2 header + raw lines.
  replay("journal", [](const std::string& b) { fuzzing::check_journal_input(b); });
}

TEST_CASE("the contract check itself catches a broken round trip and a foreign exception") {
  // A check that cannot fail is no check: feed the checker models that break it.
  IsingProblem bad(2);
  bad.h[0] = std::numeric_limits<double>::infinity();
  CHECK_THROWS_AS(fuzzing::check_problem_model(bad), std::logic_error);
  IsingProblem disordered(3);
  disordered.couplings.push_back({2, 1, 1.0});
  CHECK_THROWS_AS(fuzzing::check_problem_model(disordered), std::logic_error);
  // Valid input passes.
  CHECK_NOTHROW(fuzzing::check_problem_input("qubits = 2\ncouplings = [[0, 1, -1.0]]\n"));
  CHECK_NOTHROW(fuzzing::check_schedule_input("[path]\nduration_ns = 10\n"));
}

TEST_CASE("the built instance-set mode reaches the reader with the content it describes") {
  // If the builder silently produced nothing, fuzzing mode 3 would test nothing:
  // the saved seed must come back as the set it spells out, and one NaN in it
  // must be refused by the reader (not by HDF5, not by the builder).
  const fs::path dir = testing::source_dir() / "tests" / "fuzz-regressions" / "instance-set";
  const std::string good = read_text_file((dir / "built-three-qubits.bin").string());
  const std::string image = fuzzing::build_instance_set_image(fuzzing::ByteFeed{std::string_view(good).substr(1)});
  REQUIRE(!image.empty());
  const InstanceSet set = parse_instance_set_bytes(image, "built.h5");
  REQUIRE(set.instances.size() == 1);
  CHECK(set.instances[0].name == "n03-000");
  const IsingProblem& p = set.instances[0].problem;
  CHECK(p.qubits == 3);
  CHECK(p.h == std::vector<double>{1.0, -1.0, 0.5});
  REQUIRE(p.couplings.size() == 1);
  CHECK(p.couplings[0].i == 0);
  CHECK(p.couplings[0].j == 1);
  CHECK(p.couplings[0].value == -1.0);

  const std::string bad = read_text_file((dir / "built-nan-field.bin").string());
  const std::string bad_image = fuzzing::build_instance_set_image(fuzzing::ByteFeed{std::string_view(bad).substr(1)});
  REQUIRE(!bad_image.empty());
  try {
    (void)parse_instance_set_bytes(bad_image, "built.h5");
    FAIL("a NaN field was accepted");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()).find("fields[1]") != std::string::npos);
  }
}

TEST_CASE("a raw fuzz input with a valid seal is not handed to HDF5 unless asked") {
  // The fuzzer forges seals by copying the checksum it sees compared; by default
  // such inputs stop after the seal check. A real file passes the check either way.
  const fs::path dir = testing::source_dir() / "tests" / "fuzz-regressions" / "instance-set";
  const std::string whole = read_text_file((dir / "ring-pm1-sealed.bin").string());
  REQUIRE(static_cast<unsigned char>(whole[0]) % 4 == 0);
  CHECK_NOTHROW(check_hdf5_seal(std::string_view(whole).substr(1), "set.h5", "gapwise-instance-set"));
  CHECK_NOTHROW(fuzzing::check_instance_set_input(whole));
  // A damaged copy is refused by the seal with an InputError in either mode.
  std::string damaged = whole;
  damaged[damaged.size() / 2] ^= 0x40;
  CHECK_THROWS_AS(check_hdf5_seal(std::string_view(damaged).substr(1), "set.h5", "gapwise-instance-set"), InputError);
  CHECK_NOTHROW(fuzzing::check_instance_set_input(damaged));
}
