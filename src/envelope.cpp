#include "lapwing/envelope.hpp"

#include <boost/math/tools/roots.hpp>

#include <algorithm>
#include <cassert>
#include <cmath>

#include "lapwing/powertrain.hpp"
#include "lapwing/units.hpp"

namespace lapwing {

double interpolate(const std::vector<double>& xs, const std::vector<double>& ys, double x) {
  assert(!ys.empty() && (xs.empty() || xs.size() == ys.size()));
  if (xs.size() <= 1 || x <= xs.front()) return ys.front();
  if (x >= xs.back()) return ys.back();
  const auto it = std::upper_bound(xs.begin(), xs.end(), x);
  const std::size_t i = static_cast<std::size_t>(it - xs.begin());
  const double f = (x - xs[i - 1]) / (xs[i] - xs[i - 1]);
  return ys[i - 1] + f * (ys[i] - ys[i - 1]);
}

Envelope::Envelope(const Car& car, const Air& air, EnvelopeOptions options)
    : car_(car),
      tyres_(car.tyres),
      mass_(car.mass_kg),
      mass_eff_(car.mass_kg * (1.0 + car.inertia_factor)),
      weight_(car.mass_kg * units::g0),
      crr_(car.tyres.rolling_resistance),
      rho_(air.density_kg_m3) {
  assert(car.configs.size() == 1 && "Envelope takes a configured car");
  assert(options.speed_points >= 2);
  const Powertrain& p = car.powertrain;
  const AeroConfig& a = car.configs.front();
  const double r = car.tyres.rolling_radius_m;
  v_max_ = p.ideal ? options.ideal_speed_cap_mps : rev_limited_speed_mps(p, r);
  du_ = v_max_ * v_max_ / static_cast<double>(options.speed_points - 1);
  inv_du_ = 1.0 / du_;
  const std::size_t n = options.speed_points;
  rows_.resize(n);
  gear_.resize(n);
  for (std::size_t k = 0; k < n; ++k) {
    const double v = k + 1 == n ? v_max_ : std::sqrt(static_cast<double>(k) * du_);
    const Drive d = best_drive(p, r, v);
    rows_[k] = {d.force_n, 0.5 * rho_ * interpolate(a.speed_mps, a.cda_m2, v),
                0.5 * rho_ * interpolate(a.speed_mps, a.cla_m2, v),
                interpolate(a.speed_mps, a.balance, v)};
    gear_[k] = d.gear;
  }
  // Top speed on the level: the one speed where drive = resistance (REFERENCES: the cubic
  // eta P = (k v^2 + Crr m g) v for constant power); the rev limit when drive still exceeds it.
  auto excess = [&](double v) { return drive_n(v) - resistance_n(v, 1.0, 0.0); };
  rev_limited_ = excess(v_max_) >= 0.0;
  if (rev_limited_) {
    v_top_ = v_max_;
  } else if (excess(0.0) <= 0.0) {
    v_top_ = 0.0;  // cannot move: reported by the solver where it matters
  } else {
    std::uintmax_t iters = 200;
    auto [lo, hi] =
        boost::math::tools::toms748_solve(excess, 0.0, v_max_, excess(0.0), excess(v_max_),
                                          boost::math::tools::eps_tolerance<double>(48), iters);
    v_top_ = 0.5 * (lo + hi);
  }
}

std::size_t Envelope::index(double v) const {
  // The row at or below v: the gear in use up to the speed where the next one takes over.
  const double f = std::clamp(v * v * inv_du_, 0.0, static_cast<double>(rows_.size() - 1));
  return static_cast<std::size_t>(f);
}

}  // namespace lapwing
