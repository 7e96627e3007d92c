// Problem sizes with a bath (branch h18-large): from 7 qubits the open-system
// anneal keeps the lowest K instantaneous levels (truncated master equation), so
// `--bath` takes problems above 9 qubits on anneal (and every command sharing
// cli::check_bath_size); memory alone refuses, with the need and the room;
// diagnose's thermal channel (dense spectra) keeps its own 9-qubit limit.
#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <regex>
#include <sstream>
#include <string>

#include "dynamics/truncated_master_equation.hpp"
#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {
std::string q(const std::filesystem::path& p) { return "'" + p.string() + "'"; }

// An invented 10-qubit ring with chords, fields and real couplings (demo values).
std::string ring_with_fields(int n) {
  std::ostringstream o;
  o << "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\nqubits = " << n << "\nfields = [";
  for (int i = 0; i < n; ++i) o << (i ? ", " : "") << 0.37 * std::sin(1.3 * i + 0.4);
  o << "]\ncouplings = [";
  for (int i = 0; i + 1 < n; ++i) o << "[" << i << ", " << i + 1 << ", " << -0.8 + 0.21 * i << "], ";
  o << "[0, " << n - 1 << ", 0.45]]\n";
  return o.str();
}

std::string bath_file(const TempDir& dir, double eta) {
  std::ostringstream o;
  o << "format = \"gapwise-bath\"\ntemperature_mk = 12.0\ncoupling = " << eta << "\ncutoff_ghz = 8.0\n";
  return q(dir.write("bath.toml", o.str()));
}

std::string catalogue_message(const std::string& id) {
  std::ifstream f(source_dir() / "notebooks-free-docs" / "bad-input-catalogue.md");
  std::string line;
  const std::string head = "| " + id + " |";
  while (std::getline(f, line))
    if (line.rfind(head, 0) == 0) {
      const auto end = line.rfind(" |");
      const auto start = line.rfind(" | ", end - 1);
      return line.substr(start + 3, end - start - 3);
    }
  return "(row " + id + " not found)";
}

double number_after(const std::string& text, const std::string& label) {
  const auto at = text.find(label);
  REQUIRE_MESSAGE(at != std::string::npos, label << " not in:\n" << text);
  return std::stod(text.substr(at + label.size()));
}
}  // namespace

TEST_CASE("anneal --bath on 10 qubits with fields runs the truncated master equation; eta = 0 gives the closed p") {
  // Albash, Boixo, Lidar & Zanardi, New J. Phys. 14, 123016 (2012): with the
  // coupling off the adiabatic master equation is the von Neumann equation, so
  // p with the bath equals the closed-system p, up to the truncation in K and the
  // two tolerances. K is fixed at 8 to keep the test short (the automatic ladder
  // takes minutes at 10 qubits); the highest kept level holds about 1.5e-4 here,
  // so the two agree to about 2e-5, checked at 1e-4. Before h18-large this
  // problem was refused (more than 9 qubits).
  TempDir dir;
  const auto problem = dir.write("ring10.toml", ring_with_fields(10));
  const auto r = run_gapwise("anneal " + q(problem) + " " + q(source_dir() / "schedules/linear.toml") +
                                 " -d 20 -q --tolerance 1e-6 --bath-levels 8 --bath " + bath_file(dir, 0.0),
                             dir);
  REQUIRE_MESSAGE(r.exit_code == 0, r.err);
  INFO(r.out);
  CHECK(r.out.find("ame-truncated, K = 8 lowest levels, fixed by --bath-levels") != std::string::npos);
  const std::regex probs(R"(ground-state probability\s+([0-9.]+)\s+([0-9.]+))");
  std::smatch m;
  REQUIRE(std::regex_search(r.out, m, probs));
  const double closed = std::stod(m[1]), open = std::stod(m[2]);
  CHECK(closed < 0.999);  // not trivially adiabatic: levels above the ground level matter
  CHECK(closed > 0.01);
  CHECK(std::abs(open - closed) < 1e-4);
  CHECK(number_after(r.out, "held at most ") < 1e-3);  // the kept levels hold the state
}

TEST_CASE("--bath beyond memory is refused before any work, with the need and the room") {
  TempDir dir;
  // 26 qubits: up to 40 levels need about 290 GiB; no CI machine has it.
  const auto big = dir.write("p26.toml", "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\n"
                                         "qubits = 26\ncouplings = [[0, 1, -1.0]]\n");
  const std::string lin = q(source_dir() / "schedules/linear.toml");
  const auto e = run_gapwise("anneal " + q(big) + " " + lin + " -d 5 --bath " + bath_file(dir, 1e-3), dir);
  INFO(e.err);
  CHECK(e.exit_code == 2);
  CHECK(e.out.empty());
  const int vectors = gapwise::truncated_working_vectors(40);
  CHECK(vectors == 580);
  const std::string head = "gapwise: error: --bath: the problem has 26 qubits; the open-system anneal (truncated master "
                           "equation, up to the 40 lowest levels as vectors of 2^26 amplitudes, about 580 real vectors) "
                           "needs about 290.5 GiB of memory, but only ";
  CHECK(e.err.rfind(head, 0) == 0);
  CHECK(e.err.find(" is available. Fix: leave out --bath, or use a machine with more memory (each qubit doubles the "
                   "need)\n") != std::string::npos);
  // The catalogue row shows the same words (the memory left varies: AVAIL there).
  const std::string row = catalogue_message("H18L1");
  CHECK(row.rfind(head, 0) == 0);

  // A fixed K is checked at that K: 20 qubits hold 40 levels (about 4.5 GiB), not 5000.
  const auto p20 = dir.write("p20.toml", "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\n"
                                         "qubits = 20\ncouplings = [[0, 1, -1.0]]\n");
  const auto f = run_gapwise("anneal " + q(p20) + " " + lin + " -d 5 --bath " + bath_file(dir, 1e-3) +
                                 " --bath-levels 5000",
                             dir);
  INFO(f.err);
  CHECK(f.exit_code == 2);
  CHECK(f.err.rfind("gapwise: error: --bath: the problem has 20 qubits; the open-system anneal (truncated master "
                    "equation, the 5000 lowest levels as vectors of 2^20 amplitudes",
                    0) == 0);
  CHECK(f.err.find("Fix: keep fewer levels with --bath-levels, leave out --bath, or use a machine with more memory") !=
        std::string::npos);
  CHECK(catalogue_message("H18L2").rfind("gapwise: error: --bath: the problem has 20 qubits;", 0) == 0);
}

TEST_CASE("diagnose --bath keeps its 9-qubit limit and says why, before the closed diagnosis") {
  TempDir dir;
  const auto problem = dir.write("ring10.toml", ring_with_fields(10));
  const auto e = run_gapwise("diagnose " + q(problem) + " " + q(source_dir() / "schedules/linear.toml") +
                                 " -d 5 --bath " + bath_file(dir, 1e-3),
                             dir);
  INFO(e.err);
  CHECK(e.exit_code == 2);
  CHECK(e.out.empty());
  CHECK(e.err == catalogue_message("TS2") + "\n");
  CHECK(e.err.find("dense eigen-decomposition") != std::string::npos);
}
