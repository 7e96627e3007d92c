#pragma once
// The resumable-run scaffold of the journaled commands (durations, gap,
// pause-map, reverse-map, ensemble): the journal beside the first result file (discarded
// first under --fresh), the Ctrl-C notice that says what is on disk, and the
// anneal counter on a terminal. A command builds one, hands journal() to its
// study, and writes its results atomically after each point (io/atomic_file).
//
//   JournaledRun run(o.out, o.fresh, pause_map_journal_layout(), fingerprint, {o.out});
//   const PauseMap m = pause_map(setup, mo, run.journal(), AnnealCounter(o.quiet));
//   ... write the result ...
//   run.results_written();
#include <cstddef>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "io/interrupt_notice.hpp"
#include "io/result_journal.hpp"

namespace gapwise::cli {

class JournaledRun {
 public:
  /// Opens the journal beside `result` (none when `result` is empty: nothing is
  /// kept); `results` are the files Ctrl-C reports on; `unit` names a record.
  JournaledRun(const std::string& result, bool fresh, JournalLayout layout, const std::string& fingerprint,
               const std::vector<std::string>& results, const std::string& unit = "point");
  ResultJournal* journal() const { return journal_.get(); }
  /// The results are written: Ctrl-C no longer speaks of the journal.
  void results_written() { notice_.reset(); }
  /// The result file holds everything: the journal is closed and removed.
  void remove_journal();
  /// The run was refused (bad input found midway): a journal this run created
  /// is removed, one it resumed from is kept.
  void discard_if_new();

 private:
  std::unique_ptr<ResultJournal> journal_;
  std::optional<InterruptNotice> notice_;  // destroyed before the journal it reports on
};

/// "\r3 / 12 anneals" on stderr when it is a terminal and not `quiet`; the
/// line is ended when the counter (and its copies) go out of use.
class AnnealCounter {
 public:
  explicit AnnealCounter(bool quiet);
  void operator()(std::size_t done, std::size_t total) const;

 private:
  std::shared_ptr<struct AnnealCounterLine> line_;
};

}  // namespace gapwise::cli
