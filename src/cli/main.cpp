// gapwise: the command line. Each subcommand lives in its own cmd_*.cpp file and
// registers itself here; all computation is in the library.
#include <algorithm>
#include <cstdlib>
#include <iostream>
#include <string>
#include <vector>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "cli/cli_common.hpp"
#include "dynamics/split_exponentials.hpp"
#include "gapwise_version.hpp"
#include "io/input_error.hpp"
#include "io/terminal_text.hpp"

namespace gapwise::cli {
int& exit_code() { static int code = kExitOk; return code; }
std::string& command_line() { static std::string s; return s; }

namespace {

/// Levenshtein distance (insertions, deletions, substitutions), for suggestions.
std::size_t edit_distance(const std::string& a, const std::string& b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diagonal = up;
    }
  }
  return row[b.size()];
}

/// CLI11 2.1 answers a mistyped subcommand with "A subcommand is required";
/// say what is wrong and suggest the nearest name instead (exit code 2).
bool refuse_unknown_subcommand(CLI::App& app, int argc, char** argv) {
  if (argc < 2 || argv[1][0] == '-') return false;
  const std::string typed = argv[1];
  std::vector<std::string> names;
  for (const CLI::App* sub : app.get_subcommands([](CLI::App*) { return true; })) names.push_back(sub->get_name());
  if (std::find(names.begin(), names.end(), typed) != names.end()) return false;
  std::string best;
  std::size_t best_distance = std::string::npos;
  for (const auto& n : names)
    if (const std::size_t d = edit_distance(typed, n); d < best_distance) { best_distance = d; best = n; }
  std::string list;
  for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
  // A suggestion only when it is plausibly a typo: at most a third of the name differs.
  const bool close = best_distance <= std::max<std::size_t>(2, best.size() / 3);
  std::cerr << "gapwise: error: unknown subcommand '" << terminal_text(typed) << "'."
            << (close ? " Did you mean '" + best + "'?" : std::string()) << " Subcommands: " << list
            << ". Fix: `gapwise --help` describes each\n";
  return true;
}

}  // namespace
}  // namespace gapwise::cli

int main(int argc, char** argv) {
  using namespace gapwise;
  for (int i = 0; i < argc; ++i) cli::command_line() += (i ? " " : "") + std::string(argv[i]);
  CLI::App app{fmt::format(
      "gapwise {}: how long must a small problem be annealed?\n"
      "Exact closed-system simulation of the transverse-field Ising Hamiltonian\n"
      "  H(s) = -(A(s)/2) sum_i X_i + (B(s)/2) [sum_i h_i Z_i + sum_{{i<j}} J_ij Z_i Z_j]   (GHz)\n"
      "along a schedule s(t), with its spectrum and minimum gap.\n\n"
      "Start with:  gapwise inspect data-samples/triangle.toml\n"
      "             gapwise anneal data-samples/triangle.toml schedules/linear.toml -d 20\n"
      "Every subcommand has its own --help. Exit codes: 0 ok, 2 bad input, 1 internal failure,\n"
      "3 accuracy check failed with --strict.",
      kVersion)};
  // The version and the propagation kernels this CPU gets (chosen at run time;
  // GAPWISE_KERNELS=NAME forces one, a bad name is reported here as well).
  app.set_version_flag("--version", [] {
    std::string kernels;
    try {
      kernels = SplitExponentials::kernel_variant();
    } catch (const std::exception& e) {
      kernels = std::string("none (") + e.what() + ")";
    }
    return fmt::format("gapwise {}\npropagation kernels: {} (this CPU runs: {})", kVersion, kernels,
                       fmt::join(SplitExponentials::available_kernel_variants(), ", "));
  });
  app.require_subcommand(1);
  cli::use_wrapped_help(app);
  cli::register_inspect(app);
  cli::register_anneal(app);
  cli::register_diagnose(app);
  cli::register_figure(app);
  cli::register_generate(app);
  cli::register_gap(app);
  cli::register_gap_path(app);
  cli::register_compare_paths(app);
  cli::register_pause_map(app);
  cli::register_reverse_map(app);
  cli::register_embed_cost(app);
  cli::register_durations(app);
  cli::register_ensemble(app);
  cli::register_merge_shards(app);
  cli::refuse_empty_output_paths(app);
  if (cli::refuse_unknown_subcommand(app, argc, argv)) return cli::kExitBadInput;
  // A bad GAPWISE_KERNELS is the user's setting, not an internal failure: refuse
  // it before any work (--help and --version still answer; --version names it).
  if (const char* k = std::getenv("GAPWISE_KERNELS"); k && *k) {
    const bool info = std::any_of(argv + 1, argv + argc, [](const char* a) {
      const std::string s(a);
      return s == "--help" || s == "-h" || s == "--version";
    });
    try {
      (void)SplitExponentials::kernel_variant();
    } catch (const std::exception& e) {
      if (!info) {
        std::cerr << "gapwise: error: " << e.what() << "\n";
        return cli::kExitBadInput;
      }
    }
  }
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : cli::kExitBadInput;
  } catch (const InputError& e) {
    std::cerr << "gapwise: error: " << e.what() << "\n";
    return cli::kExitBadInput;
  } catch (const std::exception& e) {
    std::cerr << "gapwise: internal failure: " << e.what() << "\n";
    return cli::kExitInternal;
  } catch (...) {
    // The library turns HDF5's exceptions (not std::exceptions) into messages
    // naming the file; this is the last line, so nothing ever reaches terminate().
    std::cerr << "gapwise: internal failure: an unexpected error (not a standard exception) in `"
              << cli::command_line() << "`\n";
    return cli::kExitInternal;
  }
  return cli::exit_code();
}
