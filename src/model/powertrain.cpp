#include "lapwing/model/powertrain.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <string>

#include "lapwing/base/interpolate.hpp"
#include "lapwing/model/air.hpp"

namespace lapwing {

std::optional<Violation> Powertrain::validate() const {
  FirstViolation f;
  if (ideal) {
    f.range("constant_power", constant_power_w, power_range, Quantity::power);
  } else {
    const std::string rpm = "torque_curve.rpm", torque = "torque_curve.torque";
    const std::size_t n = engine_radps.size();
    f.each(rpm, engine_radps, positive(), Quantity::engine_speed)
        .each(torque, torque_nm, torque_range, Quantity::torque)
        .rule(n >= 2, rpm, "a curve needs at least 2 points")
        .rule(torque_nm.size() == n, torque,
              [&] {
                return "size differs from rpm: expected " + std::to_string(n) + ", got " +
                       std::to_string(torque_nm.size());
              })
        .order(rpm, engine_radps, true)
        .range("rev_limit", rev_limit_radps, positive(), Quantity::engine_speed)
        // Up to the curve's last point, which a rev limit read in rpm may exceed by rounding.
        .rule(n < 2 || (rev_limit_radps > engine_radps.front() &&
                        rev_limit_radps <= engine_radps.back() * (1 + 1e-12)),
              "rev_limit", "rev_limit must lie above the curve's first rpm and not beyond its last")
        .each("gears", gears, ratio_range, Quantity::number)
        .rule(!gears.empty(), "gears", "at least one gear is needed")
        .order("gears", gears, false)
        .range("final_drive", final_drive, ratio_range, Quantity::number)
        .range("shift_time", shift_time_s, Range{0.0, 2.0}, Quantity::time);
  }
  f.range("efficiency", efficiency, Range{0.0, 1.0, true, false}, Quantity::fraction)
      .rule(aspiration != Aspiration::turbo || full_power_altitude_m.has_value(), "aspiration",
            "a turbo engine needs full_power_altitude (the altitude up to which it gives its "
            "rated power)");
  if (full_power_altitude_m)
    f.rule(aspiration == Aspiration::turbo, "full_power_altitude",
           "full_power_altitude applies to aspiration: turbo only")
        .range("full_power_altitude", *full_power_altitude_m, full_power_altitude_range,
               Quantity::length);
  return f.result();
}

namespace {
// The SAE J1349 (June 1990) law once, in ratios to the reference air:
//   CF = 1.18 (p_ref / p_dry) sqrt(T / T_ref) - 0.18.
double j1349_law(double pressure_ratio, double temperature_ratio) {
  return 1.18 * pressure_ratio * std::sqrt(temperature_ratio) - 0.18;
}
}  // namespace

double j1349_correction_factor(double dry_pressure_pa, double temperature_k) {
  return j1349_law(j1349_dry_pressure_pa / dry_pressure_pa, temperature_k / j1349_temperature_k);
}

double engine_power_ratio(const Powertrain& p, double pressure_pa, double temperature_k,
                          double relative_humidity) {
  const double dry = pressure_pa - relative_humidity * saturation_vapour_pressure_pa(temperature_k);
  switch (p.aspiration) {
    case Aspiration::fixed:
      return 1.0;
    case Aspiration::natural:
      return 1.0 / j1349_correction_factor(dry, temperature_k);
    case Aspiration::turbo: {
      const double full = standard_atmosphere(*p.full_power_altitude_m).pressure_pa;
      if (dry >= full) return 1.0;
      return 1.0 / j1349_law(full / dry, 1.0);  // 1 / (1.18 p_fp / p_dry - 0.18)
    }
  }
  return 1.0;
}

double engine_torque_nm(const Powertrain& p, double w) {
  assert(!p.ideal);
  const auto& x = p.engine_radps;
  const auto& y = p.torque_nm;
  if (w > p.rev_limit_radps) return 0.0;
  // Below the curve's first speed the engine is held there (clutch slip): its first torque.
  return interpolate(x, y, w);
}

namespace {
// The drive in the best usable gear at road speed v (a gearbox), the engine's torque in gear g
// at engine speed w (capped at the rev limit) read by torque(g, w): best_drive's and
// DriveWalk's one loop.
template <typename Torque>
Drive best_gear(const Powertrain& p, double r, double v, Torque torque) {
  Drive best{0.0, static_cast<int>(p.gears.size()), p.rev_limit_radps};
  for (std::size_t g = 0; g < p.gears.size(); ++g) {
    const double ratio = p.gears[g] * p.final_drive;
    const double w = v / r * ratio;
    // The rev limit itself is usable (round-off at the top of the table must not lose a gear).
    if (w > p.rev_limit_radps * (1.0 + 1e-12)) continue;
    const double f = torque(g, std::min(w, p.rev_limit_radps)) * ratio * p.efficiency / r;
    if (f > best.force_n) best = {f, static_cast<int>(g + 1), std::max(w, p.engine_radps.front())};
  }
  return best;
}
}  // namespace

Drive best_drive(const Powertrain& p, double r, double v) {
  if (p.ideal) {
    constexpr double standstill_floor_mps = 1e-3;
    return {p.efficiency * p.constant_power_w / std::max(v, standstill_floor_mps), 0, 0.0};
  }
  return best_gear(p, r, v, [&p](std::size_t, double w) { return engine_torque_nm(p, w); });
}

DriveWalk::DriveWalk(const Powertrain& p, double r) : p_(p), r_(r) {
  if (!p.ideal) walks_ = std::vector<AxisWalk>(p.gears.size(), AxisWalk(p.engine_radps));
}

Drive DriveWalk::at(double v) {
  assert(v >= last_v_);
  last_v_ = v;
  if (p_.ideal) return best_drive(p_, r_, v);
  // engine_torque_nm's interpolate (held at the curve's ends, exactly its end values there),
  // its interval walked on per gear: engine speeds rise with v.
  const std::vector<double>& x = p_.engine_radps;
  const std::vector<double>& y = p_.torque_nm;
  return best_gear(p_, r_, v, [&](std::size_t g, double w) {
    if (w <= x.front()) return y.front();
    if (w >= x.back()) return y.back();
    return lapwing::at(y, walks_[g].at(w));
  });
}

double rev_limited_speed_mps(const Powertrain& p, double r) {
  if (p.ideal) return 0.0;
  return p.rev_limit_radps * r / (p.gears.back() * p.final_drive);
}

double rated_power_w(const Powertrain& p) {
  if (p.ideal) return p.constant_power_w;
  double peak = 0.0;
  for (std::size_t i = 0; i < p.torque_nm.size(); ++i)
    peak = std::max(peak, p.torque_nm[i] * p.engine_radps[i]);
  return peak;
}

}  // namespace lapwing
