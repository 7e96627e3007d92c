#pragma once
// Shared pieces of the subcommands: loading inputs, the exit-code contract, and
// the options every simulation command takes. Subcommands stay thin: parse,
// call the library, print.
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

#include "hamiltonian/spin_flip_sector.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "io/value_limits.hpp"
#include "cli/value_lists.hpp"

namespace gapwise::cli {

/// Exit codes: 0 success, 2 bad input, 1 internal failure, 3 an accuracy check
/// failed under --strict (the results were written but are not trustworthy).
inline constexpr int kExitOk = 0;
inline constexpr int kExitBadInput = 2;
inline constexpr int kExitInternal = 1;
inline constexpr int kExitAccuracy = 3;

/// Set by a subcommand's callback; main() returns it.
int& exit_code();
/// The command line as typed, for provenance.
std::string& command_line();

/// Help text wrapped to the terminal width (COLUMNS, else the terminal on stdout,
/// else 100 columns; kept within 60..200). Set on the app before the subcommands
/// are registered, so each inherits it.
std::size_t help_width();
void use_wrapped_help(CLI::App& app);

/// One registration function per subcommand file.
void register_inspect(CLI::App& app);
void register_anneal(CLI::App& app);
void register_diagnose(CLI::App& app);
void register_figure(CLI::App& app);
void register_generate(CLI::App& app);
void register_gap(CLI::App& app);
void register_gap_path(CLI::App& app);
void register_compare_paths(CLI::App& app);
void register_pause_map(CLI::App& app);
void register_reverse_map(CLI::App& app);
void register_embed_cost(CLI::App& app);
void register_durations(CLI::App& app);

/// Check for an input-file argument: InputError naming the path and why it cannot
/// be read (link loop, name too long, missing, a directory, no permission).
CLI::Validator readable_input_file();

/// Every output option of every subcommand (--out, --csv, --write-physical,
/// --out-dir) refuses an empty value ("") while the command line is parsed,
/// before any work (exit 2, naming the option). Call after registering.
void refuse_empty_output_paths(CLI::App& app);
/// Range checks shared by every subcommand (option_checks.cpp); InputError naming `option`.
/// Targets lie in (0, 1); tolerances in [1e-12, 1e-2]; threads in 0 (one per core) to kMaxThreads;
/// sigmas are finite and >= 0; counts within their limit; --levels at most the states of `space`.
/// The limits and texts are io/value_limits.hpp's, shared with the Python module.

/// The --propagator option's help: "NAME=default" in the option column and the
/// names at the end of the description, where the help wraps them to the
/// terminal (CLI11 would print the whole list in the option column).
inline CLI::Option* list_propagator_names(CLI::Option* opt, const std::vector<std::string>& names) {
  std::string list;
  for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
  opt->option_text("NAME=" + opt->get_default_str());
  opt->description(opt->get_description() + " (one of: " + list + ")");
  return opt;
}
void check_target_probability(double p, const std::string& option = "--target");
/// --frame-above NS: with --propagator auto, the frame at durations >= NS ns and
/// split-auto below, instead of the cost model (dynamics/propagator_choice.hpp).
CLI::Option* add_frame_above_option(CLI::App* sub, double& frame_above_ns);
/// InputError unless not given (NaN) or a positive finite duration given with --propagator auto.
void check_frame_above(double frame_above_ns, const std::string& propagator);
void check_tolerance(double tolerance, const std::string& option = "--tolerance");
void check_threads(long long threads, const std::string& option = "--threads");
void check_sigma(double sigma, const std::string& option);
void check_count(long long value, const CountLimit& limit, const std::string& option);
void check_levels_fit(int levels, int qubits, SpinFlipSector sector, const std::string& option = "--levels");
/// A --levels the user typed must fit (check_levels_fit); a default that does not fit
/// is lowered to the state count with a note on stderr. Returns the levels to use.
int fit_levels(int levels, bool given, int qubits, SpinFlipSector sector, const std::string& option = "--levels");
/// The one flag that lifts the work limit (studies/work_estimate.hpp), same name on every command.
CLI::Option* add_allow_long_flag(CLI::App* sub, bool& allow_long);

void register_ensemble(CLI::App& app);
void register_merge_shards(CLI::App& app);

}  // namespace gapwise::cli
