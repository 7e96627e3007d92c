#include "frame/frame_point_cache.hpp"

#include <algorithm>
#include <cmath>

#include "hamiltonian/memory_budget.hpp"

namespace gapwise {

namespace {
constexpr double kSameS = 1e-14;
constexpr double kMaxBudget = 4.0 * 1024.0 * 1024.0 * 1024.0;

double point_bytes(const SolvedPoint& p) {
  return static_cast<double>(p.vectors.size() + static_cast<Eigen::Index>(p.energies_ghz.size())) * sizeof(double) +
         128.0;
}
}  // namespace

FramePointCache::FramePointCache(double budget_bytes) : budget_(budget_bytes) {
  if (!(budget_ > 0.0)) {
    const double avail = available_bytes();
    budget_ = avail > 0.0 ? std::min(kMaxBudget, 0.25 * avail) : 512.0 * 1024.0 * 1024.0;
  }
}

FramePointCache::Key FramePointCache::key_of(const SectorHamiltonian& h, const EnergyScales& scales) {
  return {&h.full(), &scales, static_cast<int>(h.sector())};
}

std::shared_ptr<const SolvedPoint> FramePointCache::find(const SectorHamiltonian& h, const EnergyScales& scales,
                                                         double s, int levels) const {
  std::lock_guard<std::mutex> g(mutex_);
  const auto it = points_.find(key_of(h, scales));
  if (it == points_.end()) return nullptr;
  const auto& m = it->second;
  auto p = m.lower_bound(s - kSameS);
  if (p == m.end() || p->first > s + kSameS) return nullptr;
  if (p->second->vectors.cols() < levels) return nullptr;
  return p->second;
}

std::optional<double> FramePointCache::farthest_towards(const SectorHamiltonian& h, const EnergyScales& scales,
                                                        double from, double to, int levels) const {
  std::lock_guard<std::mutex> g(mutex_);
  const auto it = points_.find(key_of(h, scales));
  if (it == points_.end()) return std::nullopt;
  const auto& m = it->second;
  if (to > from) {
    // Largest stored s in (from, to].
    auto p = m.upper_bound(to + kSameS);
    while (p != m.begin()) {
      --p;
      if (p->first <= from + kSameS) break;
      if (p->second->vectors.cols() >= levels) return std::min(p->first, to);
    }
  } else if (to < from) {
    // Smallest stored s in [to, from).
    for (auto p = m.lower_bound(to - kSameS); p != m.end() && p->first < from - kSameS; ++p)
      if (p->second->vectors.cols() >= levels) return std::max(p->first, to);
  }
  return std::nullopt;
}

void FramePointCache::store(const SectorHamiltonian& h, const EnergyScales& scales, SolvedPoint p) {
  std::lock_guard<std::mutex> g(mutex_);
  ++stats_.solved;
  const double bytes = point_bytes(p);
  auto& m = points_[key_of(h, scales)];
  auto it = m.lower_bound(p.s - kSameS);
  const bool same = it != m.end() && it->first <= p.s + kSameS;
  if (same && it->second->vectors.cols() >= p.vectors.cols()) return;  // another thread stored it first
  const double freed = same ? point_bytes(*it->second) : 0.0;
  if (stats_.bytes - freed + bytes > budget_) {
    ++stats_.not_stored;
    return;
  }
  stats_.bytes += bytes - freed;
  const double s = same ? it->first : p.s;
  if (same) m.erase(it);
  m.emplace(s, std::make_shared<const SolvedPoint>(std::move(p)));
}

void FramePointCache::count_reuse() {
  std::lock_guard<std::mutex> g(mutex_);
  ++stats_.reused;
}

FrameCacheStats FramePointCache::stats() const {
  std::lock_guard<std::mutex> g(mutex_);
  return stats_;
}

}  // namespace gapwise
