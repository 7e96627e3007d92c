#pragma once
// The ensemble result file (HDF5, sealed, format "gapwise-ensemble-result",
// version 1), written atomically by the collecting rank alone. Layout (names
// ours; documented in the user guide):
//
//   /ensemble              @instance_set @set_fingerprint @set_size @numerics_fingerprint
//                          @schedule_text @target_probability @propagator @tolerance
//                          @gap_coarse_points @gap_s_tolerance @confidence_level
//                          @bootstrap_resamples @bootstrap_seed @shard_index @shard_count
//   /ensemble/durations_ns       [K]
//   /ensemble/quantile_levels    [Q]
//   /ensemble/instances/...      one entry per instance, by set index: set_index, name,
//                                qubits, ground_energy, ground_states, planted_check,
//                                gap_ghz, gap_uncertainty_ghz, gap_s, gap_degeneracy,
//                                gap_at_end_point, max_norm_drift, tts_ns, tts_never,
//                                tts_duration_ns, tts_at_range_edge; ground_probability [N x K]
//   /ensemble/by_size/...        qubits, count, tts_at_range_edge, never_solved [S];
//                                tts_quantile_ns, tts_low_ns, tts_high_ns,
//                                gap_quantile_ghz, gap_low_ghz, gap_high_ghz [S x Q]
//   /timing                      wall_seconds [N], @distribution @total_wall_seconds
//                                @resumed @computed (the only part that differs between runs)
//   /provenance                  tool, version, command line, input files
// Infinite TTS (p = 0 at every duration) is stored as -1 with tts_never = 1; an
// infinite quantile as -1 (HDF5 files here hold finite numbers only).
//
//   write_ensemble_result("study.h5", result, command_line, {"set.h5", "linear.toml"});
//   EnsembleResult back = read_ensemble_result("study.h5");
#include <string>
#include <vector>

#include "studies/ensemble_study.hpp"

namespace gapwise {

void write_ensemble_result(const std::string& path, const EnsembleResult& result, const std::string& command_line,
                           const std::vector<std::string>& input_files);

/// InputError (file, object path, fix) when the file is not an intact ensemble result.
EnsembleResult read_ensemble_result(const std::string& path);

}  // namespace gapwise
