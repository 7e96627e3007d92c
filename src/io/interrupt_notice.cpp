#include "io/interrupt_notice.hpp"

#include <csignal>
#include <cstring>
#include <utility>

#include <unistd.h>

#include <fmt/format.h>

#include "io/atomic_file.hpp"
#include "io/result_journal.hpp"

namespace gapwise {
namespace {

// Everything the handler needs is prepared here beforehand: it may only call
// async-signal-safe functions (write, unlink, _exit) and read lock-free atomics.
constexpr std::size_t kText = 2048, kPaths = 4, kPath = 4096;
const ResultJournal* g_journal = nullptr;
char g_with_points[kText] = "", g_without_points[kText] = "", g_journal_path[kPath] = "";
char g_temporaries[kPaths][kPath] = {};

template <class... Args>
void put(char* buffer, std::size_t size, fmt::format_string<Args...> f, Args&&... args) {
  *fmt::format_to_n(buffer, size - 1, f, std::forward<Args>(args)...).out = '\0';
}

void say(const char* text) {
  const ssize_t ignored = ::write(STDERR_FILENO, text, std::strlen(text));
  (void)ignored;
}

extern "C" void on_interrupt(int sig) {
  for (auto& temp : g_temporaries)
    if (temp[0]) ::unlink(temp);
  if (g_journal && g_journal->record_count_signal_safe() > 0) {
    // The count, written without the formatting library (not signal-safe).
    char digits[24];
    std::size_t n = g_journal->record_count_signal_safe(), k = sizeof digits;
    digits[--k] = '\0';
    do { digits[--k] = static_cast<char>('0' + n % 10); n /= 10; } while (n > 0 && k > 0);
    say("\ngapwise: interrupted; ");
    say(digits + k);
    say(g_with_points);
  } else {
    if (g_journal_path[0]) ::unlink(g_journal_path);
    say(g_without_points);
  }
  ::_exit(128 + sig);
}

}  // namespace

InterruptNotice::InterruptNotice(const ResultJournal& journal, const std::vector<std::string>& results,
                                 const std::string& unit) {
  std::string shown;
  std::size_t k = 0;
  for (const auto& r : results) {
    if (r.empty()) continue;
    shown += (shown.empty() ? "" : ", ") + r;
    if (k < kPaths) put(g_temporaries[k++], kPath, "{}", temporary_path_for(r));
  }
  put(g_with_points, kText,
      " finished {}(s) are saved in the journal {}. Run the same command again to continue from there "
      "and finish {}.\n",
      unit, journal.path(), shown);
  put(g_without_points, kText,
      "\ngapwise: interrupted before the first {} finished: nothing was written (no result file {}, "
      "and no journal with results; the empty journal {} was removed).\n",
      unit, shown.empty() ? std::string() : "(" + shown + ")", journal.path());
  put(g_journal_path, kPath, "{}", journal.path());
  g_journal = &journal;
  std::signal(SIGINT, on_interrupt);
  std::signal(SIGTERM, on_interrupt);
}

InterruptNotice::~InterruptNotice() {
  std::signal(SIGINT, SIG_DFL);
  std::signal(SIGTERM, SIG_DFL);
  g_journal = nullptr;
  for (auto& temp : g_temporaries) temp[0] = '\0';
  g_journal_path[0] = '\0';
}

}  // namespace gapwise
