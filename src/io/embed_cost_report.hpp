#pragma once
// The report of `gapwise embed-cost`: the terminal text, the --json summary,
// the scan table (--csv), the physical problem at the best chain strength
// (--write-physical) and the HDF5 result file (format "gapwise-embed-cost" 1)
// of a chain-strength scan (studies/chain_strength_scan).
//
//   const EmbedCostReport rep{{problem, embedding, schedule, search, target, resolution},
//                             &logical, &embedding, &schedule, &scan, &result};
//   std::cout << (json ? embed_cost_report_json(rep) : embed_cost_report_text(rep));
#include <string>

#include "io/text_table.hpp"
#include "problem/embedding.hpp"
#include "schedule/schedule.hpp"
#include "studies/chain_strength_scan.hpp"
#include "studies/duration_needed.hpp"

namespace gapwise {

/// What the user asked for, as the report names it.
struct EmbedCostReportOptions {
  std::string problem, embedding, schedule;  ///< the files as given
  std::string search_durations;              ///< --search-durations as typed
  double target = 0, resolution = 0;
};

struct EmbedCostReport {
  EmbedCostReportOptions o;
  const IsingProblem* logical = nullptr;
  const Embedding* embedding = nullptr;
  const Schedule* schedule = nullptr;
  const ChainScanOptions* scan = nullptr;
  const ChainScanResult* result = nullptr;
};

/// How a needed duration bounds the answer, as the HDF5 result stores it:
/// -1 at most that (reached at the shortest duration tried), 0 bracketed, 1 more than that.
long long needed_bound_code(const NeededDuration& n);

/// One row a scanned chain strength (the best marked): the terminal table and --csv.
TextTable chain_scan_table(const ChainScanResult& r);
/// The terminal report: inputs, the logical reference, the scan, the best strength and the price.
std::string embed_cost_report_text(const EmbedCostReport& rep);
/// The --json summary (one object and a newline).
std::string embed_cost_report_json(const EmbedCostReport& rep);
/// The physical problem at the best strength as a problem file, its description naming the sources.
std::string best_physical_problem_toml(const EmbedCostReport& rep);
/// The HDF5 result, written atomically to `path`.
void write_embed_cost_result(const std::string& path, const EmbedCostReport& rep, const std::string& command_line);

}  // namespace gapwise
