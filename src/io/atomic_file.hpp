#pragma once
// Results are written atomically: into a temporary file beside the target, then
// flushed and renamed over it, so a crash never leaves a half-written result.
//
//   write_file_atomically("out.csv", text);
//   std::string tmp = temporary_path_for("out.h5");  ... write ...; commit_temporary(tmp, "out.h5");
#include <string>

namespace gapwise {

/// Refuses (InputError naming `key`) an output path that is a directory or whose
/// folder does not exist.
void check_output_path(const std::string& path, const std::string& key);
std::string temporary_path_for(const std::string& path);
/// fsync + rename; throws std::runtime_error with the reason (e.g. disk full).
void commit_temporary(const std::string& temp_path, const std::string& final_path);
/// Writes `content` to `path` (no rename), checking every step; on failure the
/// partial file is removed and std::runtime_error names `shown_as` (default:
/// the path) and the reason.
void write_whole_file(const std::string& path, const std::string& content, const std::string& shown_as = {});
void write_file_atomically(const std::string& path, const std::string& content);

}  // namespace gapwise
