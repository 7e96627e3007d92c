#pragma once
// Ctrl-C (SIGINT) or SIGTERM during a journaled run: say truthfully what is on
// disk and leave. With finished points: they are in the journal, and a rerun of
// the same command continues. Before the first point: nothing was written (no
// result file, no journal with results), and the empty journal is removed.
// Either way a temporary file of a result being written is removed.
//
//   ResultJournal journal(journal_path_for(o.out), layout, fingerprint);
//   InterruptNotice notice(journal, {o.out, o.csv});   // until it goes out of scope
#include <string>
#include <vector>

namespace gapwise {

class ResultJournal;

class InterruptNotice {
 public:
  /// `results`: the result files the run writes (empty strings are skipped).
  /// `unit`: what one journal record is, in the message ("point", "instance").
  InterruptNotice(const ResultJournal& journal, const std::vector<std::string>& results,
                  const std::string& unit = "point");
  ~InterruptNotice();  ///< restores the default handlers
  InterruptNotice(const InterruptNotice&) = delete;
  InterruptNotice& operator=(const InterruptNotice&) = delete;
};

}  // namespace gapwise
