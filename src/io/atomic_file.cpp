#include "io/atomic_file.hpp"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <stdexcept>

#include <fcntl.h>
#include <unistd.h>

#include <fmt/format.h>

#include "io/input_error.hpp"
#include "io/output_paths.hpp"

namespace gapwise {

void check_output_path(const std::string& path, const std::string& key) {
  namespace fs = std::filesystem;
  std::error_code ec;
  if (fs::is_directory(path, ec))
    throw InputError({path, 0, 0, key}, "the output path is a directory", "give a file name, e.g. " + path + "/result.h5");
  const fs::path parent = fs::path(path).parent_path();
  if (!parent.empty() && !fs::is_directory(parent, ec))
    throw InputError({path, 0, 0, key}, fmt::format("the folder '{}' does not exist", parent.string()),
                     "create it first or choose another path");
  // Probe now, before hours of work: can a file be created beside the target?
  const std::string probe = fmt::format("{}.probe-{}", path, static_cast<long>(::getpid()));
  const int fd = ::open(probe.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
  if (fd < 0) {
    const int err = errno;
    throw InputError({path, 0, 0, key},
                     fmt::format("cannot create a file in '{}' ({})", parent.empty() ? "." : parent.string(),
                                 std::strerror(err)),
                     "choose a folder you can write to");
  }
  ::close(fd);
  ::unlink(probe.c_str());
}

std::string temporary_path_for(const std::string& path) {
  return fmt::format("{}.tmp-{}", path, static_cast<long>(::getpid()));
}

void commit_temporary(const std::string& temp, const std::string& final_path) {
  const int fd = ::open(temp.c_str(), O_RDONLY);
  if (fd >= 0) {
    const int rc = ::fsync(fd);
    const int err = errno;
    ::close(fd);
    if (rc != 0) {
      std::remove(temp.c_str());
      throw std::runtime_error(fmt::format("cannot flush '{}': {}", temp, std::strerror(err)));
    }
  }
  try {  // the last line of defence: a rename never replaces a device, FIFO or /dev/stdout
    check_output_not_special(final_path, "output");
  } catch (...) {
    std::remove(temp.c_str());
    throw;
  }
  if (std::rename(temp.c_str(), final_path.c_str()) != 0) {
    const int err = errno;
    std::remove(temp.c_str());
    throw std::runtime_error(fmt::format("cannot move the result into '{}': {}", final_path, std::strerror(err)));
  }
}

void write_whole_file(const std::string& path, const std::string& content, const std::string& shown_as) {
  const std::string& name = shown_as.empty() ? path : shown_as;
  std::FILE* f = std::fopen(path.c_str(), "wb");
  if (!f) throw std::runtime_error(fmt::format("cannot write '{}': {}", name, std::strerror(errno)));
  const bool ok = std::fwrite(content.data(), 1, content.size(), f) == content.size();
  const int err = errno;
  const bool flushed = std::fflush(f) == 0;
  const int flush_err = errno;
  const bool closed = std::fclose(f) == 0;
  if (!ok || !flushed || !closed) {
    std::remove(path.c_str());
    throw std::runtime_error(
        fmt::format("cannot write '{}': {}", name, std::strerror(!ok ? err : !flushed ? flush_err : errno)));
  }
}

void write_file_atomically(const std::string& path, const std::string& content) {
  const std::string tmp = temporary_path_for(path);
  write_whole_file(tmp, content, path);
  commit_temporary(tmp, path);
}

}  // namespace gapwise
