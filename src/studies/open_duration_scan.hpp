#pragma once
// The duration study's thermal companion: p(t_f) with a bath at each duration
// of a grid, beside the closed-system value, and the time to solution of both.
//
//   auto rows = open_duration_scan(setup, bath, {10, 30, 100}, 1e-6, 0.99, closed_p);
#include <functional>
#include <vector>

#include "dynamics/master_equation.hpp"
#include "io/result_journal.hpp"
#include "studies/duration_sweep.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

struct OpenDurationPoint {
  double duration_ns = 0;
  double closed_probability = 0;  ///< from the closed-system study (same duration)
  OpenAnnealResult open;
  TimeToSolution closed_tts, open_tts;
};

/// One open-system anneal per duration (the schedule's shape stretched to it),
/// from the setup's start state. `closed_p(t)` gives the closed-system p there.
std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns, double tolerance,
                                                  double target, const std::function<double(double)>& closed_p,
                                                  const std::function<void(std::size_t done)>& on_point = {});

/// The same with every open-system option (method, fixed K, progress).
std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns,
                                                  const OpenPropagatorOptions& options, double target,
                                                  const std::function<double(double)>& closed_p,
                                                  const std::function<void(std::size_t done)>& on_point = {});

/// The journal layout of the open-system points (one record per duration): the
/// numbers every output of `durations --bath` shows. The final populations are
/// not journaled: a point taken from the journal has none.
JournalLayout open_duration_journal_layout();

/// The scan with a journal (may be null): a duration found in it is taken from
/// it, not simulated again; each simulated one is appended when it finishes.
/// `on_point(done)` is called for simulated and journaled points alike.
std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns,
                                                  const OpenPropagatorOptions& options, double target,
                                                  const std::function<double(double)>& closed_p,
                                                  ResultJournal* journal,
                                                  const std::function<void(std::size_t done)>& on_point = {});

}  // namespace gapwise
