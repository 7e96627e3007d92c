#include "io/progress_bar.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include <unistd.h>

#include <fmt/format.h>

namespace gapwise {

std::string format_duration_seconds(double s) {
  if (!std::isfinite(s) || s < 0) return "?";
  const long t = std::lround(s);
  if (t < 60) return fmt::format("{}s", t);
  if (t < 3600) return fmt::format("{}m{:02d}s", t / 60, t % 60);
  return fmt::format("{}h{:02d}m", t / 3600, (t % 3600) / 60);
}

ProgressBar::ProgressBar(std::string label, std::size_t total_items, double total_cost, int enabled)
    : label_(std::move(label)), total_(total_items), total_cost_(total_cost) {
  tty_ = ::isatty(STDERR_FILENO) == 1;
  enabled_ = enabled < 0 ? tty_ : enabled != 0;
  start_ = last_draw_ = std::chrono::steady_clock::now();
  if (!enabled_) return;
  {
    std::lock_guard<std::mutex> g(mutex_);
    draw(true);
  }
  ticker_ = std::thread([this] {
    std::unique_lock<std::mutex> g(mutex_);
    while (!stopping_) {
      wake_.wait_for(g, std::chrono::seconds(1));
      if (!stopping_) draw(true);
    }
  });
}

ProgressBar::~ProgressBar() { done(); }

void ProgressBar::add_items(std::size_t items, double cost) {
  std::lock_guard<std::mutex> g(mutex_);
  total_ += items;
  total_cost_ += cost;
  draw(true);
}

void ProgressBar::finished_item(double cost) {
  std::lock_guard<std::mutex> g(mutex_);
  ++finished_;
  finished_cost_ += cost;
  draw(finished_ == total_);
}

void ProgressBar::stage(std::string stage, double fraction) {
  std::lock_guard<std::mutex> g(mutex_);
  const bool changed = stage != stage_;
  stage_ = std::move(stage);
  stage_fraction_ = std::clamp(fraction, 0.0, 1.0);
  draw(changed);
}

void ProgressBar::done() {
  {
    std::lock_guard<std::mutex> g(mutex_);
    stopping_ = true;
  }
  wake_.notify_all();
  if (ticker_.joinable()) ticker_.join();
  std::lock_guard<std::mutex> g(mutex_);
  if (enabled_ && shown_ && tty_) std::fputs("\r\033[2K", stderr), std::fflush(stderr);
  shown_ = false;
  enabled_ = false;
}

std::string ProgressBar::line() const {
  std::lock_guard<std::mutex> g(mutex_);
  return line_locked();
}

std::string ProgressBar::line_locked() const {
  const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
  constexpr int kWidth = 24;
  const double frac = total_cost_ > 0 ? std::clamp(finished_cost_ / total_cost_, 0.0, 1.0)
                                      : (total_ ? double(finished_) / double(total_) : 1.0);
  const double shown = stage_.empty() ? frac : stage_fraction_;
  const int fill = static_cast<int>(std::lround(shown * kWidth));
  std::string bar(static_cast<std::size_t>(fill), '=');
  if (fill < kWidth) bar += '>' + std::string(static_cast<std::size_t>(kWidth - fill - 1), ' ');
  if (!stage_.empty())
    return fmt::format("{} {} [{}] {:.0f}%, {} elapsed", label_, stage_, bar, 100.0 * stage_fraction_,
                       format_duration_seconds(elapsed));
  if (total_ == 0) return fmt::format("{} preparing, {} elapsed", label_, format_duration_seconds(elapsed));
  std::string eta = "estimating time left";
  if (finished_ == total_) eta = "done";
  else if (finished_cost_ > 0 && frac > 0)
    eta = "about " + format_duration_seconds(elapsed * (1.0 - frac) / frac) + " left";
  return fmt::format("{} {}/{} [{}] {} elapsed, {}", label_, finished_, total_, bar, format_duration_seconds(elapsed),
                     eta);
}

void ProgressBar::draw(bool force) {
  // Nothing scheduled yet (a bar sized as work is discovered): no "0/0 ... done" line.
  if (!enabled_ || (total_ == 0 && stage_.empty())) return;
  const auto now = std::chrono::steady_clock::now();
  if (!force && now - last_draw_ < std::chrono::milliseconds(200)) return;
  last_draw_ = now;
  if (!tty_) {  // a log: whole lines, one every few seconds at most (the first at once)
    if (shown_ && now - last_line_ < std::chrono::seconds(3)) return;
    last_line_ = now;
    std::fputs((line_locked() + "\n").c_str(), stderr);
    std::fflush(stderr);
    shown_ = true;
    return;
  }
  std::fputs(("\r\033[2K" + line_locked()).c_str(), stderr);
  std::fflush(stderr);
  shown_ = true;
}

}  // namespace gapwise
