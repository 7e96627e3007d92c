// Range checks of command-line options, one rule per kind of option for every
// subcommand (targets, tolerances, thread counts, sigmas, counts, levels; the
// limits and texts shared with the Python module live in io/value_limits), and
// the --allow-long flag that lifts the work limit (studies/work_estimate.hpp).
// Each check throws InputError naming the option, so bad input is exit 2.
#include <cmath>
#include <iostream>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "io/input_error.hpp"
#include "io/value_limits.hpp"

namespace gapwise::cli {
namespace {
SourcePlace option_place(const std::string& option) { return {option, 0, 0, option}; }
}  // namespace

void check_target_probability(double p, const std::string& option) { check_target_value(p, option_place(option)); }

void check_tolerance(double tolerance, const std::string& option) { check_tolerance_value(tolerance, option_place(option)); }

void check_threads(long long threads, const std::string& option) { check_threads_value(threads, option_place(option)); }

void check_sigma(double sigma, const std::string& option) { check_sigma_value(sigma, option_place(option)); }

void check_count(long long value, const CountLimit& limit, const std::string& option) {
  check_count_value(value, limit, option_place(option));
}

void check_levels_fit(int levels, int qubits, SpinFlipSector sector, const std::string& option) {
  const double states = std::ldexp(1.0, qubits - (sector == SpinFlipSector::Full ? 0 : 1));
  const std::string space = describe_sector(sector);
  if (levels > states)
    throw InputError(option_place(option), fmt::format("{} levels asked for, but the {} has only {:.0f} state{}", levels, space, states, states == 1 ? "" : "s"),
                     fmt::format("give at most {:.0f} levels", states));
}

int fit_levels(int levels, bool given, int qubits, SpinFlipSector sector, const std::string& option) {
  if (given) {
    check_levels_fit(levels, qubits, sector, option);
    return levels;
  }
  const double states = std::ldexp(1.0, qubits - (sector == SpinFlipSector::Full ? 0 : 1));
  if (levels <= states) return levels;
  std::cerr << fmt::format("note: {} lowered from the default {} to {}, the number of states of the {}\n", option,
                           levels, states, describe_sector(sector));
  return static_cast<int>(states);
}

CLI::Option* add_frame_above_option(CLI::App* sub, double& frame_above_ns) {
  return sub->add_option("--frame-above", frame_above_ns,
                         "with --propagator auto: run the frame propagator at durations >= NS ns and split-auto below,\n"
                         "instead of choosing by predicted cost (for tests and for users who measured their own\n"
                         "crossover; default: the cost model)")
      ->option_text("NS");
}

void check_frame_above(double frame_above_ns, const std::string& propagator) {
  if (std::isnan(frame_above_ns)) return;
  if (propagator != "auto")
    throw InputError(option_place("--frame-above"),
                     fmt::format("--frame-above sets where --propagator auto switches to the frame, but the propagator is {}", propagator),
                     "add --propagator auto, or drop --frame-above");
  if (!(frame_above_ns > 0) || !std::isfinite(frame_above_ns))
    throw InputError(option_place("--frame-above"), fmt::format("{} ns is not a positive duration", frame_above_ns),
                     "give a duration in ns above 0, e.g. --frame-above 5000");
}

CLI::Option* add_allow_long_flag(CLI::App* sub, bool& allow_long) {
  return sub->add_flag("--allow-long", allow_long,
                       "run even when the estimated work is above the limit (2e13 amplitude updates, roughly half a\n"
                       "day of one core); without it such runs are refused before they start, with the estimate");
}

}  // namespace gapwise::cli
