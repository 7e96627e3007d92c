#pragma once
// The `--bath FILE` option the simulation commands share: reading and checking
// the bath file against the problem, running the open-system anneal beside the
// closed one, and reporting it (terminal lines, JSON and HDF5 keys) the same
// way in every command.
#include <optional>
#include <string>

#include <CLI/CLI.hpp>

#include "dynamics/master_equation.hpp"
#include "io/hdf5_output.hpp"
#include "io/json_summary.hpp"
#include "studies/open_duration_scan.hpp"

namespace gapwise::cli {

/// Adds `--bath FILE` to a command.
CLI::Option* add_bath_option(CLI::App* sub, std::string& bath_file);

/// Adds `--bath-levels K`: the truncated master equation keeps exactly K levels,
/// without the automatic ladder of K and without its check ("fixed, not checked").
CLI::Option* add_bath_levels_option(CLI::App* sub, int& levels);

/// InputError (key --bath-levels) for K given without --bath, K < 2 or K above
/// the 2^n levels of the problem; then check_bath_size at that K.
void check_bath_levels(int levels, bool has_bath, int qubits);

/// The open-system options of a command: the tolerance, and with levels > 0 the
/// truncated master equation at that K, unchecked.
OpenPropagatorOptions open_propagator_options(double tolerance, int levels);

/// The one size check of every command that runs the open-system anneal with
/// --bath (anneal, durations, pause-map, compare-paths, ensemble). Up to
/// kAutoFullSpaceQubits the full density matrix runs (limit kMaxFullSpaceOpenQubits);
/// beyond, the truncated master equation, whose working vectors of 2^n amplitudes
/// for K levels (levels > 0: that K; 0: the top of the automatic ladder) must fit
/// in the memory this process may still use. InputError (key --bath) with the
/// need and the room when they do not.
void check_bath_size(int qubits, int levels);

/// diagnose's thermal channel: dense spectra along s, at most kMaxThermalChannelQubits.
/// InputError (key --bath) beyond.
void check_thermal_channel_size(int qubits);

/// The bath of `bath_file` ("" -> nullopt), checked by check_bath_size(qubits, 0).
std::optional<OhmicBath> load_bath(const std::string& bath_file, int qubits);

/// Terminal lines: the bath, p closed and open side by side, trace/positivity.
std::string open_system_text(const OhmicBath& bath, const OpenAnnealResult& open, double p_closed);
/// JSON table `bath` (inputs) and `open_system` (results).
void put_open_system_json(toml::table& j, const OhmicBath& bath, const OpenAnnealResult& open);
/// HDF5 group `group` (e.g. "/anneal/open_system"): bath and result attributes,
/// final populations.
void write_open_system_hdf5(Hdf5Output& h5, const std::string& group, const OhmicBath& bath,
                            const OpenAnnealResult& open);

/// `durations --bath`: the table of p closed and open and both TTS per grid duration.
std::string open_durations_text(const OhmicBath& bath, const std::vector<OpenDurationPoint>& rows);
/// JSON tables `bath` and `open_system` (with `points`: one entry per grid duration).
void put_open_durations_json(toml::table& j, const OhmicBath& bath, const std::vector<OpenDurationPoint>& rows);

}  // namespace gapwise::cli
