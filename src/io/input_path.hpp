#pragma once
// Why an input path cannot be read, in words that say what is wrong: a loop of
// symbolic links, a name too long for the system, a missing file (or a link to
// one, or a missing folder on the way), a part that is not a folder, no
// permission. Shared by the file reader, the instance-folder reader and the
// command line's check of its file arguments.
//
//   require_readable_input("problem.toml");          // InputError naming the path and the cause
//   if (auto why = input_path_problem(dir, true)) ...  // a folder is fine here
#include <optional>
#include <string>

namespace gapwise {

struct PathProblem {
  std::string problem;  ///< what is wrong, e.g. "the path runs through a loop of symbolic links (ELOOP)"
  std::string fix;
};

/// The words for errno `err` met while opening or examining `path`.
PathProblem describe_path_error(const std::string& path, int err);

/// Why `path` cannot be read as an input (stat and access only: nothing is
/// opened, so a FIFO does not block here); nullopt when it can. A directory is
/// a problem unless `directory_allowed`.
std::optional<PathProblem> input_path_problem(const std::string& path, bool directory_allowed = false);

/// Throws InputError ({path, 0, 0, ""}) with input_path_problem's words.
void require_readable_input(const std::string& path, bool directory_allowed = false);

}  // namespace gapwise
