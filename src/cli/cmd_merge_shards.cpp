// `gapwise merge-shards SHARD... --out WHOLE`: joins the results of an ensemble
// study run as `--shard i/N` jobs into the result one whole run would have written.
#include <memory>

#include "cli/cli_common.hpp"
#include "io/output_paths.hpp"
#include "io/ensemble_report.hpp"
#include "io/ensemble_result_file.hpp"
#include "io/atomic_file.hpp"
#include "studies/ensemble_study.hpp"

namespace gapwise::cli {
namespace {

struct MergeOptions {
  std::vector<std::string> shards;
  std::string out, csv;
  bool json = false;
};

void run_merge(const MergeOptions& o) {
  FilePlan plan;
  for (const auto& f : o.shards) plan.input(f, "shard");
  check_file_plan(plan.output(o.out, "--out").output(o.csv, "--csv"));
  check_output_path(o.out, "--out");
  std::vector<EnsembleResult> parts;
  for (const auto& f : o.shards) parts.push_back(read_ensemble_result(f));
  const EnsembleResult whole = merge_shards(parts, o.shards);
  write_ensemble_result(o.out, whole, command_line(), o.shards);
  if (o.json) print_ensemble_json(whole, o.csv);
  else print_ensemble_summary(whole, o.out, o.csv);
}

}  // namespace

void register_merge_shards(CLI::App& app) {
  auto o = std::make_shared<MergeOptions>();
  CLI::App* sub = app.add_subcommand("merge-shards",
      "Join the shard results of one ensemble study (`gapwise ensemble --shard i/N`, one\n"
      "job each) into one result, identical to what a single run would have written.\n"
      "Refuses shards of different studies, a shard given twice, or a missing one.\n"
      "Example: gapwise merge-shards part-0.h5 part-1.h5 part-2.h5 --out study.h5");
  sub->add_option("shards", o->shards, "shard result files")->required()->check(readable_input_file());
  sub->add_option("--out", o->out, "merged result file (HDF5)")->required();
  sub->add_option("--csv", o->csv, "also write the per-size table as CSV");
  sub->add_flag("--json", o->json, "print the JSON summary of `gapwise ensemble --json` instead of the table");
  sub->callback([o] { run_merge(*o); });
}

}  // namespace gapwise::cli
