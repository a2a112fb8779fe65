#include "lapwing/solve/envelope.hpp"

#include <boost/math/tools/roots.hpp>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <functional>
#include <limits>
#include <memory>
#include <stdexcept>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/once_per_key.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/solve/level_tables.hpp"

namespace lapwing {

std::optional<Violation> EnvelopeOptions::validate() const {
  return FirstViolation()
      .range("speed_points", static_cast<double>(speed_points), Range{2.0, 1e7}, false)
      .range("table_margin", table_margin, Range{1.0, 1e308, true, false}, false)
      .range("speed_ceiling_mps", speed_ceiling_mps, positive(), true)
      .result();
}

const char* top_speed_limit_name(TopSpeedLimit l) {
  switch (l) {
    case TopSpeedLimit::drag:
      return "drag";
    case TopSpeedLimit::rev_limit:
      return "rev limit";
    case TopSpeedLimit::ceiling:
      return "table ceiling";
    case TopSpeedLimit::traction:
      return "traction";
    case TopSpeedLimit::front_lift:
      return "front lift";
    case TopSpeedLimit::rear_lift:
      return "rear lift";
  }
  return "drag";
}

namespace {

// A ride-height map's operating point at speed v from the guess (hf, hr), which it updates
// (continuation from the last speed); a map that does not converge is the car file's error.
AeroPoint map_point(const Car& car, const AeroConfig& a, double v, double rho, double& hf,
                    double& hr) {
  AeroPoint pt;
  try {
    pt = solve_ride_heights(*a.map, v, rho, car.drag_height_m, car.wheelbase_m, hf, hr);
  } catch (const std::runtime_error& e) {
    // The car's error, at the config (its key path; a loader adds the position).
    const std::string config = "aero.configs." + a.name;
    throw InvalidInput(car.subject(),
                       broken_rule(config + ".ride_height_map",
                                   std::string(e.what()) + " at " + std::to_string(v / units::kph) +
                                       " km/h (config " + a.name + ")",
                                   config));
  }
  hf = pt.front_ride_m;
  hr = pt.rear_ride_m;
  return pt;
}

AeroPoint table_point(const AeroConfig& a, double v) {
  return {interpolate(a.speed_mps, a.cda_m2, v), interpolate(a.speed_mps, a.cla_m2, v),
          interpolate(a.speed_mps, a.balance, v), 0.0, 0.0};
}

// The first speed on a grid of `step` at which a gearless car's drive falls below its
// resistance on the level, with and without the straight-line trim (the higher of the two top
// speeds), read straight from the config's data; 0 when there is none up to `ceiling`.
double level_top_speed_bound(const ConfiguredCar& configured, double rho, double power_ratio,
                             double step, double ceiling) {
  const Car& car = configured.car();
  const AeroConfig& a = configured.aero();
  const double weight = car.mass_kg * units::g0, crr = car.tyres.rolling_resistance;
  double hf = a.map ? a.map->static_front_m : 0.0, hr = a.map ? a.map->static_rear_m : 0.0;
  // Resistance on the level: 0.5 rho CdA v^2 + Crr (m g + 0.5 rho ClA v^2).
  auto resistance = [&](double cda, double cla, double v) {
    const double q = 0.5 * rho * v * v;
    return resistance_n(cda * q, crr, normal_load_n(weight, 1.0, cla * q), weight, 0.0);
  };
  const std::size_t steps = static_cast<std::size_t>(std::ceil(ceiling / step));
  for (std::size_t k = 1; k <= steps; ++k) {
    const double v = std::min(ceiling, static_cast<double>(k) * step);
    const AeroPoint c = a.map ? map_point(car, a, v, rho, hf, hr) : table_point(a, v);
    double r = resistance(c.cda_m2, c.cla_m2, v);
    if (a.trim)
      r = std::min(r, resistance(c.cda_m2 + a.trim->dcda_m2, c.cla_m2 + a.trim->dcla_m2, v));
    if (power_ratio * best_drive(car.powertrain, car.tyres.rolling_radius_m, v).force_n < r)
      return v;
  }
  return 0.0;
}

// The drive force at the wheels (before the air's power ratio) and the gear at each of an
// Envelope's rows: u = k du for k < n - 1, the last row at v_max. They depend on the
// powertrain, the rolling radius and the rows' speeds alone, and take a fifth of an Envelope's
// set-up (8 001 rows x the gears, DriveWalk); a sweep's cars mostly share them (an aero, mass or
// set-up sweep), so the rows are kept for the last few powertrains asked (recent_per_key) and
// copied from there, the same bits as built afresh.
// The speed of an Envelope's row k of n: u = k du, the last row at v_max exactly.
double row_speed(std::size_t k, std::size_t n, double v_max, double du) {
  return k + 1 == n ? v_max : std::sqrt(static_cast<double>(k) * du);
}

struct DriveRows {
  std::vector<double> force_n;
  std::vector<int> gear;
};
struct DriveRowsKey {
  bool ideal;
  double constant_power_w;
  std::vector<double> engine_radps, torque_nm, gears;
  double rev_limit_radps, final_drive, efficiency;
  double rolling_radius_m, v_max, du;
  std::size_t n;
  bool operator==(const DriveRowsKey&) const = default;
};
std::shared_ptr<const DriveRows> drive_rows(const Powertrain& p, double r, double v_max, double du,
                                            std::size_t n) {
  // Rows kept for this many powertrains: a sweep over cars of several (a gear-ratio sweep) builds
  // its own each car, as before; some 100 kB each.
  constexpr std::size_t kept = 8;
  DriveRowsKey key{p.ideal,
                   p.constant_power_w,
                   p.engine_radps,
                   p.torque_nm,
                   p.gears,
                   p.rev_limit_radps,
                   p.final_drive,
                   p.efficiency,
                   r,
                   v_max,
                   du,
                   n};
  return recent_per_key<DriveRows, kept>(key, [&] {
    auto rows = std::make_shared<DriveRows>();
    rows->force_n.resize(n);
    rows->gear.resize(n);
    DriveWalk drive_at(p, r);
    for (std::size_t k = 0; k < n; ++k) {
      const Drive d = drive_at.at(row_speed(k, n, v_max, du));
      rows->force_n[k] = d.force_n;
      rows->gear[k] = d.gear;
    }
    return std::shared_ptr<const DriveRows>(std::move(rows));
  });
}

}  // namespace

Envelope::Envelope(const ConfiguredCar& car, const Air& air, EnvelopeOptions options)
    : Envelope((require_valid(car.car().validate(), car.car().subject()), Unchecked{}), car, air,
               options) {}

Envelope::Envelope(Unchecked, const ConfiguredCar& configured, const Air& air,
                   EnvelopeOptions options)
    : Envelope(Unchecked{}, configured, configured.car(), air, options) {}

Envelope::Envelope(Unchecked, const ConfiguredCar& configured, const Car& car, const Air& air,
                   EnvelopeOptions options)
    : car_(configured),
      tyres_(car.tyres),
      mass_(car.mass_kg),
      mass_eff_(car.mass_kg * (1.0 + car.inertia_factor)),
      weight_(car.mass_kg * units::g0),
      crr_(car.tyres.rolling_resistance),
      rho_(air.density_kg_m3),
      table_margin_(options.table_margin) {
  power_ratio_ =
      engine_power_ratio(car.powertrain, air.pressure_pa, air.temperature_k, air.relative_humidity);
  transfer_ = lateral_transfer_per_n(car);
  require_valid(FirstViolation()
                    .range("density_kg_m3", air.density_kg_m3, positive(), Quantity::number)
                    .result(),
                "air");
  require_valid(options.validate(), "envelope options");
  const Powertrain& p = car.powertrain;
  const AeroConfig& a = configured.aero();
  const double r = car.tyres.rolling_radius_m;
  // The tables' top, from the car. A geared car: its rev limit in top gear, beyond which the
  // engine gives nothing and the speed is held (the model's cap). A gearless car: its
  // level-road top speed times the margin (found on a 0.5 m/s grid from the config's own data,
  // so that the tables' rows do not depend on where the search looked). Never above the ceiling.
  const double ceiling = options.speed_ceiling_mps;
  if (!p.ideal) {
    const double v_rev = rev_limited_speed_mps(p, r);
    v_max_ = std::min(v_rev, ceiling);
    table_top_ = v_rev <= ceiling ? TopSpeedLimit::rev_limit : TopSpeedLimit::ceiling;
  } else {
    constexpr double search_step_mps = 0.5;
    const double bound =
        level_top_speed_bound(configured, rho_, power_ratio_, search_step_mps, ceiling);
    const bool finite = bound > 0.0 && options.table_margin * bound < ceiling;
    v_max_ = finite ? options.table_margin * bound : ceiling;
    table_top_ = finite ? TopSpeedLimit::drag : TopSpeedLimit::ceiling;
  }
  du_ = v_max_ * v_max_ / static_cast<double>(options.speed_points - 1);
  inv_du_ = 1.0 / du_;
  const std::size_t n = options.speed_points;
  // Aero coefficients over speed: from the config's rows, or from ride heights solved at each
  // speed of a grid (with continuation from the last) for a ride-height map.
  std::function<AeroPoint(double)> aero_at;
  if (a.map) {
    constexpr double map_step_mps = 0.5;
    const std::size_t steps = static_cast<std::size_t>(std::ceil(v_max_ / map_step_mps));
    map_dv_ = v_max_ / static_cast<double>(steps);
    double hf = a.map->static_front_m, hr = a.map->static_rear_m;
    // Where a flag changes between two solved speeds, the speed it changes at, by bisection
    // from the lower one's heights (a note's "from 163.7 km/h" read the grid's next speed, up
    // to 1.8 km/h late, and a car whose static height is above the map read "from 0.0 km/h"
    // where it was off the map only below 246 km/h: a helper's finding).
    // (at_v0: the flag at v0, as solved there; the bisection starts from v0's heights.)
    const auto edge = [&](double v0, double v1, double hf0, double hr0, bool AeroPoint::*flag,
                          bool at_v0) {
      for (int it = 0; it < 60 && v1 - v0 > 1e-6; ++it) {
        const double mid = 0.5 * (v0 + v1);
        double front = hf0, rear = hr0;
        ((map_point(car, a, mid, rho_, front, rear).*flag) == at_v0 ? v0 : v1) = mid;
      }
      return v1;
    };
    const auto note = [&](std::vector<SpeedSpan>& spans, bool was, bool is, double v0, double v1,
                          double hf0, double hr0, bool AeroPoint::*flag) {
      if (was == is) return;
      const double at = edge(v0, v1, hf0, hr0, flag, was);
      if (is)
        spans.push_back({at, std::numeric_limits<double>::infinity()});
      else
        spans.back().hi_mps = at;
    };
    for (std::size_t k = 0; k <= steps; ++k) {
      const double v = static_cast<double>(k) * map_dv_;
      const double hf0 = hf, hr0 = hr;
      const AeroPoint pt = map_point(car, a, v, rho_, hf, hr);
      if (k == 0) {
        if (pt.off_map) off_map_spans_.push_back({0.0, std::numeric_limits<double>::infinity()});
        if (pt.grounded) grounded_spans_.push_back({0.0, std::numeric_limits<double>::infinity()});
      } else {
        const AeroPoint& last = map_points_.back();
        const double v0 = v - map_dv_;
        note(off_map_spans_, last.off_map, pt.off_map, v0, v, hf0, hr0, &AeroPoint::off_map);
        note(grounded_spans_, last.grounded, pt.grounded, v0, v, hf0, hr0, &AeroPoint::grounded);
      }
      map_points_.push_back(pt);
    }
    aero_at = [this](double v) { return aero_point(v); };
  } else {
    aero_at = [&a](double v) { return table_point(a, v); };
  }
  rows_.resize(n);
  gear_.resize(n);
  if (a.trim) {
    trim_rows_.resize(n);
    trim_below_curvature_ = a.trim->below_curvature_1pm;
  }
  const std::shared_ptr<const DriveRows> drive = drive_rows(p, r, v_max_, du_, n);
  // A config of one row (constant coefficients, a parts table) has them at every speed: read
  // once, not through aero_at at each of the rows.
  const bool one_row = a.one_row();
  const AeroPoint fixed = one_row ? table_point(a, 0.0) : AeroPoint{};
  // The net drive's floor (net_drive_floor), followed as the rows are made.
  net_floor_.resize(n);
  if (a.trim) trim_net_floor_.resize(n);
  double least = std::numeric_limits<double>::infinity(), trim_least = least;
  for (std::size_t k = 0; k < n; ++k) {
    const double v = row_speed(k, n, v_max_, du_);
    // The engine in this air (SAE J1349 for natural and turbo).
    const double drive_n = drive->force_n[k] * power_ratio_;
    const AeroPoint c = one_row ? fixed : aero_at(v);
    rows_[k] = {drive_n, 0.5 * rho_ * c.cda_m2, 0.5 * rho_ * c.cla_m2, c.balance};
    net_floor_[k] = least = std::min(least, net_drive(false, k));
    gear_[k] = drive->gear[k];
    if (a.trim) {
      const StraightTrim& t = *a.trim;
      const double cda = c.cda_m2 + t.dcda_m2, cla = c.cla_m2 + t.dcla_m2,
                   bal = c.balance + t.dbalance;
      if (cda < 0.0 || cla < 0.0 || bal < 0.0 || bal > 1.0)
        throw InvalidInput(car.subject(),
                           broken_rule("aero.configs." + a.name + ".straight_trim",
                                       "straight_trim takes CdA, ClA or balance out of range at " +
                                           std::to_string(v / units::kph) + " km/h (CdA " +
                                           std::to_string(cda) + ", ClA " + std::to_string(cla) +
                                           ", balance " + std::to_string(bal) + ")",
                                       "aero.configs." + a.name));
      trim_rows_[k] = {drive_n, 0.5 * rho_ * cda, 0.5 * rho_ * cla, bal};
      trim_net_floor_[k] = trim_least = std::min(trim_least, net_drive(true, k));
    }
  }
  // Top speed on the level: the one speed where drive = resistance (REFERENCES: the cubic
  // eta P = (k v^2 + Crr m g) v for constant power); the tables' top (the rev limit or the
  // ceiling) when drive still exceeds it there.
  const bool trimmed = has_trim();
  auto excess = [&](double v) { return drive_n(v) - resistance_n(v, 1.0, 0.0, trimmed); };
  if (excess(v_max_) >= 0.0) {
    v_top_ = v_max_;
    top_limit_ =
        table_top_ == TopSpeedLimit::rev_limit ? TopSpeedLimit::rev_limit : TopSpeedLimit::ceiling;
  } else if (excess(0.0) <= 0.0) {
    v_top_ = 0.0;  // cannot move: reported by the solver where it matters
  } else {
    std::uintmax_t iters = 200;
    auto [lo, hi] =
        boost::math::tools::toms748_solve(excess, 0.0, v_max_, excess(0.0), excess(v_max_),
                                          boost::math::tools::eps_tolerance<double>(48), iters);
    v_top_ = 0.5 * (lo + hi);
  }
  // The one a car reaches from rest where a dip in the drive gives the level road two
  // (engine_from_rest: the search above can take the upper one, or the tables' top).
  if (v_top_ > 0.0) {
    const double found = v_top_;
    v_top_ = engine_from_rest(
        *this, trimmed, Road{}, [&](double v) { return -excess(v); }, found, 48);
    if (v_top_ != found) top_limit_ = TopSpeedLimit::drag;
  }
  // The least resistance on a level road in still air: crr W + u (drag_coef + crr lift_coef),
  // the coefficients linear in u between rows, so at least crr W wherever the sum is at least 0
  // at every row.
  double least_coef = std::numeric_limits<double>::infinity();
  for (const Sample& row : rows_)
    least_coef = std::min(least_coef, row.drag_coef + crr_ * row.lift_coef);
  level_resistance_floor_mps2_ = least_coef >= 0.0 ? crr_ * weight_ / mass_ : 0.0;
  if (options.level_tables && car.model == VehicleModel::axle)
    level_ = std::make_shared<const LevelTables>(build_level_tables(*this));
}

AeroPoint Envelope::aero_point(double v) const {
  if (map_points_.empty()) return table_point(car_.aero(), v);
  const Bracket b = even_bracket(v / map_dv_, map_points_.size() - 1);
  const AeroPoint& p = map_points_[b.i];
  const AeroPoint& q = map_points_[b.i + 1];
  auto mix = [w = b.w](double x, double y) { return lerp(x, y, w); };
  return {mix(p.cda_m2, q.cda_m2),           mix(p.cla_m2, q.cla_m2),
          mix(p.balance, q.balance),         mix(p.front_ride_m, q.front_ride_m),
          mix(p.rear_ride_m, q.rear_ride_m), p.off_map || q.off_map,
          p.grounded || q.grounded};
}

// engine_from_rest (envelope.hpp).
double engine_from_rest(const Envelope& env, bool trimmed, const Road& road,
                        const std::function<double(double)>& short_n, double found, int bits) {
  namespace tools = boost::math::tools;
  if (road.sin_bank != 0.0 || road.head_wind_mps != 0.0) return found;
  const std::vector<double>& floor = env.net_drive_floor(trimmed);
  const double c = env.weight_n() * (env.rolling_resistance() * road.cos_slope + road.sin_slope);
  // A car that cannot hold a standstill: found's search from the top speed down stands.
  if (floor.size() < 2 || !(floor.front() >= c)) return found;
  const double inv_du = env.rows(trimmed).inv_du;
  // The last row strictly below found.
  const double at = found * found * inv_du;
  const std::size_t below = std::min(
      at >= 1.0 ? static_cast<std::size_t>(std::ceil(at)) - 1 : std::size_t{0}, floor.size() - 1);
  if (floor[below] >= c) return found;
  const auto first = std::partition_point(floor.begin(), floor.begin() + below + 1,
                                          [c](double least) { return least >= c; });
  const auto k = static_cast<std::size_t>(first - floor.begin());  // >= 1: floor[0] >= c
  const double lo = std::sqrt(static_cast<double>(k - 1) / inv_du),
               hi = std::sqrt(static_cast<double>(k) / inv_du);
  const double f_lo = short_n(lo), f_hi = short_n(hi);
  if (!(f_lo <= 0.0 && f_hi > 0.0)) return found;  // a row's rounding: the search's answer
  std::uintmax_t iters = 100;
  const double v =
      tools::toms748_solve(short_n, lo, hi, f_lo, f_hi, tools::eps_tolerance<double>(bits), iters)
          .first;
  return v < found * (1.0 - 1e-9) ? v : found;
}

}  // namespace lapwing
