#pragma once
// The report of an ensemble study (`gapwise ensemble`, and `gapwise
// merge-shards`, which prints the same): the per-size table of optimal time to
// solution and minimum gap with bootstrap intervals, the terminal summary and
// the --json summary. The HDF5 result is io/ensemble_result_file.
#include <string>

#include "io/text_table.hpp"
#include "studies/ensemble_study.hpp"

namespace gapwise {

/// The per-size table: quantiles of the best TTS [CI] and of the gap, range-edge and never-solved counts.
TextTable ensemble_size_table(const EnsembleResult& result);
/// The summary on stdout (with the table also written as CSV when `csv` is given).
void print_ensemble_summary(const EnsembleResult& result, const std::string& out, const std::string& csv);
/// The same as JSON on stdout (`--json` of ensemble and merge-shards); writes csv too when given.
void print_ensemble_json(const EnsembleResult& result, const std::string& csv);

}  // namespace gapwise
