// The resumable-run scaffold (journaled_run.hpp).
#include "cli/journaled_run.hpp"

#include <unistd.h>

#include <filesystem>
#include <iostream>

#include <fmt/format.h>


namespace gapwise::cli {

JournaledRun::JournaledRun(const std::string& result, bool fresh, JournalLayout layout, const std::string& fingerprint,
                           const std::vector<std::string>& results, const std::string& unit) {
  if (result.empty()) return;
  const std::string path = journal_path_for(result);
  if (fresh) std::filesystem::remove(path);
  journal_ = std::make_unique<ResultJournal>(path, std::move(layout), fingerprint);
  notice_.emplace(*journal_, results, unit);
}

void JournaledRun::remove_journal() {
  if (!journal_) return;
  notice_.reset();
  const std::string path = journal_->path();
  journal_.reset();
  std::filesystem::remove(path);
}

void JournaledRun::discard_if_new() {
  if (journal_ && journal_->resumed() == 0) remove_journal();
}

struct AnnealCounterLine {
  bool shown = false;
  ~AnnealCounterLine() {
    if (shown) std::cerr << "\n";
  }
};

AnnealCounter::AnnealCounter(bool quiet) {
  if (!quiet && ::isatty(2)) line_ = std::make_shared<AnnealCounterLine>();
}

void AnnealCounter::operator()(std::size_t done, std::size_t total) const {
  if (!line_) return;
  line_->shown = true;
  std::cerr << fmt::format("\r{} / {} anneals", done, total) << std::flush;
}

}  // namespace gapwise::cli
