#include "studies/open_duration_scan.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>

namespace gapwise {

namespace {

// The journal refuses NaN (no closed study writes one); the open result uses
// NaN for "not estimated", which is stored as -inf (never a value of these
// non-negative estimates).
double to_journal(double x) { return std::isnan(x) ? -std::numeric_limits<double>::infinity() : x; }
double from_journal(double x) {
  return x == -std::numeric_limits<double>::infinity() ? std::numeric_limits<double>::quiet_NaN() : x;
}

const char* const kJournaledMethods[] = {"ame-full", "ame-truncated"};

std::vector<double> journal_values(const OpenAnnealResult& r) {
  double method = -1;
  for (int i = 0; i < 2; ++i)
    if (r.propagator == kJournaledMethods[i]) method = i;
  return {to_journal(r.ground_probability), to_journal(r.trace_deviation), to_journal(r.min_eigenvalue),
          static_cast<double>(r.stats.steps), static_cast<double>(r.stats.rejected_steps),
          static_cast<double>(r.stats.eigen_solves), to_journal(r.stats.error_estimate),
          to_journal(r.stats.max_trace_deviation), to_journal(r.stats.min_eigenvalue),
          static_cast<double>(r.stats.max_jump_terms), to_journal(r.wall_seconds), method,
          static_cast<double>(r.levels), to_journal(r.top_level_population), to_journal(r.lost_population),
          to_journal(r.truncation_estimate), r.level_cap_hit ? 1.0 : 0.0, r.levels_fixed ? 1.0 : 0.0};
}

OpenAnnealResult from_journal_values(double duration_ns, const std::vector<double>& v, const std::string& method) {
  OpenAnnealResult r;
  r.duration_ns = duration_ns;
  r.ground_probability = from_journal(v[0]);
  r.trace_deviation = from_journal(v[1]);
  r.min_eigenvalue = from_journal(v[2]);
  r.stats.steps = static_cast<long>(v[3]);
  r.stats.rejected_steps = static_cast<long>(v[4]);
  r.stats.eigen_solves = static_cast<long>(v[5]);
  r.stats.error_estimate = from_journal(v[6]);
  r.stats.max_trace_deviation = from_journal(v[7]);
  r.stats.min_eigenvalue = from_journal(v[8]);
  r.stats.max_jump_terms = static_cast<long>(v[9]);
  r.wall_seconds = from_journal(v[10]);
  r.propagator = v[11] >= 0 ? kJournaledMethods[static_cast<int>(v[11])] : method;
  r.levels = static_cast<int>(v[12]);
  r.top_level_population = from_journal(v[13]);
  r.lost_population = from_journal(v[14]);
  r.truncation_estimate = from_journal(v[15]);
  r.level_cap_hit = v[16] != 0;
  r.levels_fixed = v[17] != 0;
  return r;
}

}  // namespace

JournalLayout open_duration_journal_layout() {
  return {"open-duration-scan",
          {"duration_ns"},
          {"ground_probability", "trace_deviation", "min_eigenvalue", "steps", "rejected_steps", "eigen_solves",
           "error_estimate", "max_trace_deviation", "min_eigenvalue_seen", "max_jump_terms", "wall_seconds",
           "method", "levels", "top_level_population", "lost_population", "truncation_estimate", "level_cap_hit",
           "levels_fixed"}};
}

std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns,
                                                  const OpenPropagatorOptions& options, double target,
                                                  const std::function<double(double)>& closed_p,
                                                  ResultJournal* journal,
                                                  const std::function<void(std::size_t done)>& on_point) {
  std::vector<OpenDurationPoint> rows;
  for (double t : durations_ns) {
    OpenDurationPoint row;
    row.duration_ns = t;
    row.closed_probability = closed_p(t);
    const std::optional<std::vector<double>> saved = journal ? journal->find({t}) : std::nullopt;
    if (saved && saved->size() == open_duration_journal_layout().value_columns.size()) {
      row.open = from_journal_values(t, *saved, resolve_open_method(options.method, setup.hamiltonian.qubits()));
    } else {
      const AnnealPath path = setup.schedule.path_for(t);
      row.open = simulate_open_anneal(setup.hamiltonian, setup.ground, setup.schedule.scales, path, setup.start,
                                      bath, options);
      if (journal) journal->append({t}, journal_values(row.open));
    }
    row.closed_tts = time_to_solution(t, std::clamp(row.closed_probability, 0.0, 1.0), target);
    row.open_tts = time_to_solution(t, std::clamp(row.open.ground_probability, 0.0, 1.0), target);
    rows.push_back(std::move(row));
    if (on_point) on_point(rows.size());
  }
  return rows;
}

std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns,
                                                  const OpenPropagatorOptions& options, double target,
                                                  const std::function<double(double)>& closed_p,
                                                  const std::function<void(std::size_t done)>& on_point) {
  return open_duration_scan(setup, bath, durations_ns, options, target, closed_p, nullptr, on_point);
}

std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns, double tolerance,
                                                  double target, const std::function<double(double)>& closed_p,
                                                  const std::function<void(std::size_t done)>& on_point) {
  return open_duration_scan(setup, bath, durations_ns, OpenPropagatorOptions{.tolerance = tolerance}, target, closed_p,
                            on_point);
}

}  // namespace gapwise
