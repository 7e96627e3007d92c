// `gapwise generate`: a reproducible, seeded instance set (one HDF5 file, or a
// directory of problem files) from one family: +-1 or Gaussian spin glasses, or
// planted-solution instances, on a ring, ring with chords, square lattice or
// complete graph.
#include <algorithm>
#include <cmath>
#include <iostream>
#include <regex>
#include <memory>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "io/output_paths.hpp"
#include "io/atomic_file.hpp"
#include "io/input_error.hpp"
#include "io/instance_set_file.hpp"
#include "io/text_table.hpp"
#include "problem/instance_families.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct GenerateOptions {
  std::string graph = "ring", couplings = "pm1", sizes = "lin:6:10:3", out, out_dir;
  int count = 10;
  unsigned long long seed = 1;
  double chords = 0.5, loops = 1.0;
  int ruggedness = 0;
  bool allow_long = false;
};

// Qubit counts: a LIST of whole numbers (6,8,10 or lin:6:14:5), each 2..30.
std::vector<int> parse_sizes(const std::string& text) {
  const SourcePlace place{"--sizes", 0, 0, "--sizes"};
  // The old spelling FIRST-LAST[:STEP] gets the grammar's own spelling in the fix.
  const std::regex dashed(R"((\d+)-(\d+)(?::(\d+))?)");
  std::smatch m;
  for (std::size_t pos = 0; pos <= text.size();) {
    const std::size_t comma = std::min(text.find(',', pos), text.size());
    const std::string item = text.substr(pos, comma - pos);
    if (std::regex_match(item, m, dashed)) {
      const int first = std::stoi(m[1]), last = std::stoi(m[2]), step = m[3].matched ? std::stoi(m[3]) : 1;
      const int count = step > 0 && last >= first ? (last - first) / step + 1 : 0;
      throw InputError(place, fmt::format("\"{}\" is not a list of sizes", item),
                       count > 0 && first + (count - 1) * step == last
                           ? fmt::format("write lin:{}:{}:{} for sizes {} to {} in steps of {}", first, last, count, first, last, step)
                           : "write sizes as 6,8,10 or as lin:6:14:5 (FIRST:LAST:COUNT, evenly spaced)");
    }
    pos = comma + 1;
  }
  std::vector<int> out;
  for (double v : parse_value_list(text, "--sizes")) {
    if (v != std::floor(v) || v < 2 || v > 30)
      throw InputError(place, fmt::format("size {} is not a whole number from 2 to 30", v),
                       "write sizes as 6,8,10 or as lin:6:14:5 (evenly spaced, whole numbers)");
    out.push_back(static_cast<int>(v));
  }
  return out;
}

void run_generate(const GenerateOptions& o) {
  check_file_plan(FilePlan{}.output(o.out, "--out"));
  if (o.out.empty() == o.out_dir.empty())
    throw InputError({"--out", 0, 0, "--out"}, "give exactly one of --out (HDF5 file) and --out-dir (problem files)",
                     "e.g. --out glasses.h5");
  if (!o.out.empty()) check_output_path(o.out, "--out");
  if (o.seed > (1ULL << 63) - 1)
    throw InputError({"--seed", 0, 0, "--seed"}, "the seed must fit in 63 bits", "use a seed below 9223372036854775808");
  FamilySpec f;
  f.graph = parse_graph_name(o.graph);
  f.couplings = parse_coupling_name(o.couplings);
  f.seed = o.seed;
  f.chords_per_qubit = o.chords;
  f.loops_per_qubit = o.loops;
  f.ruggedness = o.ruggedness;
  const std::vector<int> sizes = parse_sizes(o.sizes);
  WorkEstimate work;
  for (int n : sizes) work += instance_work(n, o.count);
  check_work_limit(work, o.allow_long, {"--count", 0, 0, "--count"});

  InstanceSet set;
  set.family = family_name(f);
  set.family_seed = f.seed;
  set.generator = fmt::format("graph={} couplings={} sizes={} count={} seed={} chords_per_qubit={} loops_per_qubit={} ruggedness={}",
                              o.graph, o.couplings, o.sizes, o.count, o.seed, o.chords, o.loops, o.ruggedness);
  set.instances = generate_family(f, sizes, o.count);
  if (!o.out.empty()) write_instance_set(o.out, set, command_line());
  else write_instance_directory(o.out_dir, set);
  TextTable t({"qubits", "instances", "couplings (mean)", f.couplings == CouplingKind::PlantedLoops ? "planted E0 (mean)" : ""});
  for (int n : sizes) {
    double m = 0, e = 0;
    int k = 0;
    for (const auto& inst : set.instances)
      if (inst.problem.qubits == n) {
        m += static_cast<double>(inst.problem.couplings.size());
        e += inst.planted_energy.value_or(0.0);
        ++k;
      }
    t.add({std::to_string(n), std::to_string(k), fmt_num(m / k, 4),
           f.couplings == CouplingKind::PlantedLoops ? fmt_num(e / k, 4) : ""});
  }
  std::cout << fmt::format("{} instances of {} (family seed {}), fingerprint {}, written to {}\n", set.instances.size(),
                           set.family, f.seed, set.fingerprint(), o.out.empty() ? o.out_dir : o.out);
  std::cout << t.render();
}

}  // namespace

void register_generate(CLI::App& app) {
  auto o = std::make_shared<GenerateOptions>();
  CLI::App* sub = app.add_subcommand("generate",
      "Generate a reproducible instance set for an ensemble study. Instance k of size n\n"
      "is drawn from its own stream seeded by (--seed, n, k), so the same command always\n"
      "gives the same problems, and asking for more never changes those already drawn.\n"
      "Fields are zero; couplings are +-1 (pm1), N(0,1) (gaussian), or planted: sums of\n"
      "frustrated loops around a hidden spin state, whose ground energy is then known\n"
      "exactly (Hen et al., Phys. Rev. A 92, 042325 (2015)).\n"
      "Example: gapwise generate --graph ring-chords --couplings gaussian --sizes lin:6:14:5 --count 24 --seed 7 --out glasses.h5");
  sub->add_option("--graph", o->graph, "ring | ring-chords (ring plus random chords) | square (open rows x cols lattice) | complete")
      ->capture_default_str();
  sub->add_option("--couplings", o->couplings, "pm1 | gaussian | planted")->capture_default_str();
  add_list_option(sub, "--sizes", o->sizes, "qubit counts, a LIST of whole numbers: 6,8,10 or lin:6:14:5")->capture_default_str();
  sub->add_option("--count", o->count, "instances per size")->capture_default_str();
  sub->add_option("--seed", o->seed, "family seed (stored in the set; every instance's own seed is stored too)")
      ->capture_default_str();
  sub->add_option("--chords-per-qubit", o->chords, "ring-chords: random extra edges per qubit")->capture_default_str();
  sub->add_option("--loops-per-qubit", o->loops, "planted: frustrated loops per qubit (loop density)")->capture_default_str();
  sub->add_option("--ruggedness", o->ruggedness, "planted: largest |J_ij| allowed (0: no bound)")->capture_default_str();
  sub->add_option("--out", o->out, "write one HDF5 instance-set file (keeps seeds and planted ground energies)");
  sub->add_option("--out-dir", o->out_dir, "write one problem file per instance into this directory instead");
  add_allow_long_flag(sub, o->allow_long);
  sub->callback([o] { run_generate(*o); });
}

}  // namespace gapwise::cli
