#include "io/result_journal.hpp"

#include <cerrno>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <iostream>
#include <sstream>
#include <stdexcept>

#include <fcntl.h>
#include <sys/file.h>
#include <unistd.h>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {
namespace {

std::uint64_t fnv1a(std::string_view s, std::uint64_t h = 1469598103934665603ULL) {
  for (unsigned char c : s) { h ^= c; h *= 1099511628211ULL; }
  return h;
}

std::string join(const std::vector<std::string>& v) {
  std::string s;
  for (const auto& x : v) s += (s.empty() ? "" : ",") + x;
  return s;
}

}  // namespace

std::string journal_header(const JournalLayout& l, const std::string& fp) {
  return fmt::format("# gapwise-journal 1 kind={} fingerprint={}\n# keys: {}  values: {}\n", l.kind, fp,
                     join(l.key_columns), join(l.value_columns));
}

std::string journal_record_line(const std::vector<double>& key, const std::vector<double>& values) {
  std::string body;
  for (double x : key) body += fmt::format("{}{:a}", body.empty() ? "" : " ", x);
  for (double x : values) body += fmt::format(" {:a}", x);
  return fmt::format("{} *{:016x}\n", body, fnv1a(body));
}

namespace {

// Parses one record line (without its newline); on a malformed line returns
// what is wrong with it, else "". A NaN is malformed: no study journals one,
// and a NaN key would break the ordering of the record map.
std::string parse_record(const std::string& line, std::size_t nkeys, std::size_t nvalues, std::vector<double>& key,
                         std::vector<double>& values) {
  const auto star = line.rfind(" *");
  if (star == std::string::npos) return "it has no checksum (\" *<16 hex digits>\" at the end)";
  const std::string body = line.substr(0, star);
  if (line.substr(star + 2) != fmt::format("{:016x}", fnv1a(body)))
    return "its checksum does not match its text (the line was changed or only partly written)";
  std::vector<double> nums;
  const char* p = body.c_str();
  while (*p) {
    char* end = nullptr;
    const double x = std::strtod(p, &end);
    if (end == p) return fmt::format("\"{}\" is not a number", std::string(p).substr(0, 24));
    if (std::isnan(x)) return "it holds a NaN, which no study writes";
    nums.push_back(x);
    p = end;
    while (*p == ' ') ++p;
  }
  if (nums.size() != nkeys + nvalues)
    return fmt::format("it holds {} numbers where this study writes {}", nums.size(), nkeys + nvalues);
  key.assign(nums.begin(), nums.begin() + static_cast<std::ptrdiff_t>(nkeys));
  values.assign(nums.begin() + static_cast<std::ptrdiff_t>(nkeys), nums.end());
  return {};
}

void write_all(int fd, const std::string& text, const std::string& path) {
  std::size_t done = 0;
  while (done < text.size()) {
    const ssize_t w = ::write(fd, text.data() + done, text.size() - done);
    if (w < 0) {
      if (errno == EINTR) continue;
      throw std::runtime_error(fmt::format("cannot write the journal '{}': {}", path, std::strerror(errno)));
    }
    done += static_cast<std::size_t>(w);
  }
  if (::fsync(fd) != 0)
    throw std::runtime_error(fmt::format("cannot flush the journal '{}': {}", path, std::strerror(errno)));
}

}  // namespace

std::string input_fingerprint(const std::vector<std::string>& parts) {
  std::uint64_t h = fnv1a("");
  for (const auto& p : parts) h = fnv1a(p, fnv1a(fmt::format("{}:", p.size()), h));
  return fmt::format("{:016x}", h);
}

std::string journal_path_for(const std::string& result_path) { return result_path + ".journal"; }

JournalContents parse_journal_text(std::string_view text, const std::string& path, const JournalLayout& layout,
                                   const std::string& fingerprint) {
  JournalContents out;
  const std::string header = journal_header(layout, fingerprint);
  if (text.empty() || (text.size() < header.size() && header.compare(0, text.size(), text) == 0))
    return out;  // new journal (or one killed while writing its header)
  if (text.compare(0, 17, "# gapwise-journal") != 0)
    throw InputError({path, 1, 1, "journal"}, "this file is not a gapwise journal",
                     "remove it or choose another output file; gapwise keeps its journal beside the result file");
  const std::string first(text.substr(0, text.find('\n')));
  if (first.find(fmt::format("kind={} ", layout.kind)) == std::string::npos)
    throw InputError({path, 1, 1, "journal"}, fmt::format("this journal belongs to another kind of study ({})", first),
                     "choose another output file, or delete the journal to start afresh");
  if (text.compare(0, header.size(), header) != 0)
    throw InputError({path, 1, 1, "journal"},
                     "this journal was written for other inputs (problem, schedule or numerical options "
                     "changed since), so its points cannot be reused",
                     fmt::format("rerun with --fresh (or delete '{}') to start afresh, or write to another output file", path));
  std::size_t keep = header.size();
  bool dropped = false;
  int line_no = 3;
  std::vector<double> key, values;
  for (std::size_t at = header.size(); at < text.size(); ++line_no) {
    const auto end = text.find('\n', at);
    if (end == std::string_view::npos) {  // a torn last line (killed mid-write)
      out.warnings.push_back(fmt::format("{}:{}: the last line is incomplete (the run was stopped while writing it); "
                                         "dropped, its point will be computed again",
                                         path, line_no));
      break;
    }
    const std::string line(text.substr(at, end - at));
    const std::string wrong = parse_record(line, layout.key_columns.size(), layout.value_columns.size(), key, values);
    if (!wrong.empty()) {
      out.warnings.push_back(
          fmt::format("{}:{}: a damaged record was dropped: {}; its point will be computed again", path, line_no, wrong));
      dropped = true;
    } else {
      out.records[key] = values;
      if (dropped) out.kept_after += line + "\n";
      else keep = end + 1;
    }
    at = end + 1;
  }
  out.valid_bytes = keep;
  return out;
}

namespace {
ResultJournal::WarningSink& warning_sink() {
  static ResultJournal::WarningSink sink = [](const std::string& m) { std::cerr << "gapwise: warning: " << m << "\n"; };
  return sink;
}
}  // namespace

ResultJournal::WarningSink ResultJournal::set_warning_sink(WarningSink sink) {
  WarningSink old = std::move(warning_sink());
  warning_sink() = std::move(sink);
  return old;
}

InputError journal_lock_error(const std::string& path, int err) {
  if (err == EWOULDBLOCK || err == EAGAIN || err == EINTR)
    return InputError({path, 0, 0, "journal"}, "another gapwise run is using this journal right now",
                      "wait for it to finish, or write to another output file");
  // ENOLCK (NFS mounted without a lock daemon, or out of lock records),
  // EOPNOTSUPP/ENOSYS/EINVAL (file systems that do not lock at all).
  return InputError({path, 0, 0, "journal"},
                    fmt::format("cannot lock the journal: {} (errno {}); the file system holding it does not support "
                                "file locks, and without a lock two runs could write the same journal",
                                std::strerror(err), err),
                    "write --out to a folder on a file system with locks (a local disk such as node-local /tmp or "
                    "$TMPDIR, then copy the result), or ask for the file system to be mounted with locking (NFS: "
                    "with a running lock daemon, not `nolock`)");
}

ResultJournal::ResultJournal(std::string path, JournalLayout layout, std::string fingerprint)
    : path_(std::move(path)), layout_(std::move(layout)), fingerprint_(std::move(fingerprint)) {
  fd_ = ::open(path_.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
  if (fd_ < 0)
    throw InputError({path_, 0, 0, "journal"}, fmt::format("cannot open the journal: {}", std::strerror(errno)),
                     "check that the folder exists and is writable");
  if (::flock(fd_, LOCK_EX | LOCK_NB) != 0) {
    const int err = errno;
    ::close(fd_);
    fd_ = -1;
    throw journal_lock_error(path_, err);
  }
  try {
    std::string text;
    char buf[1 << 16];
    for (;;) {
      const ssize_t r = ::read(fd_, buf, sizeof buf);
      if (r < 0) {
        if (errno == EINTR) continue;
        throw std::runtime_error(fmt::format("cannot read the journal '{}': {}", path_, std::strerror(errno)));
      }
      if (r == 0) break;
      text.append(buf, static_cast<std::size_t>(r));
    }
    JournalContents contents = parse_journal_text(text, path_, layout_, fingerprint_);
    records_ = std::move(contents.records);
    warnings_ = std::move(contents.warnings);
    for (const auto& w : warnings_)
      if (warning_sink()) warning_sink()(w);
    // Compaction: the intact lines after a dropped one move up over it. Bytes
    // before it stay as they are, so a crash during this leaves every intact
    // record in the file (at worst twice, the same values) and at most one
    // damaged line at the seam, dropped again on the next open.
    const std::size_t keep = contents.valid_bytes + contents.kept_after.size();
    resumed_ = records_.size();
    count_ = records_.size();
    if (keep < text.size() || keep == 0) {
      if (::lseek(fd_, static_cast<off_t>(contents.valid_bytes), SEEK_SET) < 0)
        throw std::runtime_error(fmt::format("cannot seek in the journal '{}': {}", path_, std::strerror(errno)));
      if (!contents.kept_after.empty()) write_all(fd_, contents.kept_after, path_);
      if (::ftruncate(fd_, static_cast<off_t>(keep)) != 0)
        throw std::runtime_error(fmt::format("cannot repair the journal '{}': {}", path_, std::strerror(errno)));
    }
    if (::lseek(fd_, static_cast<off_t>(keep), SEEK_SET) < 0)
      throw std::runtime_error(fmt::format("cannot seek in the journal '{}': {}", path_, std::strerror(errno)));
    if (keep == 0) write_all(fd_, journal_header(layout_, fingerprint_), path_);
  } catch (...) {
    ::close(fd_);
    fd_ = -1;
    throw;
  }
}

ResultJournal::~ResultJournal() {
  if (fd_ < 0) return;
  // No record: the run was refused or stopped before its first point. Nothing
  // worth resuming is in the file; remove it (still under the lock).
  if (count_.load() == 0) ::unlink(path_.c_str());
  ::close(fd_);  // releases the lock
}

std::size_t ResultJournal::size() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return records_.size();
}

std::optional<std::vector<double>> ResultJournal::find(const std::vector<double>& key) const {
  std::lock_guard<std::mutex> lock(mutex_);
  const auto it = records_.find(key);
  if (it == records_.end()) return std::nullopt;
  return it->second;
}

std::map<std::vector<double>, std::vector<double>> ResultJournal::records() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return records_;
}

void ResultJournal::append(const std::vector<double>& key, const std::vector<double>& values) {
  if (key.size() != layout_.key_columns.size() || values.size() != layout_.value_columns.size())
    throw std::invalid_argument(fmt::format("journal record has {} keys and {} values, the layout {} and {}", key.size(),
                                            values.size(), layout_.key_columns.size(), layout_.value_columns.size()));
  const std::string line = journal_record_line(key, values);
  std::lock_guard<std::mutex> lock(mutex_);
  write_all(fd_, line, path_);
  records_[key] = values;
  count_ = records_.size();
}

}  // namespace gapwise
