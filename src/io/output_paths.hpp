#pragma once
// One check, before any work, of every file a run reads and writes, so that a
// result never replaces an input or a special file:
//   - every input must be a regular file (or a folder where one is allowed):
//     a FIFO, a device or a socket is refused instead of blocking forever on
//     open (gapwise reads an input more than once: to parse it and to
//     fingerprint it for resuming, so a pipe could not work anyway);
//   - no output may be the same file as an input (same device and inode, so
//     also through symbolic and hard links), nor the same file as another
//     output of the run (`--out X --csv X`, or a journal `X.journal` that is
//     also given as an output);
//   - an output that exists and is not a regular file (a device such as
//     /dev/null, a FIFO, a socket, a link to one), or that lies under /dev,
//     /proc or /sys (/dev/stdout -> /proc/self/fd/1), is refused: results are
//     written to a temporary file and renamed over the target, which would
//     replace the special file (as root, the device node itself);
//   - then check_output_path (a folder, a missing folder, an unwritable one).
// Every refusal is an InputError (exit 2) naming the option and the path.
//
//   FilePlan plan;
//   plan.input(o.problem, "problem").input(o.schedule, "schedule")
//       .output(o.out, "--out").journal_of(o.out).output(o.csv, "--csv");
//   check_file_plan(plan);   // first thing a command does; empty paths are skipped
#include <string>
#include <vector>

namespace gapwise {

struct FilePlan {
  struct Entry {
    std::string path, key;
    bool folder_allowed = false;  ///< inputs: a folder (of problem files) is fine
    bool journal = false;         ///< outputs: opened in place (appended), not renamed over
  };
  std::vector<Entry> inputs, outputs;

  /// An input file (skipped when `path` is empty: an optional input not given).
  FilePlan& input(const std::string& path, const std::string& key);
  /// An input that may also be a folder (an instance set).
  FilePlan& input_file_or_folder(const std::string& path, const std::string& key);
  /// An output written by temporary file + rename (skipped when empty).
  FilePlan& output(const std::string& path, const std::string& key);
  /// The journal kept beside `result_path` (journal_path_for), when it is not empty.
  FilePlan& journal_of(const std::string& result_path);
};

/// Throws InputError for the first problem found (see the comment above).
void check_file_plan(const FilePlan& plan);

/// The input part alone, for one file: InputError when `path` exists and is not
/// a regular file (nor a folder when `folder_allowed`).
void check_input_is_regular(const std::string& path, const std::string& key, bool folder_allowed = false);

/// The special-file part alone: InputError when `path` exists and is not a
/// regular file, or lies under /dev, /proc or /sys. commit_temporary calls it
/// as the last line before a rename.
void check_output_not_special(const std::string& path, const std::string& key);

}  // namespace gapwise
