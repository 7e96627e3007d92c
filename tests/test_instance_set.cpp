// Instance sets on disk: the HDF5 form round-trips bit for bit, the directory form
// reads problem files, and damaged input is an InputError naming place and fix.
#include <doctest/doctest.h>

#include <H5Cpp.h>

#include <cstring>
#include <filesystem>
#include <fstream>

#include "io/hdf5_output.hpp"
#include "io/input_error.hpp"
#include "io/instance_set_file.hpp"
#include "io/toml_reader.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::TempDir;

namespace {
InstanceSet planted_set() {
  FamilySpec f;
  f.graph = GraphKind::SquareLattice;
  f.couplings = CouplingKind::PlantedLoops;
  f.seed = 12;
  InstanceSet set;
  set.family = family_name(f);
  set.family_seed = f.seed;
  set.generator = "test";
  set.instances = generate_family(f, {6, 8}, 3);
  return set;
}

void check_same_problems(const InstanceSet& a, const InstanceSet& b) {
  REQUIRE(a.instances.size() == b.instances.size());
  for (std::size_t k = 0; k < a.instances.size(); ++k) {
    const auto& x = a.instances[k];
    const auto& y = b.instances[k];
    CHECK(x.name == y.name);
    CHECK(x.problem.qubits == y.problem.qubits);
    CHECK(x.problem.h == y.problem.h);
    REQUIRE(x.problem.couplings.size() == y.problem.couplings.size());
    for (std::size_t c = 0; c < x.problem.couplings.size(); ++c) {
      CHECK(x.problem.couplings[c].i == y.problem.couplings[c].i);
      CHECK(x.problem.couplings[c].j == y.problem.couplings[c].j);
      CHECK(x.problem.couplings[c].value == y.problem.couplings[c].value);
    }
  }
  CHECK(a.fingerprint() == b.fingerprint());
}

// A minimal valid set written by hand, with its header given and `extra` added.
template <class F>
std::string hand_written(const TempDir& dir, const std::string& format, long long version, F extra) {
  const auto path = (dir.path / "hand.h5").string();
  Hdf5Output out(path, {"gapwise-instance-set", 1, true});
  out.attribute("/", "format", format);
  out.attribute("/", "format_version", version);
  out.write_strings("/instance_names", {"a"});
  out.attribute("/instances/a", "qubits", 2LL);
  out.write("/instances/a/fields", std::vector<double>{0.0, 0.5}, "1");
  out.write("/instances/a/coupling_i", std::vector<long long>{0}, "1");
  out.write("/instances/a/coupling_j", std::vector<long long>{1}, "1");
  out.write("/instances/a/coupling_value", std::vector<double>{-1.0}, "1");
  extra(out);
  out.commit();
  return read_text_file(path);
}
}  // namespace

TEST_CASE("HDF5 instance set round-trips problems, seeds and planted energies") {
  TempDir dir;
  const InstanceSet set = planted_set();
  const auto path = (dir.path / "set.h5").string();
  write_instance_set(path, set, "test");
  const InstanceSet back = read_instance_set(path);
  check_same_problems(set, back);
  CHECK(back.family == "square/planted");
  CHECK(back.family_seed == 12u);
  for (std::size_t k = 0; k < set.instances.size(); ++k) {
    CHECK(back.instances[k].seed == set.instances[k].seed);
    CHECK(back.instances[k].planted_energy == set.instances[k].planted_energy);
    CHECK(back.instances[k].planted_state == set.instances[k].planted_state);
    CHECK(back.instances[k].family == "square/planted");
  }
  // The same bytes through the in-memory reader.
  check_same_problems(set, parse_instance_set_bytes(read_text_file(path), "copy.h5"));
}

TEST_CASE("directory form: one problem file per instance, read in name order") {
  TempDir dir;
  const InstanceSet set = planted_set();
  write_instance_directory((dir.path / "set").string(), set);
  const InstanceSet back = read_instance_set((dir.path / "set").string());
  check_same_problems(set, back);  // %.17g round-trips doubles exactly
  CHECK_THROWS_WITH_AS(read_instance_set(dir.path.string()), doctest::Contains("no problem files"), InputError);
  CHECK_THROWS_WITH_AS(read_instance_set((dir.path / "absent.h5").string()), doctest::Contains("no such file"),
                       InputError);
}

TEST_CASE("damaged or foreign bytes are InputErrors with the place and a fix") {
  TempDir dir;
  CHECK_THROWS_WITH_AS(parse_instance_set_bytes("format = 1\n", "x.h5"), doctest::Contains("no gapwise seal"),
                       InputError);
  CHECK_THROWS_WITH_AS(parse_instance_set_bytes("", "x.h5"), doctest::Contains("Fix:"), InputError);
  const std::string good = hand_written(dir, "gapwise-instance-set", 1, [](Hdf5Output&) {});
  CHECK(parse_instance_set_bytes(good, "hand.h5").instances.at(0).problem.couplings.at(0).value == -1.0);
  // Truncated: the signature is there, the rest is not.
  CHECK_THROWS_WITH_AS(parse_instance_set_bytes(good.substr(0, good.size() / 2), "cut.h5"),
                       doctest::Contains("cut.h5"), InputError);
  // Flipped bytes anywhere: either still readable or an InputError, nothing else.
  int rejected = 0;
  for (std::size_t pos = 0; pos < good.size(); pos += 61) {
    std::string bad = good;
    bad[pos] = static_cast<char>(bad[pos] ^ 0x5a);
    try {
      (void)parse_instance_set_bytes(bad, "flipped.h5");
    } catch (const InputError&) {
      ++rejected;
    }
  }
  CHECK(rejected > 0);

  auto message = [&](const std::string& format, long long version, auto extra) {
    const std::string bytes = hand_written(dir, format, version, extra);
    try {
      (void)parse_instance_set_bytes(bytes, "hand.h5");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  auto nothing = [](Hdf5Output&) {};
  CHECK(message("gapwise-ensemble-result", 1, nothing) ==
        "hand.h5: key '@format': this HDF5 file is a \"gapwise-ensemble-result\", not an instance set. "
        "Fix: give a file written by `gapwise generate`");
  CHECK(message("gapwise-instance-set", 7, nothing).find("format_version 7 is not known") != std::string::npos);
  // An HDF5 file without the seal never reaches the HDF5 parser.
  {
    const auto path = (dir.path / "plain.h5").string();
    Hdf5Output plain(path);
    plain.attribute("/", "format", std::string("gapwise-instance-set"));
    plain.commit();
    CHECK_THROWS_WITH_AS(read_instance_set(path), doctest::Contains("no gapwise seal"), InputError);
  }
  // Bytes appended leave every object gapwise wrote intact: read as annotated.
  CHECK(parse_instance_set_bytes(good + "x", "long.h5").instances.size() == 1);
  // Objects the reader does not know are ignored (room for later additions).
  CHECK(message("gapwise-instance-set", 1, [](Hdf5Output& o) { o.write_strings("/notes", {"x"}); }) == "no error");
}

TEST_CASE("validation names the instance and the dataset") {
  TempDir dir;
  auto write_bad = [&](const std::string& what) {
    const auto path = (dir.path / (what + ".h5")).string();
    Hdf5Output out(path, {"gapwise-instance-set", 1, true});
    out.attribute("/", "format", std::string("gapwise-instance-set"));
    out.attribute("/", "format_version", 1LL);
    out.write_strings("/instance_names", {what == "missing" ? "ghost" : "a"});
    out.attribute("/instances/a", "qubits", what == "qubits" ? 0LL : 3LL);
    out.write("/instances/a/fields", std::vector<double>(what == "fields" ? 2 : 3, 0.0), "1");
    out.write("/instances/a/coupling_i", std::vector<long long>{what == "order" ? 2 : 0}, "1");
    out.write("/instances/a/coupling_j", std::vector<long long>{what == "range" ? 9 : 1}, "1");
    out.write("/instances/a/coupling_value", std::vector<double>{1.0}, "1");
    out.commit();
    try {
      (void)read_instance_set(path);
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  CHECK(write_bad("qubits").find("/instances/a@qubits") != std::string::npos);
  CHECK(write_bad("fields").find("/instances/a/fields': expected 3 entries, found 2") != std::string::npos);
  CHECK(write_bad("range").find("out of range") != std::string::npos);
  CHECK(write_bad("order").find("i < j") != std::string::npos);
  CHECK(write_bad("missing").find("/instances/ghost") != std::string::npos);
}

// The seal (io/hdf5_seal.hpp) lets another HDF5 client annotate a set (here the
// HDF5 C++ API, as h5py would: one attribute added in place) and still refuses a
// truncated file and a changed dataset. Common practice for data files that
// other tools annotate: check the content that matters, not the bytes.
TEST_CASE("the seal accepts an annotated instance set and refuses a truncated or altered one") {
  TempDir dir;
  InstanceSet set;
  set.family = "pair";
  set.generator = "hand";
  Instance inst;
  inst.name = "a";
  inst.problem.qubits = 2;
  inst.problem.h = {0.25, -0.5};
  inst.problem.couplings = {{0, 1, -1.0}};
  inst.problem.description = "Zweierkette \u2014 ein Paar";  // UTF-8 text
  set.instances.push_back(inst);
  const std::string path = (dir.path / "set.h5").string();
  write_instance_set(path, set, "test");
  const std::string whole = read_text_file(path);
  {
    H5::H5File f(path, H5F_ACC_RDWR);
    H5::Group g = f.openGroup("/instances/a");
    H5::StrType st(H5::PredType::C_S1, H5T_VARIABLE);
    st.setCset(H5T_CSET_UTF8);
    g.createAttribute("reviewed_by", st, H5::DataSpace(H5S_SCALAR)).write(st, std::string("Ren\u00e9e"));
  }
  REQUIRE(read_text_file(path) != whole);  // the bytes changed, so the whole-file checksum no longer holds
  const InstanceSet back = read_instance_set(path);
  REQUIRE(back.instances.size() == 1);
  CHECK(back.instances[0].problem.h == inst.problem.h);
  CHECK(back.instances[0].problem.description == inst.problem.description);
  CHECK(back.fingerprint() == set.fingerprint());
  // Truncated: refused before HDF5 sees a byte.
  const std::string annotated = read_text_file(path);
  CHECK_THROWS_WITH_AS(parse_instance_set_bytes(annotated.substr(0, annotated.size() - 40), "cut.h5"),
                       doctest::Contains("truncated"), InputError);
  CHECK_THROWS_WITH_AS(parse_instance_set_bytes(whole.substr(0, whole.size() - 1), "cut.h5"),
                       doctest::Contains("truncated"), InputError);
  // A dataset gapwise wrote, changed by the other client: refused, the dataset named.
  {
    H5::H5File f(path, H5F_ACC_RDWR);
    const std::vector<double> h{0.25, 0.5};
    f.openDataSet("/instances/a/fields").write(h.data(), H5::PredType::NATIVE_DOUBLE);
  }
  CHECK_THROWS_WITH_AS(read_instance_set(path), doctest::Contains("/instances/a/fields"), InputError);
  CHECK_THROWS_WITH_AS(read_instance_set(path), doctest::Contains("differs from what gapwise wrote"), InputError);
}
