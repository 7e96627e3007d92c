#include "io/instance_set_file.hpp"

#include <algorithm>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <set>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_input.hpp"
#include "io/hdf5_output.hpp"
#include "io/hdf5_seal.hpp"
#include "io/input_path.hpp"
#include "io/problem_file.hpp"
#include "io/toml_reader.hpp"

namespace gapwise {
namespace {

constexpr const char* kFormat = "gapwise-instance-set";

struct Fnv1a {
  std::uint64_t h = 1469598103934665603ULL;
  void bytes(const void* p, std::size_t n) { h = fnv1a64(std::string_view(static_cast<const char*>(p), n), h); }
  void number(double x) { std::uint64_t u; std::memcpy(&u, &x, 8); bytes(&u, 8); }
  void integer(long long x) { bytes(&x, sizeof x); }
};

void check_name(const std::string& name, const std::string& file, const std::string& key) {
  if (name.empty() || name == "." || name == ".." || name.find('/') != std::string::npos ||
      name.find('\0') != std::string::npos)
    throw InputError({file, 0, 0, key}, fmt::format("\"{}\" is not a usable instance name", name),
                     "use a non-empty name without '/' (e.g. n08-003)");
}

Instance read_one(const Hdf5Input& in, const std::string& name) {
  const std::string g = "/instances/" + name;
  if (!in.has(g)) in.fail(g, "the instance listed in /instance_names is missing", "write the set with gapwise generate");
  Instance inst;
  inst.name = name;
  const long long n = in.attribute_int(g, "qubits");
  if (n < 1 || n > kMaxQubits)
    in.fail(g + "@qubits", fmt::format("qubits = {} is outside 1..{}", n, kMaxQubits), "give a positive qubit count");
  IsingProblem& p = inst.problem;
  p = IsingProblem(static_cast<int>(n));
  p.offset = in.has_attribute(g, "offset") ? in.attribute_double(g, "offset") : 0.0;
  if (!std::isfinite(p.offset)) in.fail(g + "@offset", "the offset is not finite", "store a finite number");
  if (in.has_attribute(g, "description")) p.description = in.attribute_string(g, "description");
  if (in.has_attribute(g, "family")) inst.family = in.attribute_string(g, "family");
  if (in.has_attribute(g, "seed")) {
    const long long s = in.attribute_int(g, "seed");
    if (s < 0) in.fail(g + "@seed", "the seed is negative", "seeds are stored as non-negative 63-bit integers");
    inst.seed = static_cast<std::uint64_t>(s);
  }
  p.h = in.read_list(g + "/fields", static_cast<std::size_t>(n));
  for (std::size_t i = 0; i < p.h.size(); ++i)
    if (!std::isfinite(p.h[i])) in.fail(fmt::format("{}/fields[{}]", g, i), "the field is not finite", "store finite numbers");
  const auto ci = in.read_int_list(g + "/coupling_i");
  const auto cj = in.read_int_list(g + "/coupling_j", ci.size());
  const auto cv = in.read_list(g + "/coupling_value", ci.size());
  std::set<std::pair<long long, long long>> seen;
  for (std::size_t k = 0; k < ci.size(); ++k) {
    const std::string key = fmt::format("{}/coupling_*[{}]", g, k);
    const long long a = ci[k], b = cj[k];
    if (a < 0 || a >= n || b < 0 || b >= n)
      in.fail(key, fmt::format("qubit pair ({}, {}) is out of range (qubits = {})", a, b, n), "use indices 0..qubits-1");
    if (a >= b) in.fail(key, fmt::format("pair ({}, {}) must have i < j", a, b), "store each coupling once with i < j");
    if (!seen.insert({a, b}).second) in.fail(key, fmt::format("pair ({}, {}) appears twice", a, b), "store each pair once");
    if (!std::isfinite(cv[k])) in.fail(key, "the coupling is not finite", "store finite numbers");
    p.couplings.push_back({static_cast<int>(a), static_cast<int>(b), cv[k]});
  }
  if (in.has_attribute(g, "planted_ground_energy")) {
    const double e = in.attribute_double(g, "planted_ground_energy");
    if (!std::isfinite(e)) in.fail(g + "@planted_ground_energy", "not finite", "store a finite number");
    inst.planted_energy = e;
  }
  if (in.has_attribute(g, "planted_state")) {
    const long long b = in.attribute_int(g, "planted_state");
    if (b < 0 || (n < 63 && b >= (1LL << n)))
      in.fail(g + "@planted_state", fmt::format("basis index {} does not fit {} qubits", b, n),
              "store a basis index in [0, 2^qubits)");
    inst.planted_state = static_cast<BasisIndex>(b);
  }
  return inst;
}

InstanceSet read_directory(const std::string& dir) {
  namespace fs = std::filesystem;
  std::vector<fs::path> files;
  std::error_code ec;
  for (const auto& e : fs::directory_iterator(dir, ec)) {
    if (e.path().extension() != ".toml") continue;
    std::error_code entry_ec;
    const bool regular = e.is_regular_file(entry_ec);
    if (entry_ec) {  // a link loop, a dangling link, a name too long: say which file and why
      const PathProblem why = describe_path_error(e.path().string(), entry_ec.value());
      throw InputError({e.path().string(), 0, 0, ""}, why.problem + " (in the instance folder)", why.fix);
    }
    if (regular) files.push_back(e.path());
  }
  if (ec) throw InputError({dir, 0, 0, ""}, fmt::format("cannot list the directory: {}", ec.message()), "check the path");
  if (files.empty())
    throw InputError({dir, 0, 0, ""}, "the directory holds no problem files (*.toml)",
                     "put gapwise problem files in it, or give an HDF5 instance set");
  std::sort(files.begin(), files.end());
  InstanceSet set;
  set.source = dir;
  for (const auto& f : files) {
    Instance inst;
    inst.name = f.stem().string();
    inst.source = f.string();
    inst.problem = read_problem_file(f.string());
    set.instances.push_back(std::move(inst));
  }
  return set;
}

}  // namespace

std::string InstanceSet::fingerprint() const {
  Fnv1a f;
  for (const auto& inst : instances) {
    f.bytes(inst.name.data(), inst.name.size());
    f.integer(inst.problem.qubits);
    for (double h : inst.problem.h) f.number(h);
    for (const auto& c : inst.problem.couplings) { f.integer(c.i); f.integer(c.j); f.number(c.value); }
    f.number(inst.problem.offset);
  }
  return fmt::format("{:016x}", f.h);
}

InstanceSet parse_instance_set_bytes(std::string_view bytes, const std::string& name) {
  const Hdf5Input in = Hdf5Input::from_bytes(bytes, name, kFormat);
  if (!in.has_attribute("/", "format"))
    in.fail("@format", "this HDF5 file is not a gapwise instance set (no format attribute)",
            "give a file written by `gapwise generate`, or a directory of problem files");
  const std::string format = in.attribute_string("/", "format");
  if (format != kFormat)
    in.fail("@format", fmt::format("this HDF5 file is a \"{}\", not an instance set", format),
            "give a file written by `gapwise generate`");
  const long long version = in.attribute_int("/", "format_version");
  if (version != 1 && version != 2)
    in.fail("@format_version", fmt::format("format_version {} is not known to this gapwise", version),
            "write the set again with this gapwise, or update gapwise");
  InstanceSet set;
  set.source = name;
  if (in.has_attribute("/", "family")) set.family = in.attribute_string("/", "family");
  if (in.has_attribute("/", "generator")) set.generator = in.attribute_string("/", "generator");
  if (in.has_attribute("/", "family_seed")) {
    const long long s = in.attribute_int("/", "family_seed");
    if (s < 0) in.fail("@family_seed", "the seed is negative", "seeds are non-negative");
    set.family_seed = static_cast<std::uint64_t>(s);
  }
  const auto names = in.read_strings("/instance_names");
  if (names.empty()) in.fail("/instance_names", "the set holds no instances", "generate at least one instance");
  std::set<std::string> seen;
  for (std::size_t k = 0; k < names.size(); ++k) {
    check_name(names[k], name, fmt::format("/instance_names[{}]", k));
    if (!seen.insert(names[k]).second)
      in.fail(fmt::format("/instance_names[{}]", k), fmt::format("name \"{}\" appears twice", names[k]), "use unique names");
    set.instances.push_back(read_one(in, names[k]));
  }
  return set;
}

InstanceSet read_instance_set(const std::string& path) {
  require_readable_input(path, /*directory_allowed=*/true);
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return read_directory(path);
  return parse_instance_set_bytes(read_text_file(path), path);
}

void write_instance_set(const std::string& path, const InstanceSet& set, const std::string& command_line) {
  Hdf5Output out(path, {kFormat, 2, /*sealed=*/true});  // version 2: UTF-8 strings, a seal with a manifest
  write_provenance(out, command_line, {});
  out.attribute("/", "family", set.family);
  if (set.family_seed) out.attribute("/", "family_seed", static_cast<long long>(*set.family_seed));
  out.attribute("/", "generator", set.generator);
  out.attribute("/", "fingerprint", set.fingerprint());
  std::vector<std::string> names;
  for (const auto& inst : set.instances) {
    check_name(inst.name, path, "instance name");
    names.push_back(inst.name);
    const std::string g = "/instances/" + inst.name;
    const IsingProblem& p = inst.problem;
    out.group(g);
    out.attribute(g, "qubits", static_cast<long long>(p.qubits));
    out.attribute(g, "offset", p.offset);
    out.attribute(g, "description", p.description);
    out.attribute(g, "family", inst.family);
    if (inst.seed) out.attribute(g, "seed", static_cast<long long>(*inst.seed));
    if (inst.planted_energy) out.attribute(g, "planted_ground_energy", *inst.planted_energy);
    if (inst.planted_state) out.attribute(g, "planted_state", static_cast<long long>(*inst.planted_state));
    out.write(g + "/fields", p.h, "1");
    std::vector<long long> ci, cj;
    std::vector<double> cv;
    for (const auto& c : p.couplings) { ci.push_back(c.i); cj.push_back(c.j); cv.push_back(c.value); }
    out.write(g + "/coupling_i", ci, DataMeaning("1").described("qubit index"));
    out.write(g + "/coupling_j", cj, DataMeaning("1").described("qubit index"));
    out.write(g + "/coupling_value", cv, "1");
  }
  out.write_strings("/instance_names", names, "instance names, in set order");
  out.commit();
}

void write_instance_directory(const std::string& dir, const InstanceSet& set) {
  std::error_code ec;
  std::filesystem::create_directories(dir, ec);
  if (ec) throw InputError({dir, 0, 0, "--out-dir"}, fmt::format("cannot create the directory: {}", ec.message()),
                           "choose a writable place");
  for (const auto& inst : set.instances) {
    check_name(inst.name, dir, "instance name");
    std::string text;
    if (inst.planted_energy)
      text += fmt::format("# planted ground energy {:.17g}, planted state (bits, qubit 0 first) {}\n", *inst.planted_energy,
                          bits_string(*inst.planted_state, inst.problem.qubits));
    text += format_problem_toml(inst.problem);
    write_file_atomically((std::filesystem::path(dir) / (inst.name + ".toml")).string(), text);
  }
}

}  // namespace gapwise
