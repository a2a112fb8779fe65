#include "lapwing/model/powertrain.hpp"

#include <algorithm>
#include <cassert>
#include <string>

#include "lapwing/base/interpolate.hpp"

namespace lapwing {

std::optional<Violation> Powertrain::validate() const {
  FirstViolation f;
  if (ideal) {
    f.range("constant_power", constant_power_w, positive(), Quantity::power);
  } else {
    const std::string rpm = "torque_curve.rpm", torque = "torque_curve.torque";
    const std::size_t n = engine_radps.size();
    f.each(rpm, engine_radps, positive(), Quantity::engine_speed)
        .each(torque, torque_nm, non_negative(), Quantity::torque)
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
        .each("gears", gears, positive(), Quantity::number)
        .rule(!gears.empty(), "gears", "at least one gear is needed")
        .order("gears", gears, false)
        .range("final_drive", final_drive, positive(), Quantity::number)
        .range("shift_time", shift_time_s, Range{0.0, 2.0}, Quantity::time);
  }
  return f.range("efficiency", efficiency, Range{0.0, 1.0, true, false}, Quantity::fraction)
      .result();
}

double engine_torque_nm(const Powertrain& p, double w) {
  assert(!p.ideal);
  const auto& x = p.engine_radps;
  const auto& y = p.torque_nm;
  if (w > p.rev_limit_radps) return 0.0;
  // Below the curve's first speed the engine is held there (clutch slip): its first torque.
  return interpolate(x, y, w);
}

Drive best_drive(const Powertrain& p, double r, double v) {
  if (p.ideal) {
    constexpr double standstill_floor_mps = 1e-3;
    return {p.efficiency * p.constant_power_w / std::max(v, standstill_floor_mps), 0, 0.0};
  }
  Drive best{0.0, static_cast<int>(p.gears.size()), p.rev_limit_radps};
  for (std::size_t g = 0; g < p.gears.size(); ++g) {
    const double ratio = p.gears[g] * p.final_drive;
    const double w = v / r * ratio;
    // The rev limit itself is usable (round-off at the top of the table must not lose a gear).
    if (w > p.rev_limit_radps * (1.0 + 1e-12)) continue;
    const double f = engine_torque_nm(p, std::min(w, p.rev_limit_radps)) * ratio * p.efficiency / r;
    if (f > best.force_n) best = {f, static_cast<int>(g + 1), std::max(w, p.engine_radps.front())};
  }
  return best;
}

double rev_limited_speed_mps(const Powertrain& p, double r) {
  if (p.ideal) return 0.0;
  return p.rev_limit_radps * r / (p.gears.back() * p.final_drive);
}

}  // namespace lapwing
