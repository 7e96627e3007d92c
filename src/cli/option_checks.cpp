// Range checks of command-line options, one rule per kind of option for every
// subcommand (targets, tolerances, thread counts, sigmas, counts, levels), and
// the --allow-long flag that lifts the work limit (studies/work_estimate.hpp).
// Each check throws InputError naming the option, so bad input is exit 2.
#include <cmath>
#include <iostream>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "io/input_error.hpp"

namespace gapwise::cli {
namespace {
SourcePlace option_place(const std::string& option) { return {option, 0, 0, option}; }
}  // namespace

void check_target_probability(double p, const std::string& option) {
  if (!(p > 0.0 && p < 1.0))
    throw InputError(option_place(option), fmt::format("target {} is not inside (0, 1)", p),
                     "give a success probability such as 0.99");
}

void check_tolerance(double tolerance, const std::string& option) {
  if (!(tolerance >= 1e-12 && tolerance <= 1e-2))
    throw InputError(option_place(option), fmt::format("tolerance {} is out of range", tolerance),
                     "use a value between 1e-12 and 1e-2 (default 1e-6)");
}

void check_threads(long long threads, const std::string& option) {
  if (threads < 0 || threads > kMaxThreads)
    throw InputError(option_place(option), fmt::format("{} threads", threads),
                     fmt::format("give 1 to {} threads, or 0 for one per core (OMP_NUM_THREADS)", kMaxThreads));
}

void check_sigma(double sigma, const std::string& option) {
  if (!(sigma >= 0.0) || !std::isfinite(sigma))
    throw InputError(option_place(option), fmt::format("control-error sigma {} is not a finite number >= 0", sigma),
                     "give a standard deviation >= 0 (0 switches that error off), e.g. 0.03");
}

void check_count(long long value, long long lo, long long hi, const std::string& option, const std::string& what) {
  if (value < lo || value > hi)
    throw InputError(option_place(option), fmt::format("{} {} is outside {} to {}", what, value, lo, hi),
                     fmt::format("give a whole number from {} to {}", lo, hi));
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

CLI::Option* add_allow_long_flag(CLI::App* sub, bool& allow_long) {
  return sub->add_flag("--allow-long", allow_long,
                       "run even when the estimated work is above the limit (2e13 amplitude updates, roughly half a\n"
                       "day of one core); without it such runs are refused before they start, with the estimate");
}

}  // namespace gapwise::cli
