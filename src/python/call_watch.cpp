#include "python/call_watch.hpp"

#include <csignal>

namespace gapwise::python {
namespace {

// SIGINTs seen while a watch listens; a watch stops when the count moves. The
// handler counts and then calls the handler it replaced (Python's, which trips
// its own flag so that PyErr_CheckSignals later runs the Python-level handler:
// KeyboardInterrupt by default). Lock-free atomics are async-signal-safe.
std::atomic<unsigned long> g_sigints{0};
struct sigaction g_previous {};

extern "C" void count_sigint(int sig, siginfo_t* info, void* context) {
  g_sigints.fetch_add(1, std::memory_order_relaxed);
  if (g_previous.sa_flags & SA_SIGINFO) {
    if (g_previous.sa_sigaction) g_previous.sa_sigaction(sig, info, context);
  } else if (g_previous.sa_handler != SIG_DFL && g_previous.sa_handler != SIG_IGN && g_previous.sa_handler) {
    g_previous.sa_handler(sig);
  }
}

bool on_main_python_thread() {
  py::module_ threading = py::module_::import("threading");
  return threading.attr("current_thread")().is(threading.attr("main_thread")());
}

}  // namespace

CallWatch::CallWatch(std::string call, py::object progress, double interval_s)
    : call_(std::move(call)), progress_(std::move(progress)), interval_s_(interval_s),
      owner_(std::this_thread::get_id()), start_(std::chrono::steady_clock::now()), last_poll_(start_) {
  if (!progress_.is_none() && !PyCallable_Check(progress_.ptr()))
    throw py::type_error("progress must be None or a callable taking one dict (see help(gapwise))");
  sigints_at_start_ = g_sigints.load();
  // Python handles signals on its main thread only, and so do we: a call from
  // another thread is stopped by Ctrl-C only through its progress callable.
  if (!on_main_python_thread()) return;
  struct sigaction current {};
  if (sigaction(SIGINT, nullptr, &current) != 0) return;
  const bool ours = (current.sa_flags & SA_SIGINFO) && current.sa_sigaction == &count_sigint;
  if (ours) {  // a call made from a progress callable: the outer watch already listens
    listens_ = true;
    return;
  }
  if (!(current.sa_flags & SA_SIGINFO) && (current.sa_handler == SIG_IGN || current.sa_handler == SIG_DFL))
    return;  // ignored, or no Python handler (embedded interpreter): leave SIGINT alone
  struct sigaction mine {};
  mine.sa_sigaction = &count_sigint;
  mine.sa_flags = SA_SIGINFO | (current.sa_flags & SA_ONSTACK);
  sigemptyset(&mine.sa_mask);
  g_previous = current;
  if (sigaction(SIGINT, &mine, nullptr) == 0) handler_installed_ = listens_ = true;
}

CallWatch::~CallWatch() {
  if (handler_installed_) sigaction(SIGINT, &g_previous, nullptr);
}

void CallWatch::report(const std::string& stage, double done, double total, double fraction) {
  {
    std::lock_guard<std::mutex> g(lock_);
    stage_ = stage;
    done_ = done;
    total_ = total;
    fraction_ = fraction >= 0 ? fraction : total > 0 ? done / total : -1.0;
    fresh_ = true;
  }
  poll();
}

void CallWatch::poll() {
  if (stop_.load(std::memory_order_relaxed)) throw CallInterrupted{};
  if (listens_ && g_sigints.load(std::memory_order_relaxed) != sigints_at_start_) {
    stop_ = true;
    throw CallInterrupted{};
  }
  if (std::this_thread::get_id() != owner_) return;
  const auto now = std::chrono::steady_clock::now();
  if (std::chrono::duration<double>(now - last_poll_).count() < interval_s_) return;
  last_poll_ = now;
  {
    py::gil_scoped_acquire gil;
    if (PyErr_CheckSignals() != 0) {
      error_.emplace();  // fetches the raised exception
    } else {
      try {
        deliver(nullptr);
      } catch (py::error_already_set& e) {
        // Ctrl-C may land while the callable runs: that is still an interrupt.
        callable_failed_ = !e.matches(PyExc_KeyboardInterrupt);
        error_.emplace(std::move(e));
      }
    }
  }
  if (error_) {
    stop_ = true;
    throw CallInterrupted{};
  }
}

std::function<void(const PropagationProgress&)> CallWatch::propagation_hook(const char* stage) {
  if (!stage) return [this](const PropagationProgress&) { poll(); };
  const std::string name = stage;
  return [this, name](const PropagationProgress& p) {
    report(p.pass > 1 ? name + " (pass " + std::to_string(p.pass) + ")" : name, p.fraction, 1.0);
  };
}

std::function<void(const GapSearchProgress&)> CallWatch::gap_hook() {
  return [this](const GapSearchProgress& p) {
    report(std::string("gap search: ") + p.stage, static_cast<double>(p.evaluations),
           static_cast<double>(std::max(p.planned, p.evaluations)));
  };
}

void CallWatch::deliver(const char* final_stage) {
  if (progress_.is_none()) return;
  py::dict d;
  {
    std::lock_guard<std::mutex> g(lock_);
    if (!fresh_ && !final_stage) return;
    fresh_ = false;
    d["call"] = call_;
    d["stage"] = final_stage ? std::string(final_stage) : stage_;
    d["done"] = done_;
    d["total"] = total_;
    d["fraction"] = final_stage && std::string(final_stage) == "done" ? 1.0 : fraction_;
  }
  d["seconds"] = std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
  progress_(d);
}

void CallWatch::raise_stop() {
  // Ctrl-C seen by the handler before the calling thread looked: Python's
  // handler runs now; one that does not raise still ends the call, as Ctrl-C asked.
  if (!error_) {
    if (PyErr_CheckSignals() == 0) PyErr_SetNone(PyExc_KeyboardInterrupt);
    error_.emplace();  // fetches (and clears) the raised exception
  }
  // The callable hears "interrupted" (so that a progress line can end), unless
  // it is what raised; anything it raises now gives way to the interrupt.
  if (!callable_failed_) {
    try {
      deliver("interrupted");
    } catch (py::error_already_set&) {
    }
  }
  py::error_already_set e = std::move(*error_);
  error_.reset();
  throw e;
}

}  // namespace gapwise::python
