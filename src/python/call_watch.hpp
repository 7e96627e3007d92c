#pragma once
// Ctrl-C and progress for the module's long calls. The computation runs with
// the GIL released; the library's progress hooks (propagation steps, gap-search
// points, finished anneals, diagnosis stages) call poll() from whichever thread
// they run on. A SIGINT stops the computation at the next hook on any thread and
// the call raises KeyboardInterrupt (or whatever Python's SIGINT handler raises);
// an optional Python callable is given the latest progress on the calling thread,
// at most every `interval_s`, with the GIL taken for just that call.
//
//   CallWatch watch("anneal", progress);               // GIL held
//   sim.propagation.progress = watch.propagation_hook();
//   watch.run([&] { r = simulate_anneal(...); });      // releases the GIL
#include <atomic>
#include <chrono>
#include <functional>
#include <mutex>
#include <optional>
#include <string>
#include <thread>

#include <pybind11/pybind11.h>

#include "dynamics/propagator.hpp"
#include "spectrum/gap_search.hpp"

namespace gapwise::python {

namespace py = pybind11;

/// Thrown through the library to stop it; deliberately not a std::exception, so
/// that no `catch (const std::exception&)` inside the library can swallow it.
struct CallInterrupted {};

class CallWatch {
 public:
  /// `progress`: None, or a callable taking one dict {"call", "stage", "done",
  /// "total", "fraction", "seconds"}. Construct with the GIL held.
  CallWatch(std::string call, py::object progress, double interval_s = 0.2);
  ~CallWatch();
  CallWatch(const CallWatch&) = delete;
  CallWatch& operator=(const CallWatch&) = delete;

  /// Records where the work stands (any thread, GIL released), then poll().
  /// `total` 0: not known. `fraction` is done/total unless given.
  void report(const std::string& stage, double done, double total, double fraction = -1.0);
  /// Any thread, GIL released: throws CallInterrupted once Ctrl-C was pressed or
  /// the progress callable raised; on the calling thread, at most every
  /// interval_s, runs Python's signal handlers and the progress callable.
  void poll();

  /// Hooks for the library's options, each ending in poll().
  /// With a stage name, the propagation's fraction is reported under it (one
  /// anneal); without, the hook only polls (many anneals, counted elsewhere).
  std::function<void(const PropagationProgress&)> propagation_hook(const char* stage = nullptr);
  std::function<void(const GapSearchProgress&)> gap_hook();

  /// Runs `compute` with the GIL released; a stop by poll() re-raises the
  /// Python exception behind it (KeyboardInterrupt, or the progress callable's
  /// own). At the end the progress callable hears stage "done". GIL held.
  template <class F>
  void run(F&& compute) {
    bool stopped = false;
    {
      py::gil_scoped_release release;
      try {
        compute();
      } catch (const CallInterrupted&) {
        stopped = true;
      }
    }
    if (stopped) raise_stop();
    deliver("done");
  }

 private:
  /// GIL held: the progress callable with the latest state, if it is new; with
  /// `final_stage` ("done", "interrupted") always, under that stage name.
  void deliver(const char* final_stage);
  [[noreturn]] void raise_stop();  ///< GIL held: re-raises what stopped the call

  std::string call_;
  py::object progress_;
  double interval_s_;
  std::thread::id owner_;
  std::chrono::steady_clock::time_point start_, last_poll_;
  bool handler_installed_ = false;  ///< this watch put the SIGINT counter in place
  bool listens_ = false;            ///< SIGINT is counted (by this watch or an outer one)
  unsigned long sigints_at_start_ = 0;
  std::atomic<bool> stop_{false};
  std::optional<py::error_already_set> error_;  ///< what the calling thread saw raised
  bool callable_failed_ = false;                ///< error_ came from the progress callable
  std::mutex lock_;
  std::string stage_;
  double done_ = 0, total_ = 0, fraction_ = -1;
  bool fresh_ = false;
};

}  // namespace gapwise::python
