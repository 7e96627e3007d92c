#include "schedule/energy_scales.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

using std::isnan;  // Boost 1.74's pchip.hpp calls isnan unqualified
#include <boost/math/interpolators/pchip.hpp>
#include <fmt/format.h>

namespace gapwise {

struct EnergyScales::Cubic {
  boost::math::interpolators::pchip<std::vector<double>> f;
};

EnergyScales EnergyScales::linear(double a_max_ghz, double b_max_ghz) {
  if (!(a_max_ghz >= 0) || !(b_max_ghz >= 0)) throw std::invalid_argument("energy scales must be >= 0");
  EnergyScales e;
  e.kind_ = Kind::LinearRamp;
  e.a_max_ = a_max_ghz;
  e.b_max_ = b_max_ghz;
  return e;
}

EnergyScales EnergyScales::table(std::vector<double> s, std::vector<double> a, std::vector<double> b,
                                 ScaleInterpolation interpolation) {
  if (s.size() < 2 || a.size() != s.size() || b.size() != s.size())
    throw std::invalid_argument("an energy-scale table needs >= 2 points and equal lengths");
  for (std::size_t k = 1; k < s.size(); ++k)
    if (!(s[k] > s[k - 1])) throw std::invalid_argument("table s must increase strictly");
  EnergyScales e;
  e.kind_ = Kind::Table;
  e.interp_ = s.size() >= 4 ? interpolation : ScaleInterpolation::Linear;
  e.a_max_ = *std::max_element(a.begin(), a.end());
  e.b_max_ = *std::max_element(b.begin(), b.end());
  e.s_ = s;
  e.a_ = a;
  e.b_ = b;
  if (e.interp_ == ScaleInterpolation::MonotoneCubic) {
    e.cubic_a_ = std::make_shared<const Cubic>(Cubic{{std::vector<double>(s), std::move(a)}});
    e.cubic_b_ = std::make_shared<const Cubic>(Cubic{{std::move(s), std::move(b)}});
  }
  return e;
}

double EnergyScales::eval(const std::vector<double>& y, const std::shared_ptr<const Cubic>& c, double s,
                          bool derivative) const {
  s = std::clamp(s, s_.front(), s_.back());
  if (c) return derivative ? c->f.prime(s) : c->f(s);
  auto it = std::upper_bound(s_.begin(), s_.end(), s);
  std::size_t k = static_cast<std::size_t>(std::distance(s_.begin(), it));
  k = std::clamp<std::size_t>(k, 1, s_.size() - 1);
  const double slope = (y[k] - y[k - 1]) / (s_[k] - s_[k - 1]);
  return derivative ? slope : y[k - 1] + slope * (s - s_[k - 1]);
}

double EnergyScales::a_ghz(double s) const {
  return kind_ == Kind::LinearRamp ? a_max_ * (1.0 - s) : eval(a_, cubic_a_, s, false);
}
double EnergyScales::b_ghz(double s) const {
  return kind_ == Kind::LinearRamp ? b_max_ * s : eval(b_, cubic_b_, s, false);
}
double EnergyScales::da_ds(double s) const {
  return kind_ == Kind::LinearRamp ? -a_max_ : eval(a_, cubic_a_, s, true);
}
double EnergyScales::db_ds(double s) const {
  return kind_ == Kind::LinearRamp ? b_max_ : eval(b_, cubic_b_, s, true);
}
double EnergyScales::s_first() const { return kind_ == Kind::LinearRamp ? 0.0 : s_.front(); }
double EnergyScales::s_last() const { return kind_ == Kind::LinearRamp ? 1.0 : s_.back(); }
double EnergyScales::a_max_ghz() const { return a_max_; }
double EnergyScales::b_max_ghz() const { return b_max_; }

std::string EnergyScales::describe() const {
  if (kind_ == Kind::LinearRamp) return fmt::format("linear: A(s) = {} GHz (1 - s), B(s) = {} GHz s", a_max_, b_max_);
  return fmt::format("table of {} points over s in [{}, {}], {} interpolation", s_.size(), s_.front(), s_.back(),
                     interp_ == ScaleInterpolation::Linear ? "linear" : "monotone cubic");
}

}  // namespace gapwise
