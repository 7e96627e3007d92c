#include "io/output_paths.hpp"

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <optional>

#include <sys/stat.h>
#include <unistd.h>

#include <fmt/format.h>

#include "io/atomic_file.hpp"
#include "io/input_error.hpp"
#include "io/result_journal.hpp"

namespace gapwise {
namespace fs = std::filesystem;

namespace {

std::optional<struct stat> stat_of(const std::string& path) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return std::nullopt;
  return st;
}

std::string kind_of(const struct stat& st) {
  if (S_ISFIFO(st.st_mode)) return "a FIFO (named pipe)";
  if (S_ISCHR(st.st_mode)) return "a character device";
  if (S_ISBLK(st.st_mode)) return "a block device";
  if (S_ISSOCK(st.st_mode)) return "a socket";
  if (S_ISDIR(st.st_mode)) return "a folder";
  return "not a regular file";
}

bool under_system_folder(const fs::path& p) {
  const std::string s = p.lexically_normal().string();
  for (const char* dir : {"/dev", "/proc", "/sys"})
    if (s == dir || s.rfind(std::string(dir) + "/", 0) == 0) return true;
  return false;
}

// The directory entry a rename over `path` would replace, and every link the
// path leads through: does any of them lie in /dev, /proc or /sys?
std::optional<std::string> system_place_on_the_way(const std::string& path) {
  std::error_code ec;
  fs::path p = fs::absolute(path, ec);
  if (ec) return std::nullopt;
  for (int hop = 0; hop < 40; ++hop) {
    const fs::path parent = fs::weakly_canonical(p.parent_path(), ec);
    const fs::path entry = (ec ? p.parent_path() : parent) / p.filename();
    const bool exists = fs::exists(fs::symlink_status(entry, ec));
    if (!exists) return std::nullopt;  // a new name: a rename replaces nothing there
    if (under_system_folder(entry)) return entry.string();
    if (!fs::is_symlink(entry, ec)) return std::nullopt;
    const fs::path target = fs::read_symlink(entry, ec);
    if (ec) return std::nullopt;
    p = target.is_absolute() ? target : entry.parent_path() / target;
  }
  return std::nullopt;  // a loop: open/stat report it
}

bool same_file(const struct stat& a, const struct stat& b) { return a.st_dev == b.st_dev && a.st_ino == b.st_ino; }

std::string describe(const FilePlan::Entry& e) {
  return e.journal ? fmt::format("the journal '{}'", e.path) : fmt::format("{} '{}'", e.key, e.path);
}

}  // namespace

FilePlan& FilePlan::input(const std::string& path, const std::string& key) {
  if (!path.empty()) inputs.push_back({path, key});
  return *this;
}

FilePlan& FilePlan::input_file_or_folder(const std::string& path, const std::string& key) {
  if (!path.empty()) inputs.push_back({path, key, true});
  return *this;
}

FilePlan& FilePlan::output(const std::string& path, const std::string& key) {
  if (!path.empty()) outputs.push_back({path, key});
  return *this;
}

FilePlan& FilePlan::journal_of(const std::string& result_path) {
  if (!result_path.empty()) outputs.push_back({journal_path_for(result_path), "journal", false, true});
  return *this;
}

void check_input_is_regular(const std::string& path, const std::string& key, bool folder_allowed) {
  const auto st = stat_of(path);
  if (!st) return;  // a missing input is reported by whoever opens it, with its own wording
  if (S_ISREG(st->st_mode) || (folder_allowed && S_ISDIR(st->st_mode))) return;
  if (S_ISDIR(st->st_mode))
    throw InputError({path, 0, 0, key}, "the input is a folder, not a file", "give the file inside it");
  throw InputError({path, 0, 0, key},
                   fmt::format("the input is {}, not a regular file; gapwise reads an input more than once (to "
                               "check it and to fingerprint it for resuming), which a pipe or device cannot give",
                               kind_of(*st)),
                   "save the data to a file first (e.g. `cat > problem.toml`) and give that file");
}

void check_output_not_special(const std::string& path, const std::string& key) {
  if (const auto place = system_place_on_the_way(path))
    throw InputError({path, 0, 0, key},
                     fmt::format("the output path leads to '{}' in a system folder (/dev, /proc or /sys); results are "
                                 "written to a temporary file and renamed over the target, which would replace it",
                                 *place),
                     "give an ordinary file name, e.g. result.csv, and read it from there (`cat result.csv`)");
  const auto st = stat_of(path);
  if (st && !S_ISREG(st->st_mode) && !S_ISDIR(st->st_mode))  // folders: check_output_path says what to do
    throw InputError({path, 0, 0, key},
                     fmt::format("the output path exists and is {}; results are written to a temporary file and "
                                 "renamed over the target, which would replace it",
                                 kind_of(*st)),
                     "give an ordinary file name (a new one or an earlier result)");
}

void check_file_plan(const FilePlan& plan) {
  for (const auto& in : plan.inputs) check_input_is_regular(in.path, in.key, in.folder_allowed);
  std::vector<std::optional<struct stat>> out_stats;
  std::vector<std::string> out_names;
  for (const auto& out : plan.outputs) {
    check_output_not_special(out.path, out.key);
    const auto st = stat_of(out.path);
    if (st)
      for (const auto& in : plan.inputs) {
        const auto in_st = stat_of(in.path);
        if (in_st && same_file(*st, *in_st))
          throw InputError({out.path, 0, 0, out.key},
                           fmt::format("{} is the same file as the {} input '{}'{}; writing it would destroy the input",
                                       describe(out), in.key, in.path,
                                       out.path == in.path ? "" : " (a link to it)"),
                           out.journal ? "choose another output file (the journal is kept beside it)"
                                       : "choose another output file name");
      }
    std::error_code ec;
    fs::path name = fs::weakly_canonical(fs::absolute(out.path, ec), ec);
    const std::string canonical = ec ? out.path : name.string();
    for (std::size_t k = 0; k < out_names.size(); ++k) {
      const bool same = (st && out_stats[k]) ? same_file(*st, *out_stats[k]) : canonical == out_names[k];
      if (same) {
        const auto& first = plan.outputs[k];
        throw InputError({out.path, 0, 0, out.key},
                         fmt::format("{} and {} are the same file; one output would overwrite the other",
                                     describe(first), describe(out)),
                         "give each output its own file name");
      }
    }
    out_stats.push_back(st);
    out_names.push_back(canonical);
  }
  for (const auto& out : plan.outputs) check_output_path(out.path, out.key);
}

}  // namespace gapwise
