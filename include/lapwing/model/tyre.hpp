// Tyre friction: peak coefficients that fall with load per tyre, and the friction ellipse that
// shares them between longitudinal and lateral force.
#pragma once

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>

#include "lapwing/base/ellipse_shape.hpp"
#include "lapwing/base/fixed_power.hpp"
#include "lapwing/base/violation.hpp"

namespace lapwing {

/// A tyre's peak friction, mu_lat and mu_long: up to 3, beyond any tyre on a dry road (common
/// practice).
inline constexpr Range friction_range{0.0, 3.0, true, false};

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
        long_per_lat_(t.mu_long / t.mu_lat),
        floor_onset_n_(sensitivity_per_n_ > 0.0
                           ? nominal_n_ + (1.0 - floor_fraction) / sensitivity_per_n_
                           : std::numeric_limits<double>::infinity()),
        pow_n_(t.ellipse_exponent),
        shape_(t.ellipse_exponent) {}

  /// Load sensitivity, linear in the per-tyre load (common practice; README, "Physics and
  /// assumptions", tyres): mu(Fz) = mu0 (1 - s (Fz - Fn) / Fn), never below 0.1 mu0.
  /// Returns the factor mu(Fz) / mu0 for a per-tyre load Fz in N.
  double mu_factor(double fz_per_tyre_n) const {
    return std::max(floor_fraction, 1.0 - sensitivity_per_n_ * (fz_per_tyre_n - nominal_n_));
  }

  /// The per-tyre load at which a tyre's peak force mu(Fz) Fz is highest: d/dFz of
  /// mu0 Fz (1 - s (Fz - Fn) / Fn) is 0 at Fz = Fn (1 + s) / (2 s), below the floor's load
  /// Fn (1 + 0.9 / s) for every s > 0. Beyond it more load gives less force (until the floor):
  /// the linear law holds as a tyre's behaviour only below it. Infinity without load
  /// sensitivity (s <= 0: the force grows with the load).
  double force_peak_load_n() const {
    const double s = sensitivity_per_n_ * nominal_n_;
    if (!(s > 0.0)) return std::numeric_limits<double>::infinity();
    return nominal_n_ * (1.0 + s) / (2.0 * s);
  }
  double load_sensitivity() const { return sensitivity_per_n_ * nominal_n_; }
  /// The per-tyre load from which mu(Fz) is held at its floor (0.1 mu0): 1 - s (Fz - Fn) / Fn
  /// = 0.1 at Fz = Fn + 0.9 Fn / s; infinity without load sensitivity. Below it a tyre's peak
  /// force mu(Fz) Fz is concave in its load (a parabola); the floor's straight line beyond it
  /// is not, so from there more load moved to the outer tyre can give an axle more capacity.
  double floor_onset_load_n() const { return floor_onset_n_; }

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
  /// One axle's peak forces when `transfer_n` (>= 0) of its load L has moved from the inner
  /// tyre to the outer: mu0 (mu(Fz_in) Fz_in + mu(Fz_out) Fz_out) / mu0 per direction, with
  /// Fz = L/2 -+ transfer (Milliken & Milliken, RCVD ch. 18: each tyre at its own load). With a
  /// linear load sensitivity s that is the equal-load capacity less 2 mu0 s transfer^2 / Fn
  /// (REFERENCES: the loss grows as the square of the transfer); without load sensitivity it is
  /// the equal-load capacity whatever the transfer. A transfer beyond L/2 lifts the inner tyre:
  /// the outer carries all of L.
  Limits axle_limits(double axle_load_n, double transfer_n) const {
    if (transfer_n <= 0.0) return axle_limits(axle_load_n);
    const double inner = std::max(0.0, 0.5 * axle_load_n - transfer_n);
    const double outer = axle_load_n - inner;
    const double f = mu_factor(inner) * inner + mu_factor(outer) * outer;
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
  /// The same with `transfer_n` moved from the inner tyre to the outer (axle_limits above):
  /// mu_lat0 (L (1 + s) - s (L^2 / 2 + 2 d^2) / Fn) = |fy| gives a = s / (2 Fn), b = 1 + s,
  /// c = |fy| / mu_lat0 + 2 s d^2 / Fn. Where that load is below 2 d the inner tyre has lifted
  /// and the outer alone holds fy: the least load of one tyre, mu_lat0 L (1 - s (L - Fn) / Fn)
  /// = |fy| (a = s / Fn). The two-tyre equation may have no root at all where the lifted case
  /// has one: with 2 d beyond the one tyre's vertex Fn (1 + s) / (2 s) (d over 5.4 kN for the
  /// Pellion's tyres), the outer tyre alone below 2 d can hold more than two do at any load
  /// above it. Then the lifted root decides where it lies below 2 d (the floor's load only
  /// where neither holds fy). Reading the floor's load there instead (it did) put the least load
  /// far too high: a rear-driven car's front bound then read a deceleration of several g at a
  /// point the front held (the tester's Pellion with cg 2.5 m: -2.79 g, the rear axle's load
  /// -10 kN, on Brannock Park).
  double axle_load_for_lateral(double fy_n, double transfer_n) const {
    if (transfer_n <= 0.0) return axle_load_for_lateral(fy_n);
    return parabola_load_for_lateral(fy_n, transfer_n)
        .value_or(std::abs(fy_n) / mu_lat0_ / floor_fraction);
  }

  /// The least load of the stretch of axle loads around `load_n` over which the axle's
  /// lateral peak (axle_limits(L, transfer_n), each tyre at its own load, mu never below its
  /// floor) holds |fy_n|: where the axle holds it at `load_n`, the lowest load down to which it
  /// goes on holding it; where it does not, the lowest load above `load_n` at which it does. A
  /// rear-driven car's front bound reads it (axle.cpp): the front keeps its lateral force while
  /// acceleration takes load off it down to there; where it does not hold the force at a = 0
  /// the bound is a deceleration (a stretch further below, which a larger acceleration could
  /// reach, is not taken: the bound is one upper limit). The capacity is not monotonic in the
  /// load once a tyre is past its force's vertex: its parabola falls there, and grows again
  /// where the inner tyre touches down (2 d) and along the floor (0.1 mu0 Fz from the floor's
  /// load), so the loads that hold a force can be more than one stretch, and the least of them
  /// all can lie below the stretch that the axle's load is in. The parabolas' least load (below)
  /// answers where no change of branch between it and `load_n` leaves a gap; else the capacity
  /// is read piece by piece (axle_load_holding_lateral_by_pieces). Reading the parabolas'
  /// answer, or their floor load |fy| / (0.1 mu0), there instead (with the outer tyre on its
  /// floor, the inner's parabola and the floor's line hold the force at a far lower load) made
  /// a front bound of -4.9 g at a point the front held with usage 0.83, and a lap that braked
  /// every 9 m on a 15 m arc (a monotonicity campaign's front-heavy car with load sensitivity
  /// 0.625: more grip, a slower lap).
  double axle_load_holding_lateral(double fy_n, double transfer_n, double load_n) const {
    const double d = std::max(transfer_n, 0.0);
    const double fy = std::abs(fy_n);
    const BranchChanges at = branch_changes(d);
    // The parabolas' least load r (parabola_load_for_lateral; with no transfer,
    // axle_load_for_lateral, whose floor load goes to the pieces) is the least load of all that
    // holds fy where the outer tyre is off its floor at r (below r both tyres are on their
    // parabolas, which r inverts). It is the stretch's where load_n lies below it (nothing lower
    // holds fy), or where the axle holds fy at load_n and at each change of branch between
    // (one to four readings of the capacity): each piece between is concave, and holds fy at
    // both its ends.
    const std::optional<double> r =
        d > 0.0 ? parabola_load_for_lateral(fy, d) : std::optional(axle_load_for_lateral(fy));
    if (r && *r <= at.outer_floor) {
      if (load_n <= *r) return *r;
      const auto holds = [&](double l) { return axle_limits(l, d).fy_max >= fy; };
      bool stretch = holds(load_n);
      for (const double kink : {at.lift, at.outer_floor, at.inner_floor})
        if (kink > *r && kink < load_n) stretch = stretch && holds(kink);
      if (stretch) return *r;
    }
    return axle_load_holding_lateral_by_pieces(fy, d, load_n);
  }

 private:
  /// Where a tyre's branch changes along the axle's load L with `d` moved to the outer tyre: the
  /// inner tyre lifts below 2 d, the outer one reaches its floor at L = onset (the inner lifted)
  /// or 2 (onset - d), the inner at 2 (onset + d) (onset per tyre: floor_onset_load_n, infinity
  /// without load sensitivity). Between them the capacity is one quadratic in L, concave.
  struct BranchChanges {
    double lift, outer_floor, inner_floor;
  };
  BranchChanges branch_changes(double d) const {
    const double onset = floor_onset_n_;
    return {2.0 * d, onset <= 2.0 * d ? onset : 2.0 * (onset - d), 2.0 * (onset + d)};
  }
  /// axle_load_holding_lateral piece by piece (tyre.cpp): fy >= 0, d >= 0.
  double axle_load_holding_lateral_by_pieces(double fy, double d, double load_n) const;
  /// axle_load_for_lateral's two-tyre and lifted roots of the parabolas (no floor): nullopt
  /// where neither holds |fy_n| (the floor's load then, for axle_load_for_lateral).
  std::optional<double> parabola_load_for_lateral(double fy_n, double transfer_n) const {
    const double s = sensitivity_per_n_;
    const double c0 = std::abs(fy_n) / mu_lat0_;
    const double b = 1.0 + s * nominal_n_;
    auto root = [&](double a, double c) {
      const double disc = b * b - 4.0 * a * c;
      return disc < 0.0 ? std::optional<double>() : 2.0 * c / (b + std::sqrt(disc));
    };
    const double c2 = c0 + 2.0 * s * transfer_n * transfer_n;
    if (b * b - 2.0 * s * c2 < 0.0) {  // no root with both tyres down
      const std::optional<double> lifted = root(s, c0);
      return lifted && *lifted <= 2.0 * transfer_n ? lifted : std::nullopt;
    }
    const std::optional<double> both = root(0.5 * s, c2);
    if (both && *both >= 2.0 * transfer_n) {
      // Both tyres down (from 2 d up) hold fy from `both`, their smaller root, and at 2 d (the
      // two forms agree there: the inner tyre just off) they do not. The outer tyre alone holds it
      // at a lower load where 2 d lies past its force's vertex Fn (1 + s) / (2 s) (4 s d > b per
      // newton) and its parabola reaches fy: its smaller root, below that vertex, so below 2 d and
      // `both`. The two-tyre root was read there (a robustness campaign's narrow-tracked car:
      // 19.6 kN for a front axle that held its 4.7 kN at 2.95 kN with the inner tyre lifted,
      // at the one speed of a corner where the two-tyre root appears; the rear-driven car's
      // front bound then said -24 g).
      if (4.0 * s * transfer_n > b && b * b - 4.0 * s * c0 >= 0.0) return root(s, c0);
      return both;
    }
    return root(s, c0);
  }

 public:
  Limits limits(double load_n) const {
    const double f = mu_factor(0.25 * load_n) * load_n;
    return {mu_long0_ * f, mu_lat0_ * f};
  }

  /// Friction ellipse (Fx/Fx_max)^n + (Fy/Fy_max)^n <= 1: the share of Fx_max left when the
  /// tyres carry `lateral_ratio` = |Fy| / Fy_max. Zero when the ratio is 1 or more.
  double long_share_left(double lateral_ratio) const {
    if (lateral_ratio >= 1.0) return 0.0;
    if (quadratic_) return std::sqrt(1.0 - lateral_ratio * lateral_ratio);
    return shape_(lateral_ratio).y;
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

  /// The longitudinal force an axle has left, long_force_left(axle_limits(L, transfer), fy),
  /// and its slope d/dL at the axle load L (N per N), for a Newton step on the axle model's
  /// load transfer. With the axle's capacity factor F(L) = mu(Fz_in) Fz_in + mu(Fz_out) Fz_out
  /// (axle_limits), Fx_max = mu_long0 F and left = Fx_max (1 - r^n)^(1/n), r = |fy| / Fy_max:
  ///   d left / dF = mu_long0 (1 - r^n)^(1/n - 1) = mu_long0 share / (1 - r^n),
  ///   dF / dL = sum over the tyres of (mu(Fz) + Fz dmu/dFz) dFz/dL,
  /// dmu/dFz = -mu0 s / Fn off the floor, 0 on it; dFz/dL = 1/2 per tyre while both carry load,
  /// 0 and 1 once the inner tyre has lifted. n = 2: left = (mu_long0 / mu_lat0)
  /// sqrt(Fy_max^2 - fy^2), slope (mu_long0 / mu_lat0) Fy_max mu_lat0 dF/dL / sqrt(...). Zero
  /// (and slope 0) for an unloaded axle or where fy uses the whole ellipse.
  /// The slope comes as a quotient, slope_num / slope_den (slope_den > 0), so that a Newton step
  /// on it can take one division where the slope and then the step took one each (the step
  /// waits on them: the axle model's iteration is a chain of dependent arithmetic).
  struct LeftAndSlope {
    double left_n, slope_num, slope_den;
    double per_load() const { return slope_num / slope_den; }
  };
  LeftAndSlope axle_long_left(double axle_load_n, double transfer_n, double fy_n) const {
    if (!(axle_load_n > 0.0)) return {0.0, 0.0, 1.0};
    // mu(Fz) Fz and its slope for one tyre.
    auto tyre = [this](double fz, double& slope) {
      const double m = 1.0 - sensitivity_per_n_ * (fz - nominal_n_);
      if (m > floor_fraction) {
        slope = m - sensitivity_per_n_ * fz;
        return m * fz;
      }
      slope = floor_fraction;
      return floor_fraction * fz;
    };
    double f, df;
    if (transfer_n <= 0.0) {
      tyre(0.5 * axle_load_n, df);
      f = mu_factor(0.5 * axle_load_n) * axle_load_n;  // as axle_limits(L) forms it
    } else {
      const double inner = std::max(0.0, 0.5 * axle_load_n - transfer_n);
      const double outer = axle_load_n - inner;
      double si, so;
      f = tyre(inner, si) + tyre(outer, so);
      df = inner > 0.0 ? 0.5 * (si + so) : so;
    }
    const double fy_max = mu_lat0_ * f;
    if (quadratic_) {
      const double d = fy_max * fy_max - fy_n * fy_n;
      if (!(d > 0.0)) return {0.0, 0.0, 1.0};
      const double root = std::sqrt(d);
      return {long_per_lat_ * root, long_per_lat_ * fy_max * mu_lat0_ * df, root};
    }
    const double r = std::abs(fy_n) / fy_max;
    if (r >= 1.0) return {0.0, 0.0, 1.0};
    const EllipseShape::Point shape = shape_(r);  // share (1 - r^n)^(1/n), rest 1 - r^n
    return {mu_long0_ * f * shape.y, mu_long0_ * shape.y * df, shape.rest};
  }

  /// Whether an axle at load L, `transfer_n` moved to its outer tyre and carrying lateral force
  /// fy, surely has `fx_n` of longitudinal force left: axle_long_left(L, transfer, fy).left_n
  /// >= fx_n, told without a power where the answer is clear by a margin (false: not sure, the
  /// caller evaluates axle_long_left). With x = fx / Fx_max and y = |fy| / Fy_max in [0, 1],
  /// the ellipse holds x^n + y^n <= 1, and x^n + y^n <= x^2 + y^2 for n >= 2, <= x + y for
  /// n >= 1; either sum at most 1 - 1e-6 puts the force left above fx by some 1e-7 Fx_max at
  /// least, far beyond the rounding of either side (1e-15 of Fx_max).
  bool surely_leaves(double axle_load_n, double transfer_n, double fy_n, double fx_n) const {
    if (!(axle_load_n > 0.0)) return false;
    const Limits lim = axle_limits(axle_load_n, transfer_n);
    const double x = std::max(fx_n, 0.0) / lim.fx_max, y = std::abs(fy_n) / lim.fy_max;
    constexpr double margin = 1e-6;
    return n_ >= 2.0 ? x * x + y * y <= 1.0 - margin : x + y <= 1.0 - margin;
  }

  /// Ellipse usage (Fx/Fx_max)^n + (Fy/Fy_max)^n for given force ratios (1 = at the limit).
  double usage(double long_ratio, double lateral_ratio) const {
    if (quadratic_) return long_ratio * long_ratio + lateral_ratio * lateral_ratio;
    return pow_n_(long_ratio) + pow_n_(lateral_ratio);
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
  double floor_onset_n_;  // floor_onset_load_n()
  /// The ellipse's power x^n, x >= 0 (0 at x = 0), from tables made once
  /// (base/fixed_power.hpp): within 3 ulp of 50-digit arithmetic where the library's
  /// 2^(n log2 x) reached 21 ulp for ratios in [0, 1) at n = 2.2 and 95 at n = 10, in about
  /// half its time; and its shape (1 - x^n)^(1/n) with 1 - x^n (base/ellipse_shape.hpp).
  FixedPower pow_n_;
  EllipseShape shape_;
};

}  // namespace lapwing
