#pragma once
// A journal of finished points for long, resumable studies (duration sweeps,
// pause maps, ensembles): each finished point is appended as one line and
// flushed to disk before the study moves on, so a crash or kill loses at most
// the points still running. Rerunning the same study opens the same journal,
// finds the finished points and skips them.
//
// How a study uses it (the pattern gapwise's studies follow):
//   1. fingerprint every input that decides the numbers (file texts, tolerances,
//      propagator) with input_fingerprint(); a journal written for other inputs
//      is refused with an InputError that says what to do, never silently reused;
//   2. look each point up with find(key) before computing it;
//   3. append(key, values) when it finishes (thread-safe);
//   4. after each append, rewrite the result files atomically (Hdf5Output,
//      write_file_atomically) from everything known, so the result files are
//      complete and valid at every moment, too.
//
//   ResultJournal j("sweep.h5.journal", {"duration-sweep", {"duration_ns"},
//                   {"ground_probability", "norm_drift"}}, input_fingerprint({problem_text, schedule_text}));
//   if (auto v = j.find({20.0})) use((*v)[0]);
//   else j.append({20.0}, {0.93, 1e-9});
//
// File format (text, one record a line; numbers as C99 hexadecimal floats so
// they round-trip bit for bit):
//   # gapwise-journal 1 kind=<kind> fingerprint=<16 hex digits>
//   # keys: <names>  values: <names>
//   <key...> <value...> *<checksum>
// A line is accepted only when it ends in a newline and its checksum (FNV-1a
// of the text before '*') matches. Any other line (a torn last line from a
// kill mid-write, or a line damaged anywhere) is dropped with a warning naming
// the journal, the line and what is wrong, its point is computed again, and the
// journal is compacted when it is reopened. Only one process may use a journal
// at a time (an exclusive lock; a second run gets an InputError). A journal that
// holds no record when it is closed (a run refused or stopped before its first
// point) is removed, so no empty journal is left behind.
#include <atomic>
#include <functional>
#include <map>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "io/input_error.hpp"

namespace gapwise {

struct JournalLayout {
  std::string kind;                      ///< what study wrote it, e.g. "duration-sweep"
  std::vector<std::string> key_columns;  ///< numbers that identify a point
  std::vector<std::string> value_columns;
};

/// The refusal when flock() on the journal `path` fails with `err`: another run
/// holds it (EWOULDBLOCK), or the file system does not lock (ENOLCK, EOPNOTSUPP,
/// ...), named as such with the errno text and the way out.
InputError journal_lock_error(const std::string& path, int err);

class ResultJournal {
 public:
  /// Opens (creating when absent) the journal at `path`. Throws InputError when
  /// the file belongs to another kind of study or other inputs, or is locked.
  ResultJournal(std::string path, JournalLayout layout, std::string fingerprint);
  ~ResultJournal();
  ResultJournal(const ResultJournal&) = delete;
  ResultJournal& operator=(const ResultJournal&) = delete;

  const std::string& path() const { return path_; }
  const JournalLayout& layout() const { return layout_; }
  /// Number of records (loaded and appended).
  std::size_t size() const;
  /// Records loaded from disk when the journal was opened.
  std::size_t resumed() const { return resumed_; }
  /// Values of the point with exactly this key (exact comparison of doubles).
  std::optional<std::vector<double>> find(const std::vector<double>& key) const;
  /// Every record, ordered by key.
  std::map<std::vector<double>, std::vector<double>> records() const;
  /// Appends and flushes (fsync) one record; thread-safe. A key already present
  /// is replaced in memory and written again (the later line wins on reload).
  void append(const std::vector<double>& key, const std::vector<double>& values);
  /// Lines dropped when the journal was opened, one message each ("<path>:<line>:
  /// ... dropped"); each was also passed to the warning sink.
  const std::vector<std::string>& warnings() const { return warnings_; }
  /// The number of records, readable from a signal handler (lock-free).
  std::size_t record_count_signal_safe() const { return count_.load(std::memory_order_relaxed); }

  /// Where journals report dropped lines; the default writes "gapwise: warning:
  /// <message>" to stderr. Returns the previous sink.
  using WarningSink = std::function<void(const std::string&)>;
  static WarningSink set_warning_sink(WarningSink sink);

 private:
  std::string path_;
  JournalLayout layout_;
  std::string fingerprint_;
  int fd_ = -1;
  std::size_t resumed_ = 0;
  std::atomic<std::size_t> count_{0};
  std::vector<std::string> warnings_;
  mutable std::mutex mutex_;
  std::map<std::vector<double>, std::vector<double>> records_;
};

/// What a journal's text holds for a study with this layout and fingerprint:
/// the records of every whole, intact line; each other line is dropped with a
/// warning (path, line number, what is wrong). The clean journal is the first
/// `valid_bytes` of the text (0 for a new journal) followed by `kept_after`,
/// the intact lines after the first dropped one. Throws InputError (the path,
/// line and what to do) for a file that is no journal or belongs to another
/// study or other inputs.
/// ResultJournal reads its file with it; the fuzz target calls it directly.
///
///   JournalContents c = parse_journal_text(text, "sweep.h5.journal", layout, fingerprint);
struct JournalContents {
  std::map<std::vector<double>, std::vector<double>> records;
  std::size_t valid_bytes = 0;
  std::string kept_after;
  std::vector<std::string> warnings;
};
JournalContents parse_journal_text(std::string_view text, const std::string& path, const JournalLayout& layout,
                                   const std::string& fingerprint);
/// The two header lines a journal opens with.
std::string journal_header(const JournalLayout& layout, const std::string& fingerprint);
/// One record line (hexadecimal floats, checksum, newline).
std::string journal_record_line(const std::vector<double>& key, const std::vector<double>& values);

/// 16 hex digits (FNV-1a, 64 bit) over the parts, each length-prefixed, so that
/// ("ab", "c") and ("a", "bc") differ. Not cryptographic: it detects changed
/// inputs, it does not defend against forged journals.
std::string input_fingerprint(const std::vector<std::string>& parts);

/// The journal path used beside a result file: "<result>.journal".
std::string journal_path_for(const std::string& result_path);

}  // namespace gapwise
