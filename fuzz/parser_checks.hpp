#pragma once
// What a fuzzed input must never do to a parser, shared by the libFuzzer
// targets (fuzz/fuzz_*.cpp) and the regression tests (tests/test_fuzz_regressions.cpp).
// A parser either returns a valid model or throws InputError; anything else
// (another exception, a crash, a sanitizer report, a broken invariant) is a bug.
// A broken contract throws std::logic_error: uncaught in a fuzz target it ends
// the process (libFuzzer saves the input), in a doctest CHECK_NOTHROW it fails.
// Accepted inputs must also survive a write/re-read round trip unchanged, since
// gapwise writes these formats itself (derived problems, generated schedules).
//
//   gapwise::fuzzing::check_problem_input(text);   // throws std::logic_error on a bug
//   gapwise::fuzzing::check_schedule_input(text);
//   gapwise::fuzzing::check_embedding_input(text);
//   gapwise::fuzzing::check_instance_set_input(bytes);   // first byte: raw, re-sealed or built
//   gapwise::fuzzing::check_journal_input(bytes);        // first byte: raw or re-checksummed
#include <cmath>
#include <cstdint>
#include <cstring>
#include <limits>
#include <set>
#include <vector>
#include <stdexcept>
#include <string>
#include <string_view>

#include <fmt/format.h>

#include "io/embedding_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/hdf5_seal.hpp"
#include "io/input_error.hpp"
#include "io/instance_set_file.hpp"
#include "io/result_journal.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"

namespace gapwise::fuzzing {

[[noreturn]] inline void fuzz_bug(const std::string& what) {
  throw std::logic_error("parser contract broken: " + what);
}

/// Every InputError must name the file and say something.
inline void check_error(const InputError& e, const std::string& name) {
  if (e.place().file != name) fuzz_bug("InputError without the file name: " + std::string(e.what()));
  if (e.problem().empty()) fuzz_bug("InputError without a problem text");
}

inline bool same_bits(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

inline void check_problem_model(const IsingProblem& p) {
  if (p.qubits < 1 || p.qubits > 30) fuzz_bug("qubit count out of range accepted");
  if (p.h.size() != static_cast<std::size_t>(p.qubits)) fuzz_bug("field vector of the wrong size");
  if (!std::isfinite(p.offset)) fuzz_bug("non-finite offset accepted");
  for (double x : p.h) if (!std::isfinite(x)) fuzz_bug("non-finite field accepted");
  for (const auto& c : p.couplings) {
    if (!(c.i >= 0 && c.i < c.j && c.j < p.qubits)) fuzz_bug("coupling indices out of order or range");
    if (!std::isfinite(c.value)) fuzz_bug("non-finite coupling accepted");
  }
  if (!p.labels.empty() && p.labels.size() != p.h.size()) fuzz_bug("label count differs from qubit count");
}

inline void check_problem_input(std::string_view text) {
  const std::string name = "fuzz-problem.toml";
  ProblemFile pf;
  try {
    pf = parse_problem_text(text, name);
  } catch (const InputError& e) {
    check_error(e, name);
    return;
  }
  const IsingProblem& p = pf.ising;
  check_problem_model(p);
  // Round trip: what we write we must read back identically.
  const std::string again = format_problem_toml(p);
  IsingProblem q;
  try {
    q = parse_problem_text(again, "round-trip.toml").ising;
  } catch (const InputError& e) {
    fuzz_bug("re-reading a written problem failed: " + std::string(e.what()) + "\n" + again);
  }
  bool same = q.qubits == p.qubits && q.couplings.size() == p.couplings.size() && same_bits(q.offset, p.offset) &&
              q.description == p.description && q.labels == p.labels;
  for (std::size_t k = 0; same && k < p.h.size(); ++k) same = same_bits(q.h[k], p.h[k]);
  for (std::size_t k = 0; same && k < p.couplings.size(); ++k)
    same = q.couplings[k].i == p.couplings[k].i && q.couplings[k].j == p.couplings[k].j &&
           same_bits(q.couplings[k].value, p.couplings[k].value);
  if (!same) fuzz_bug("problem changed in a write/re-read round trip:\n" + again);
}

inline void check_schedule_model(const Schedule& s) {
  const auto& pts = s.shape.points();
  if (pts.size() < 2) fuzz_bug("path with fewer than two waypoints accepted");
  for (const auto& w : pts)
    if (!std::isfinite(w.t_ns) || !(w.s >= 0.0 && w.s <= 1.0)) fuzz_bug("waypoint out of range accepted");
  for (double x : {0.0, 0.25, 0.5, 0.75, 1.0}) {
    const double a = s.scales.a_ghz(x), b = s.scales.b_ghz(x);
    if (!std::isfinite(a) || !std::isfinite(b) || a < 0 || b < 0) fuzz_bug("energy scale non-finite or negative");
  }
  if (s.duration_ns && !(*s.duration_ns > 0 && std::isfinite(*s.duration_ns))) fuzz_bug("bad duration accepted");
}

inline void check_schedule_input(std::string_view text) {
  const std::string name = "fuzz-schedule.toml";
  Schedule s;
  try {
    s = parse_schedule_text(text, name);
  } catch (const InputError& e) {
    check_error(e, name);
    return;
  }
  check_schedule_model(s);
  const std::string again = format_schedule_toml(s);
  Schedule q;
  try {
    q = parse_schedule_text(again, "round-trip.toml");
  } catch (const InputError& e) {
    fuzz_bug("re-reading a written schedule failed: " + std::string(e.what()) + "\n" + again);
  }
  bool same = q.description == s.description && q.time_in_ns == s.time_in_ns &&
              q.shape.points().size() == s.shape.points().size() && q.start.kind == s.start.kind &&
              q.start.bits == s.start.bits && q.duration_ns.has_value() == s.duration_ns.has_value();
  if (same && s.duration_ns) same = same_bits(*q.duration_ns, *s.duration_ns);
  for (std::size_t k = 0; same && k < s.shape.points().size(); ++k)
    same = same_bits(q.shape.points()[k].t_ns, s.shape.points()[k].t_ns) &&
           same_bits(q.shape.points()[k].s, s.shape.points()[k].s);
  for (double x : {0.0, 0.3, 0.5, 1.0})
    same = same && same_bits(q.scales.a_ghz(x), s.scales.a_ghz(x)) && same_bits(q.scales.b_ghz(x), s.scales.b_ghz(x));
  if (!same) fuzz_bug("schedule changed in a write/re-read round trip:\n" + again);
}

/// An accepted embedding must pass its own validation again, and embedding a
/// logical problem on it (one field per chain, a coupling between every pair
/// of chains that a coupler serves) must give a valid physical problem.
inline void check_embedding_input(std::string_view text) {
  const std::string name = "fuzz-embedding.toml";
  Embedding e;
  try {
    e = parse_embedding_text(text, name);
  } catch (const InputError& err) {
    check_error(err, name);
    return;
  }
  try {
    validate_embedding(e);
  } catch (const InputError& err) {
    fuzz_bug("an accepted embedding fails validate_embedding: " + std::string(err.what()));
  }
  if (e.logical_qubits() < 1 || e.physical_qubits < e.logical_qubits()) fuzz_bug("chain/qubit counts inconsistent");
  if (e.physical_qubits > 30) return;  // a valid structure, but too large to simulate; embed_problem refuses it
  IsingProblem logical(e.logical_qubits());
  for (int v = 0; v < logical.qubits; ++v) logical.h[static_cast<std::size_t>(v)] = 0.5 + 0.25 * v;
  for (int u = 0; u < logical.qubits; ++u)
    for (int v = u + 1; v < logical.qubits; ++v)
      if (!e.couplers_between(u, v).empty()) logical.couplings.push_back({u, v, -1.0});
  try {
    check_embedding_serves(e, logical, "logical.toml");
    const EmbeddedProblem ep = embed_problem(logical, e, e.chain_strength.value_or(ChainStrength{}), e.term_limit);
    if (ep.physical.qubits != e.physical_qubits) fuzz_bug("embedded problem has the wrong qubit count");
    check_problem_model(ep.physical);
  } catch (const InputError& err) {
    if (err.problem().empty()) fuzz_bug("InputError without a problem text");  // e.g. an unusable chain strength
  }
}

/// Reads a fuzz input byte by byte; past the end every read gives 0.
struct ByteFeed {
  std::string_view d;
  bool empty() const { return d.empty(); }
  unsigned byte() {
    if (d.empty()) return 0;
    const auto b = static_cast<unsigned char>(d.front());
    d.remove_prefix(1);
    return b;
  }
  std::uint64_t raw8() {
    std::uint64_t u = 0;
    for (int k = 0; k < 8; ++k) u |= std::uint64_t{byte()} << (8 * k);
    return u;
  }
  long long integer() {
    static constexpr long long pool[] = {0, 1, 2, 3, -1, 30, 31, 62, 63, 64,
                                         std::numeric_limits<long long>::max(), std::numeric_limits<long long>::min()};
    const unsigned b = byte();
    return b < 240 ? pool[b % 12] : static_cast<long long>(raw8());
  }
  double number() {
    static const double pool[] = {0.0, 1.0, -1.0, 0.5, 1e308, -1e308, std::numeric_limits<double>::infinity(),
                                  -std::numeric_limits<double>::infinity(), std::numeric_limits<double>::quiet_NaN(),
                                  4.9e-324, 2.5, 31.0};
    const unsigned b = byte();
    if (b < 240) return pool[b % 12];
    const std::uint64_t u = raw8();
    double x;
    std::memcpy(&x, &u, sizeof x);
    return x;
  }
  std::string text() {
    static const char* const pool[] = {"gapwise-instance-set", "gapwise-ensemble-result", ""};
    const unsigned b = byte();
    if (b % 4 < 3) return pool[b % 4];
    std::string t;
    for (unsigned k = byte() % 16; k > 0 && !d.empty(); --k) t += static_cast<char>(byte());
    return t;
  }
};

/// Builds an instance-set file through the HDF5 library from a fuzz input read
/// as a list of operations (attributes, datasets and names, with values drawn
/// from edge-case pools or raw bytes), sealed as gapwise seals it. The image is
/// a valid HDF5 file whose *content* is arbitrary: what the instance-set reader
/// behind the seal must refuse with an InputError (missing objects, wrong
/// types and lengths, non-finite or out-of-range values, duplicate names).
/// Returns an empty string when HDF5 refuses to build it (e.g. a name twice).
/// Operations (first byte of each, mod 5): 0 root attribute, 1 instance
/// attribute, 2 instance dataset (numbers), 3 /instance_names, 4 a string
/// dataset where numbers belong.
inline std::string build_instance_set_image(ByteFeed in) {
  static const char* const root_attrs[] = {"format", "format_version", "family", "generator", "family_seed"};
  static const char* const inst_attrs[] = {"qubits", "offset", "description", "family",
                                           "seed", "planted_ground_energy", "planted_state"};
  static const char* const datasets[] = {"fields", "coupling_i", "coupling_j", "coupling_value"};
  static const char* const names[] = {"n03-000", "n03-001", "a", "", ".", "..", "x y", "a/b"};
  std::set<std::string> written;  // HDF5 refuses an object or attribute twice; skip repeats
  Hdf5Output out("fuzz-set-image.h5", {"gapwise-instance-set", 1, true});
  out.permit_non_finite();  // another HDF5 client may write them; the reader must refuse them
  auto attribute = [&](const std::string& object, const std::string& key) {
    const unsigned kind = in.byte() % 3;
    const std::string id = object + "@" + key;
    if (kind == 0) {
      const std::string v = in.text();
      if (written.insert(id).second) out.attribute(object, key, v);
    } else if (kind == 1) {
      const long long v = in.integer();
      if (written.insert(id).second) out.attribute(object, key, v);
    } else {
      const double v = in.number();
      if (written.insert(id).second) out.attribute(object, key, v);
    }
  };
  try {
    for (int ops = 0; ops < 64 && !in.empty(); ++ops) {
      const unsigned op = in.byte() % 5;
      if (op == 0) {
        attribute("/", root_attrs[in.byte() % 5]);
      } else if (op == 1) {
        const std::string g = std::string("/instances/") + names[in.byte() % 8];
        attribute(g, inst_attrs[in.byte() % 7]);
      } else if (op == 2 || op == 4) {
        const std::string inst = names[in.byte() % 8];  // one read per statement: the order is the encoding
        const std::string path = "/instances/" + inst + "/" + datasets[in.byte() % 4];
        const bool as_int = in.byte() % 2 == 1;
        const unsigned len = in.byte() % 12;
        if (op == 4) {
          std::vector<std::string> v;
          for (unsigned k = 0; k < len; ++k) v.push_back(in.text());
          if (written.insert(path).second) out.write_strings(path, v);
        } else if (as_int) {
          std::vector<long long> v;
          for (unsigned k = 0; k < len; ++k) v.push_back(in.integer());
          if (written.insert(path).second) out.write(path, v, "1");
        } else {
          std::vector<double> v;
          for (unsigned k = 0; k < len; ++k) v.push_back(in.number());
          if (written.insert(path).second) out.write(path, v, "1");
        }
      } else {
        std::vector<std::string> v;
        for (unsigned k = in.byte() % 5; k > 0; --k) v.push_back(names[in.byte() % 8]);
        if (written.insert("/instance_names").second) out.write_strings("/instance_names", v);
      }
    }
    return out.finish_image();
  } catch (const std::runtime_error&) {  // HDF5 would not build it (a path through a dataset, an empty name)
    return {};
  }
}

/// How the instance-set check treats inputs that reach the HDF5 parser with
/// bytes the fuzzer chose.
struct InstanceSetFuzzOptions {
  /// Raw inputs whose seal holds are parsed. A fuzzer forges seals (it copies
  /// the checksum it sees compared), and HDF5 1.10 hangs or crashes on crafted
  /// images (fuzz/known-hdf5-crashes/), so the fuzz target leaves this off; the
  /// regression test turns it on (its saved inputs are files gapwise wrote).
  bool parse_valid_seals = false;
  /// Mode 1 (below) is run: fuzzed bytes sealed as an HDF5 image.
  bool reseal_images = false;
};

/// Instance-set files (sealed HDF5). The first byte picks what is tested, mod 4:
/// 0 or 2: the rest as it is (the seal check, and the reader behind a valid seal
/// when options.parse_valid_seals); 1: the rest taken as the HDF5 image after the
/// user block and sealed here (reaches HDF5's own parser; only with
/// options.reseal_images); 3: the rest read as operations that build a valid HDF5
/// file with arbitrary content (build_instance_set_image), sealed: the reader's
/// own checks behind the seal, without HDF5 parsing crafted bytes.
inline void check_instance_set_input(std::string_view data, const InstanceSetFuzzOptions& options = {}) {
  const std::string name = "fuzz-set.h5";
  if (data.empty()) return;
  const unsigned mode = static_cast<unsigned char>(data[0]) % 4;
  std::string bytes(data.substr(1));
  if (mode == 1) {
    if (!options.reseal_images) return;
    bytes.insert(0, hdf5_seal_header(bytes, "gapwise-instance-set", 0));
  } else if (mode == 3) {
    bytes = build_instance_set_image(ByteFeed{data.substr(1)});
    if (bytes.empty()) return;
  } else if (!options.parse_valid_seals) {
    try {
      check_hdf5_seal(bytes, name, "gapwise-instance-set");
    } catch (const InputError& e) {
      check_error(e, name);
      return;
    }
    return;  // a seal forged from the compared checksum: HDF5 would parse crafted bytes
  }
  InstanceSet set;
  try {
    set = parse_instance_set_bytes(bytes, name);
  } catch (const InputError& e) {
    check_error(e, name);
    return;
  }
  if (set.instances.empty()) fuzz_bug("an instance set without instances accepted");
  for (const auto& inst : set.instances) {
    if (inst.name.empty()) fuzz_bug("an instance without a name accepted");
    check_problem_model(inst.problem);
    if (inst.planted_energy && !std::isfinite(*inst.planted_energy)) fuzz_bug("non-finite planted energy accepted");
    if (inst.planted_state && (inst.problem.qubits >= 63 || *inst.planted_state >> inst.problem.qubits))
      fuzz_bug("planted state outside the qubit range accepted");
  }
  if (set.fingerprint().size() != 16) fuzz_bug("fingerprint is not 16 hex digits");
}

/// The layout and fingerprint the journal target reads against.
inline const JournalLayout& fuzz_journal_layout() {
  static const JournalLayout l{"fuzz-study", {"duration_ns", "pause_s"}, {"ground_probability", "tts_ns", "drift"}};
  return l;
}
inline constexpr const char* kFuzzJournalFingerprint = "0123456789abcdef";

/// Result journals (text with a checksum per line). First byte: 0 mod 3, the
/// rest as it is; 1, the study's header in front and every line's checksum
/// recomputed (so the number parsing behind the checksum is reached); 2, the
/// header in front, lines as they are. Accepted records must have the layout's
/// sizes and no NaN, and must survive a write/re-read round trip bit for bit.
inline void check_journal_input(std::string_view data) {
  const std::string name = "fuzz.h5.journal";
  if (data.empty()) return;
  const JournalLayout& layout = fuzz_journal_layout();
  const int mode = static_cast<unsigned char>(data[0]) % 3;
  std::string text;
  if (mode != 0) text = journal_header(layout, kFuzzJournalFingerprint);
  if (mode == 1) {
    std::string_view rest = data.substr(1);
    while (!rest.empty()) {
      const auto nl = rest.find('\n');
      std::string line(rest.substr(0, nl));
      const auto star = line.rfind(" *");
      if (star != std::string::npos) line.resize(star);
      text += line + fmt::format(" *{:016x}", fnv1a64(line));
      if (nl == std::string_view::npos) break;
      text += '\n';
      rest.remove_prefix(nl + 1);
    }
  } else {
    text += std::string(data.substr(1));
  }
  JournalContents c;
  try {
    c = parse_journal_text(text, name, layout, kFuzzJournalFingerprint);
  } catch (const InputError& e) {
    check_error(e, name);
    return;
  }
  if (c.valid_bytes > text.size()) fuzz_bug("more valid bytes than the journal holds");
  std::string again = journal_header(layout, kFuzzJournalFingerprint);
  for (const auto& [key, values] : c.records) {
    if (key.size() != layout.key_columns.size() || values.size() != layout.value_columns.size())
      fuzz_bug("a record of the wrong length accepted");
    for (double x : key) if (std::isnan(x)) fuzz_bug("a NaN key accepted");
    for (double x : values) if (std::isnan(x)) fuzz_bug("a NaN value accepted");
    again += journal_record_line(key, values);
  }
  JournalContents d;
  try {
    d = parse_journal_text(again, "round-trip.journal", layout, kFuzzJournalFingerprint);
  } catch (const InputError& e) {
    fuzz_bug("re-reading a written journal failed: " + std::string(e.what()));
  }
  if (d.valid_bytes != again.size() || d.records.size() != c.records.size())
    fuzz_bug("journal changed in a write/re-read round trip");
  auto it = d.records.begin();
  for (const auto& [key, values] : c.records) {
    bool same = it->first.size() == key.size() && it->second.size() == values.size();
    for (std::size_t k = 0; same && k < key.size(); ++k) same = std::memcmp(&it->first[k], &key[k], sizeof(double)) == 0;
    for (std::size_t k = 0; same && k < values.size(); ++k)
      same = std::memcmp(&it->second[k], &values[k], sizeof(double)) == 0;
    if (!same) fuzz_bug("a journal record changed in a write/re-read round trip");
    ++it;
  }
}

}  // namespace gapwise::fuzzing
