// Tyre friction: peak coefficients that fall with load per tyre, and the friction ellipse that
// shares them between longitudinal and lateral force.
#pragma once

#include <algorithm>
#include <cmath>
#include <optional>

#include "lapwing/base/violation.hpp"

namespace lapwing {

/// A tyre set as the car file describes it (per tyre; all four alike).
struct Tyres {
  double mu_long;           // peak longitudinal friction coefficient at nominal load
  double mu_lat;            // peak lateral friction coefficient at nominal load
  double nominal_load_n;    // per tyre
  double load_sensitivity;  // fractional fall of mu per +100 % load over nominal
  double ellipse_exponent;  // n in (Fx/Fx_max)^n + (Fy/Fy_max)^n <= 1
  double rolling_radius_m;
  double rolling_resistance;  // coefficient of the vertical load

  /// The first value out of its range (key paths as under `tyres:` in a car file).
  std::optional<Violation> validate() const;
};

class TyreModel {
 public:
  explicit TyreModel(const Tyres& t)
      : mu_long0_(t.mu_long),
        mu_lat0_(t.mu_lat),
        nominal_n_(t.nominal_load_n),
        sensitivity_per_n_(t.load_sensitivity / t.nominal_load_n),
        n_(t.ellipse_exponent),
        quadratic_(t.ellipse_exponent == 2.0),
        long_per_lat_(t.mu_long / t.mu_lat) {}

  /// Load sensitivity, linear in the per-tyre load (common practice; README, "Physics and
  /// assumptions", tyres): mu(Fz) = mu0 (1 - s (Fz - Fn) / Fn), never below 0.1 mu0.
  /// Returns the factor mu(Fz) / mu0 for a per-tyre load Fz in N.
  double mu_factor(double fz_per_tyre_n) const {
    return std::max(floor_fraction, 1.0 - sensitivity_per_n_ * (fz_per_tyre_n - nominal_n_));
  }

  /// Peak longitudinal and lateral force of the whole car at total vertical load N (four tyres
  /// sharing N equally).
  double fx_max(double load_n) const { return mu_long0_ * mu_factor(0.25 * load_n) * load_n; }
  double fy_max(double load_n) const { return mu_lat0_ * mu_factor(0.25 * load_n) * load_n; }
  struct Limits {
    double fx_max, fy_max;
  };
  /// One axle's peak forces at its load (two tyres sharing it equally).
  Limits axle_limits(double axle_load_n) const {
    const double f = mu_factor(0.5 * axle_load_n) * axle_load_n;
    return {mu_long0_ * f, mu_lat0_ * f};
  }
  /// The least axle load (N, two tyres sharing it) at which the axle's lateral peak reaches
  /// |fy_n|: the smaller root of mu_lat0 L (1 - s (L/2 - Fn) / Fn) = |fy|, in the form
  /// L = 2 c / (b + sqrt(b^2 - 4 a c)) that holds without load sensitivity too (a = s / (2 Fn),
  /// b = 1 + s, c = |fy| / mu_lat0). Beyond the peak of that parabola only the floor of
  /// 0.1 mu0 holds the force: L = |fy| / (0.1 mu_lat0).
  double axle_load_for_lateral(double fy_n) const {
    const double c = std::abs(fy_n) / mu_lat0_;
    const double a = 0.5 * sensitivity_per_n_, b = 1.0 + sensitivity_per_n_ * nominal_n_;
    const double disc = b * b - 4.0 * a * c;
    if (disc < 0.0) return c / floor_fraction;
    return 2.0 * c / (b + std::sqrt(disc));
  }

  Limits limits(double load_n) const {
    const double f = mu_factor(0.25 * load_n) * load_n;
    return {mu_long0_ * f, mu_lat0_ * f};
  }

  /// Friction ellipse (Fx/Fx_max)^n + (Fy/Fy_max)^n <= 1: the share of Fx_max left when the
  /// tyres carry `lateral_ratio` = |Fy| / Fy_max. Zero when the ratio is 1 or more.
  double long_share_left(double lateral_ratio) const {
    if (lateral_ratio >= 1.0) return 0.0;
    if (quadratic_) return std::sqrt(1.0 - lateral_ratio * lateral_ratio);
    return std::pow(1.0 - std::pow(lateral_ratio, n_), 1.0 / n_);
  }

  /// Longitudinal force left by the ellipse at lateral force |fy| <= ... (0 beyond Fy_max).
  /// For n = 2, Fx_max sqrt(1 - (fy/Fy_max)^2) = (mu_long/mu_lat) sqrt(Fy_max^2 - fy^2): no
  /// division on the solver's critical path.
  double long_force_left(const Limits& lim, double fy) const {
    if (quadratic_) {
      const double d = lim.fy_max * lim.fy_max - fy * fy;
      return d > 0.0 ? long_per_lat_ * std::sqrt(d) : 0.0;
    }
    return lim.fx_max * long_share_left(std::abs(fy) / lim.fy_max);
  }

  /// Ellipse usage (Fx/Fx_max)^n + (Fy/Fy_max)^n for given force ratios (1 = at the limit).
  double usage(double long_ratio, double lateral_ratio) const {
    if (quadratic_) return long_ratio * long_ratio + lateral_ratio * lateral_ratio;
    return std::pow(long_ratio, n_) + std::pow(lateral_ratio, n_);
  }

  double exponent() const { return n_; }

  // The floor keeps a heavily loaded tyre's mu positive: lapwing's rule (README, "Physics and
  // assumptions", tyres), not a measured one.
  static constexpr double floor_fraction = 0.1;

 private:
  double mu_long0_, mu_lat0_, nominal_n_;
  double sensitivity_per_n_;  // load_sensitivity / nominal_load (no division per call)
  double n_;
  bool quadratic_;
  double long_per_lat_;
};

}  // namespace lapwing
