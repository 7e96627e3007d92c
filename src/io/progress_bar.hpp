#pragma once
// A progress bar on stderr for long studies: done/total, elapsed time and an
// estimate of the time left. Drawn only when stderr is a terminal (so logs and
// pipes stay clean), redrawn at most five times a second, thread-safe.
//
// The estimate weights each item by its expected cost (for a duration sweep
// the duration itself: the work grows with t_f), so a sweep that did its
// longest durations first does not promise a false early finish.
//
//   ProgressBar bar("durations", 13, total_cost);   // enabled iff stderr is a terminal
//   bar.finished_item(cost_of_item);                  // from any thread
//   bar.done();                                       // clears the line
//
// One long item whose own progress is known (an anneal) shows a stage and the
// fraction of it instead of counts:
//   bar.stage("run 1 of 2, pass 3", 0.45);   // "anneal run 1 of 2, pass 3 [==========>   ] 45%, 12s elapsed"
//
// Forced on (enabled = 1) while stderr is not a terminal (a log file), the bar
// writes whole lines, at most one every few seconds, instead of redrawing one.
#include <chrono>
#include <condition_variable>
#include <mutex>
#include <string>
#include <thread>

namespace gapwise {

class ProgressBar {
 public:
  /// `enabled` defaults to isatty(stderr).
  ProgressBar(std::string label, std::size_t total_items, double total_cost, int enabled = -1);
  ~ProgressBar();
  ProgressBar(const ProgressBar&) = delete;
  ProgressBar& operator=(const ProgressBar&) = delete;

  /// More work discovered (e.g. bisection probes).
  void add_items(std::size_t items, double cost);
  void finished_item(double cost);
  /// Shows `stage` and the fraction done of it (0 to 1) in place of the counts.
  void stage(std::string stage, double fraction);
  /// Clears the bar (idempotent).
  void done();
  bool enabled() const { return enabled_; }
  /// The line the bar shows, e.g. "durations  7/13 [=====>    ] 1m05s elapsed, about 40s left".
  /// With nothing scheduled yet it reads "durations preparing, 0s elapsed" and is not drawn.
  std::string line() const;

 private:
  std::string label_;
  std::size_t total_ = 0, finished_ = 0;
  double total_cost_ = 0, finished_cost_ = 0;
  bool enabled_ = false, shown_ = false, tty_ = false;
  std::string stage_;
  double stage_fraction_ = 0;
  std::chrono::steady_clock::time_point last_line_{};
  std::chrono::steady_clock::time_point start_, last_draw_;
  mutable std::mutex mutex_;
  std::condition_variable wake_;
  bool stopping_ = false;
  std::thread ticker_;
  void draw(bool force);
  std::string line_locked() const;
};

/// "42s", "3m05s", "2h07m".
std::string format_duration_seconds(double seconds);

}  // namespace gapwise
