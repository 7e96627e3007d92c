#pragma once
// The energy scales A(s) (transverse) and B(s) (problem), in GHz, as functions of
// the schedule parameter s in [0, 1].
//
//   auto lin = EnergyScales::linear(5.0, 5.0);      // A = 5 (1 - s), B = 5 s
//   auto tab = EnergyScales::table(s, a, b, ScaleInterpolation::MonotoneCubic);
//   double a = tab.a_ghz(0.3), dbds = tab.db_ds(0.3);
//
// A table is interpolated either piecewise linearly or with the monotone cubic
// Hermite interpolant (PCHIP; Fritsch & Carlson, SIAM J. Numer. Anal. 17, 238
// (1980), as implemented by Boost.Math): between two table points it never leaves
// the range of the two values, so it cannot overshoot or turn negative.
#include <memory>
#include <string>
#include <vector>

namespace gapwise {

enum class ScaleInterpolation { Linear, MonotoneCubic };

class EnergyScales {
 public:
  static EnergyScales linear(double a_max_ghz, double b_max_ghz);
  /// s strictly increasing, values >= 0. MonotoneCubic needs >= 4 points; with
  /// fewer it falls back to Linear (reported by interpolation()).
  static EnergyScales table(std::vector<double> s, std::vector<double> a_ghz, std::vector<double> b_ghz,
                            ScaleInterpolation interpolation);

  double a_ghz(double s) const;
  double b_ghz(double s) const;
  double da_ds(double s) const;
  double db_ds(double s) const;

  bool is_linear_ramp() const { return kind_ == Kind::LinearRamp; }
  ScaleInterpolation interpolation() const { return interp_; }
  double s_first() const;  ///< smallest s covered
  double s_last() const;   ///< largest s covered
  /// Largest A and largest B over the covered range (for step-size and memory heuristics).
  double a_max_ghz() const;
  double b_max_ghz() const;
  std::string describe() const;

  const std::vector<double>& table_s() const { return s_; }
  const std::vector<double>& table_a() const { return a_; }
  const std::vector<double>& table_b() const { return b_; }

 private:
  enum class Kind { LinearRamp, Table };
  struct Cubic;
  Kind kind_ = Kind::LinearRamp;
  ScaleInterpolation interp_ = ScaleInterpolation::Linear;
  double a_max_ = 0, b_max_ = 0;
  std::vector<double> s_, a_, b_;
  std::shared_ptr<const Cubic> cubic_a_, cubic_b_;
  double eval(const std::vector<double>& y, const std::shared_ptr<const Cubic>& c, double s, bool derivative) const;
};

}  // namespace gapwise
