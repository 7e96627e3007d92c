// The command line end to end: the inspect and anneal subcommands on bundled
// samples, their JSON and HDF5 outputs, and the exit-code contract
// (0 ok, 2 bad input, 1 internal failure). JSON is checked with Python's json
// module (a general-purpose reference parser), HDF5 by reading it back with
// the HDF5 library.
#include <doctest/doctest.h>

#include <H5Cpp.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <vector>

#include "hamiltonian/memory_budget.hpp"
#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {
std::string sample(const char* rel) { return "'" + (source_dir() / rel).string() + "'"; }

// Value of a top-level key of a JSON text, printed by Python's json module.
std::string json_value(const TempDir& dir, const std::string& json, const std::string& key) {
  const auto f = dir.write("summary.json", json);
  const auto out = dir.path / "value.txt";
  const std::string cmd = "/usr/bin/python3 -c \"import json,sys; print(json.load(open(sys.argv[1]))[sys.argv[2]])\" '" +
                          f.string() + "' " + key + " > '" + out.string() + "'";
  REQUIRE(std::system(cmd.c_str()) == 0);
  std::ifstream in(out);
  std::string v;
  std::getline(in, v);
  return v;
}
}  // namespace

TEST_CASE("inspect: the triangle's ground state, checked by hand") {
  // h = (0.3, -0.1, 0.05), J = +1 on all three pairs. Every frustrated state has
  // coupling energy -1; the fields pick s = (-, +, -): -0.3 - 0.1 - 0.05 - 1 = -1.45.
  TempDir dir;
  auto r = run_gapwise("inspect " + sample("data-samples/triangle.toml") + " --json", dir);
  REQUIRE(r.exit_code == 0);
  CHECK(std::stod(json_value(dir, r.out, "ground_energy")) == doctest::Approx(-1.45));
  CHECK(json_value(dir, r.out, "ground_degeneracy") == "1");
  CHECK(json_value(dir, r.out, "ground_states_bits") == "['101']");
  auto t = run_gapwise("inspect " + sample("data-samples/triangle.toml"), dir);
  CHECK(t.exit_code == 0);
  CHECK(t.out.find("degeneracy 1") != std::string::npos);
}

TEST_CASE("anneal: text, JSON and HDF5 agree; the HDF5 file carries units and provenance") {
  TempDir dir;
  const std::string h5 = (dir.path / "run.h5").string();
  const std::string csv = (dir.path / "trace.csv").string();
  auto r = run_gapwise("anneal " + sample("data-samples/triangle.toml") + " " + sample("schedules/linear.toml") +
                           " -d 10 --json --out '" + h5 + "' --csv '" + csv + "'",
                       dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const double p = std::stod(json_value(dir, r.out, "ground_probability"));
  CHECK(p > 0.0);
  CHECK(p < 1.0);
  CHECK(std::stod(json_value(dir, r.out, "duration_ns")) == 10.0);
  CHECK(std::stod(json_value(dir, r.out, "convergence_delta_p")) < 1e-6);

  H5::H5File f(h5, H5F_ACC_RDONLY);
  double p_h5 = 0;
  f.openGroup("/anneal").openAttribute("ground_probability").read(H5::PredType::NATIVE_DOUBLE, &p_h5);
  CHECK(p_h5 == doctest::Approx(p).epsilon(1e-12));
  H5::DataSet t = f.openDataSet("/anneal/trace/t");
  std::string unit;
  H5::StrType utf8(H5::PredType::C_S1, H5T_VARIABLE);
  utf8.setCset(H5T_CSET_UTF8);  // every string gapwise writes is UTF-8
  t.openAttribute("units").read(utf8, unit);
  CHECK(unit == "ns");
  std::string version;
  f.openGroup("/provenance").openAttribute("version").read(utf8, version);
  CHECK(!version.empty());
  // final probabilities sum to the norm
  H5::DataSet fp = f.openDataSet("/anneal/final_probabilities");
  std::vector<double> probs(8);
  fp.read(probs.data(), H5::PredType::NATIVE_DOUBLE);
  double sum = 0;
  for (double x : probs) sum += x;
  CHECK(sum == doctest::Approx(1.0).epsilon(1e-6));
  CHECK(probs[0b101] == doctest::Approx(p).epsilon(1e-12));

  std::ifstream c(csv);
  std::string header;
  std::getline(c, header);
  CHECK(header == "t_ns,s,p_ground,energy_ghz,norm");
}

TEST_CASE("exit codes: 2 for bad input with the place named, 0 for --help") {
  TempDir dir;
  const auto bad = dir.write("bad.toml", "qubits = 2\ncouplings = [[0, 0, 1.0]]\n");
  auto r = run_gapwise("anneal '" + bad.string() + "' " + sample("schedules/linear.toml"), dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("bad.toml:2") != std::string::npos);
  CHECK(r.err.find("self-coupling") != std::string::npos);
  auto m = run_gapwise("anneal /nonexistent/x.toml " + sample("schedules/linear.toml"), dir);
  CHECK(m.exit_code == 2);
  auto d = run_gapwise("anneal " + sample("data-samples/triangle.toml") + " " + sample("schedules/linear.toml") +
                           " --out '" + dir.path.string() + "'",
                       dir);
  CHECK(d.exit_code == 2);
  CHECK(d.err.find("directory") != std::string::npos);
  auto h = run_gapwise("anneal --help", dir);
  CHECK(h.exit_code == 0);
  CHECK(h.out.find("-d,--durations") != std::string::npos);
}

TEST_CASE("memory refusals of every subcommand name the line of `qubits` in the problem file") {
  // The file parser accepts a problem whose state fits (24 bytes per amplitude);
  // each dynamics subcommand then needs about 10 complex states (168 bytes per
  // amplitude, memory_budget.hpp) and refuses. Pick n so that, on this machine,
  // the parser passes and the commands refuse, each with a factor 1.5 to spare
  // (the two bounds are a factor 7 apart, so such an n always exists).
  const double have = gapwise::available_bytes();
  if (!(have > 0)) {
    MESSAGE("MemAvailable unknown on this machine: no memory refusal to provoke");
    return;
  }
  int n = 0;
  for (int q = 2; q <= gapwise::kMaxQubits; ++q)
    if (gapwise::estimate_bytes(q, 1, 0) <= 0.9 * have / 1.5 && gapwise::estimate_bytes(q, 10, 0) >= 1.5 * 0.9 * have)
      n = q;
  if (n == 0) {
    MESSAGE("this machine has more memory than " << gapwise::kMaxQubits << " qubits can use: nothing to refuse");
    return;
  }
  TempDir dir;
  std::string text = "format = \"gapwise-problem\"\nformat_version = 1\n# a chain too large for this machine\nkind = \"ising\"\n"
                     "qubits = " + std::to_string(n) + "\ncouplings = [[0, 1, -1.0]]\n";  // qubits on line 5, value in column 10
  const auto big = dir.write("big-chain.toml", text);
  const std::string p = "'" + big.string() + "' ", s = sample("schedules/linear.toml") + " ";
  const std::string o = " --out '" + (dir.path / "r.h5").string() + "'";
  for (const std::string& args : {"anneal " + p + s, "compare-paths " + p + s + "-d 10", "pause-map " + p + s + "-d 10" + o,
                                  "reverse-map " + p + s + o, "durations " + p + s, "diagnose " + p + s + "-d 10"}) {
    const auto r = run_gapwise(args, dir);
    INFO(args);
    INFO(r.err);
    CHECK(r.exit_code == 2);
    CHECK(r.err.find("big-chain.toml:5:10: key 'qubits'") != std::string::npos);
    CHECK(r.err.find("need about") != std::string::npos);  // the estimate is shown
    CHECK(r.err.find("Fix:") != std::string::npos);
  }
  // The spectrum commands refuse above 20 qubits whatever the memory.
  text = "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\n\nqubits = 21\ncouplings = [[0, 1, -1.0]]\n";
  const auto b21 = dir.write("chain-21.toml", text);
  for (const std::string& args : {"gap '" + b21.string() + "'", "gap-path '" + b21.string() + "' " + s + o}) {
    const auto r = run_gapwise(args, dir);
    INFO(args);
    INFO(r.err);
    CHECK(r.exit_code == 2);
    CHECK(r.err.find("chain-21.toml:5:10: key 'qubits'") != std::string::npos);
    CHECK(r.err.find("at most 20") != std::string::npos);
  }
}

TEST_CASE("anneal --p-only: p still within the tolerance of a tight Boost.Odeint run, on no more steps") {
  // Reference: the odeint propagator (Boost.Odeint's Dormand-Prince stepper, a
  // general-purpose library) at tolerance 1e-9.
  TempDir dir;
  const std::string args = "anneal " + sample("data-samples/spin-glass-8.toml") + " " + sample("schedules/linear.toml") +
                           " -d 20 --json --no-check ";
  auto ref = run_gapwise(args + "--propagator odeint --tolerance 1e-9", dir);
  auto all = run_gapwise(args + "--propagator split2 --tolerance 1e-6", dir);
  auto ponly = run_gapwise(args + "--propagator split2 --tolerance 1e-6 --p-only", dir);
  INFO(ponly.err);
  REQUIRE(ref.exit_code == 0);
  REQUIRE(all.exit_code == 0);
  REQUIRE(ponly.exit_code == 0);
  CHECK(json_value(dir, ponly.out, "p_only") == "True");
  CHECK(json_value(dir, all.out, "p_only") == "False");
  const double p_ref = std::stod(json_value(dir, ref.out, "ground_probability"));
  const double p = std::stod(json_value(dir, ponly.out, "ground_probability"));
  CHECK(std::abs(p - p_ref) < 1e-6);
  CHECK(std::stod(json_value(dir, ponly.out, "error_estimate")) <= 5e-7);
  CHECK(std::stol(json_value(dir, ponly.out, "steps")) <= std::stol(json_value(dir, all.out, "steps")));
}
