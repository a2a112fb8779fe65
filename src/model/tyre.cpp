#include "lapwing/model/tyre.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <optional>

namespace lapwing {

std::optional<Violation> Tyres::validate() const {
  return FirstViolation()
      .range("mu_long", mu_long, friction_range, Quantity::number)
      .range("mu_lat", mu_lat, friction_range, Quantity::number)
      // At least 1 N: a kart's tyre is nominally loaded some 400 N; below 1 N is no car's (a
      // unit slip), and a subnormal load made the load sensitivity per newton infinite (a
      // robustness campaign's finding: an internal error from the lateral table's search).
      .range("nominal_load", nominal_load_n, Range{1.0, 1e308}, Quantity::force)
      .range("load_sensitivity", load_sensitivity, Range{0.0, 1.0, false, true}, Quantity::number)
      .range("ellipse_exponent", ellipse_exponent, Range{1.0, 10.0}, Quantity::number)
      // A kart's wheel is some 0.13 m in radius: below 0.05 m is no car's (or a unit slip).
      .range("rolling_radius", rolling_radius_m, Range{0.05, 2.0}, Quantity::length)
      .range("rolling_resistance", rolling_resistance, Range{0.0, 0.1}, Quantity::number)
      .result();
}

namespace {
// One tyre's share of an axle's lateral capacity per unit mu0 over a piece of axle loads where
// the tyre's load is alpha L + beta and it stays on one branch of its law: the parabola
// z (1 + s) - (s / Fn) z^2 (per newton: b1 z - k z^2) or the floor's line 0.1 z. Added into the
// piece's quadratic A L^2 + B L + C.
struct Quadratic {
  double a = 0.0, b = 0.0, c = 0.0;
};
void add_tyre(Quadratic& q, double alpha, double beta, bool on_floor, double b1, double k) {
  if (on_floor) {
    q.b += TyreModel::floor_fraction * alpha;
    q.c += TyreModel::floor_fraction * beta;
  } else {
    q.a -= k * alpha * alpha;
    q.b += b1 * alpha - 2.0 * k * alpha * beta;
    q.c += b1 * beta - k * beta * beta;
  }
}
}  // namespace

double TyreModel::axle_load_holding_lateral_by_pieces(double fy, double d, double load_n) const {
  const double onset = floor_onset_load_n();
  const BranchChanges at = branch_changes(d);
  // Piece by piece: each piece's loads that hold fy (where its concave quadratic is >= 0), the
  // stretches joined where they meet at a piece's end.
  const double c0 = fy / mu_lat0_;
  const double k = sensitivity_per_n_, b1 = 1.0 + sensitivity_per_n_ * nominal_n_;
  std::array<double, 5> ends{0.0, at.lift, at.outer_floor, at.inner_floor,
                             std::numeric_limits<double>::infinity()};
  std::sort(ends.begin(), ends.end());
  struct Stretch {
    double from, to;
  };
  std::array<Stretch, 4> stretches{};
  std::size_t count = 0;
  for (std::size_t p = 0; p + 1 < ends.size(); ++p) {
    const double lo = ends[p], hi = ends[p + 1];
    if (!(hi > lo)) continue;
    const double mid = std::isfinite(hi) ? 0.5 * (lo + hi) : 2.0 * lo + 1.0;
    Quadratic q;
    q.c = -c0;
    if (mid > 2.0 * d) {
      add_tyre(q, 0.5, -d, 0.5 * mid - d > onset, b1, k);
      add_tyre(q, 0.5, d, 0.5 * mid + d > onset, b1, k);
    } else {
      add_tyre(q, 1.0, 0.0, mid > onset, b1, k);
    }
    // The piece's loads with A L^2 + B L + C >= 0 (A <= 0: an interval).
    double from = lo, to = hi;
    if (q.a == 0.0) {
      if (q.b > 0.0)
        from = std::max(lo, -q.c / q.b);
      else if (!(q.c >= 0.0))
        continue;
    } else {
      const double disc = q.b * q.b - 4.0 * q.a * q.c;
      if (!(disc >= 0.0)) continue;
      // The roots as q / A and C / q, q = -(B + sign(B) sqrt(disc)) / 2 (no cancellation).
      const double h = -0.5 * (q.b + std::copysign(std::sqrt(disc), q.b));
      const double r1 = h / q.a, r2 = h != 0.0 ? q.c / h : r1;
      from = std::max(lo, std::min(r1, r2));
      to = std::min(hi, std::max(r1, r2));
    }
    if (!(from <= to)) continue;
    if (count > 0 && stretches[count - 1].to >= from)
      stretches[count - 1].to = std::max(stretches[count - 1].to, to);
    else
      stretches[count++] = {from, to};
  }
  // The stretch that holds load_n, else the first above it. The floor's line (or, without load
  // sensitivity, the load itself) grows without bound: the last stretch never ends.
  for (std::size_t i = 0; i < count; ++i)
    if (load_n <= stretches[i].to) return stretches[i].from;
  return std::numeric_limits<double>::infinity();
}

}  // namespace lapwing
