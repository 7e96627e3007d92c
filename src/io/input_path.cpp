#include "io/input_path.hpp"

#include <cerrno>
#include <cstring>
#include <filesystem>

#include <sys/stat.h>
#include <unistd.h>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

PathProblem describe_path_error(const std::string& path, int err) {
  namespace fs = std::filesystem;
  switch (err) {
    case ELOOP:
      return {"the path runs through a loop of symbolic links (ELOOP): following them never reaches a file",
              "point the link at a real file, or give the file's own path"};
    case ENAMETOOLONG:
      return {"the path is too long for the system (ENAMETOOLONG: a name over 255 bytes or a path over 4096)",
              "shorten the file or folder names, or move the file higher up"};
    case ENOENT: {
      struct stat link{};
      if (::lstat(path.c_str(), &link) == 0 && S_ISLNK(link.st_mode)) {
        std::error_code ec;
        const fs::path target = fs::read_symlink(path, ec);
        return {fmt::format("this is a symbolic link to '{}', which does not exist (ENOENT)", target.string()),
                "point the link at an existing file, or give the file's own path"};
      }
      const fs::path parent = fs::path(path).parent_path();
      std::error_code ec;
      if (!parent.empty() && !fs::exists(parent, ec))
        return {fmt::format("no such file: the folder '{}' does not exist (ENOENT)", parent.string()),
                "check the folder part of the path"};
      return {"no such file (ENOENT)", "check the spelling and the folder"};
    }
    case ENOTDIR:
      return {"a part of the path that should be a folder is a file (ENOTDIR)", "check the folder part of the path"};
    case EACCES:
      return {"permission denied (EACCES)", "make the file (and its folders) readable to you, or copy it"};
    default:
      return {fmt::format("cannot open it ({})", std::strerror(err)), "check the path and the file's permissions"};
  }
}

std::optional<PathProblem> input_path_problem(const std::string& path, bool directory_allowed) {
  if (path.empty()) return PathProblem{"the path is empty", "give the path of an input file"};
  struct stat st{};
  if (::stat(path.c_str(), &st) != 0) return describe_path_error(path, errno);
  if (S_ISDIR(st.st_mode) && !directory_allowed)
    return PathProblem{"this is a directory, not a file", "give the path of a file"};
  if (::access(path.c_str(), R_OK) != 0) return describe_path_error(path, errno);
  return std::nullopt;
}

void require_readable_input(const std::string& path, bool directory_allowed) {
  if (auto why = input_path_problem(path, directory_allowed)) throw InputError({path, 0, 0, ""}, why->problem, why->fix);
}

}  // namespace gapwise
