// The loads on the road, the one home of each formula: the road under the car (slope, bank,
// wind), the normal load and the lateral demand on a banked road, the resistance along the path,
// the airspeed, the axle loads with the drag moment (the front share of the aero load follows
// from them) and the lateral load transfer per axle. Inline: the solver's hot loop calls them at
// every stage.
#pragma once

#include <cmath>
#include <optional>

#include "lapwing/base/units.hpp"
#include "lapwing/model/car.hpp"

namespace lapwing {

/// The road at a point as the car meets it: the slope angle theta (cos, sin; + uphill), the
/// bank angle b taken in the direction of the turn (cos, sin; + where the bank helps the turn,
/// raising its outside), and the wind's head component (m/s, + against the car).
struct Road {
  double cos_slope = 1.0, sin_slope = 0.0;
  double cos_bank = 1.0, sin_bank = 0.0;
  double head_wind_mps = 0.0;
};

/// What gravity and the turn ask of the road at u = v^2 on a point of curvature |k|, on a road
/// of slope theta and bank b (REFERENCES, banked road; W cos(theta) the weight's part normal to
/// the slope, as for the grade):
///   normal_share c = N_body / W = cos(theta) cos(b) + (v^2 |k| / g) sin(b),
///   F_y = m v^2 |k| cos(b) - m g cos(theta) sin(b)   (N, + towards the turn's centre),
/// N_body the load normal to the road without downforce (normal_load_n adds it). Level and flat:
/// c = 1, F_y = m v^2 |k|; flat on a slope: c = cos(theta).
struct BodyLoads {
  double normal_share, lateral_n;
};
[[gnu::always_inline]] inline BodyLoads body_loads(double mass_kg, double u, double abs_curvature,
                                                   const Road& r) {
  const double centripetal = u * abs_curvature;  // m/s^2
  return {r.cos_slope * r.cos_bank + centripetal * r.sin_bank * (1.0 / units::g0),
          mass_kg * (centripetal * r.cos_bank - units::g0 * r.cos_slope * r.sin_bank)};
}

/// Load normal to the road on the tyres (N): N = W c + DF, c the share of the weight the road
/// carries normal to itself (body_loads; cos(theta) on a flat road, theta the slope angle).
[[gnu::always_inline]] inline double normal_load_n(double weight_n, double normal_share,
                                                   double downforce_n) {
  return weight_n * normal_share + downforce_n;
}

/// Resistance to motion along the path (N): drag + rolling resistance + grade,
///   R = D + Crr N + W sin(theta),  N the normal load (normal_load_n).
[[gnu::always_inline]] inline double resistance_n(double drag_n, double rolling_resistance,
                                                  double normal_load, double weight_n,
                                                  double sin_slope) {
  return drag_n + rolling_resistance * normal_load + weight_n * sin_slope;
}

/// The dynamic pressure's factor of the aero forces at ground speed v = sqrt(u) in a head wind
/// w (REFERENCES, wind: the airspeed along the path is v + w; crosswind ignored): downforce
/// scales with (v + w)^2, drag with (v + w) |v + w| (a tail wind faster than the car pushes).
/// Still air: both u, no root taken.
struct AirspeedSquared {
  double drag, lift;
};
[[gnu::always_inline]] inline AirspeedSquared airspeed_squared(double u, double head_wind_mps) {
  if (head_wind_mps == 0.0) return {u, u};
  const double va = std::sqrt(u) + head_wind_mps;
  return {va * std::abs(va), va * va};
}

/// The forces that load the axles: the weight W = m g with the share c of it the road carries
/// normal to itself (body_loads; cos(theta) on a flat road) and the slope's sin(theta), the
/// downforce DF with its front share `balance`, the drag D (at the car's drag height) and the
/// longitudinal acceleration a_x (> 0 accelerating). Zero weight and acceleration leave the aero
/// forces alone.
struct AxleForces {
  double weight_n = 0.0, mass_kg = 0.0;
  double normal_share = 1.0, sin_slope = 0.0;
  double downforce_n = 0.0, balance = 0.0, drag_n = 0.0;
  double ax_mps2 = 0.0;
};

/// Where they act: the static front share of the weight f, the heights of the centre of gravity
/// h and of the drag z_D, and the wheelbase L (m).
struct AxleGeometry {
  double front_weight = 0.0, cg_height_m = 0.0, drag_height_m = 0.0, wheelbase_m = 1.0;
};
inline AxleGeometry axle_geometry(const Car& car) {
  return {car.front_weight, car.cg_height_m, car.drag_height_m, car.wheelbase_m};
}

/// Axle loads (N), moments about the rear contact patch (REFERENCES, load transfer):
///   front = W c f + DF bal - (D z_D + m a_x h + W sin(th) h) / L,  rear = N - front,
/// N the normal load (W c + DF, normal_load_n). c = cos(th) on a flat road; on a banked one the
/// turn's part of N_body acts at the centre of gravity too, so it shares as the weight does.
/// The drag moment D z_D / L moves load from the front axle to the rear.
struct AxleLoads {
  double front_n, rear_n;
};
[[gnu::always_inline]] inline AxleLoads axle_loads(const AxleGeometry& g, const AxleForces& f) {
  const double total = normal_load_n(f.weight_n, f.normal_share, f.downforce_n);
  const double front = f.weight_n * f.normal_share * g.front_weight + f.downforce_n * f.balance -
                       (f.drag_n * g.drag_height_m + f.mass_kg * f.ax_mps2 * g.cg_height_m +
                        f.weight_n * f.sin_slope * g.cg_height_m) /
                           g.wheelbase_m;
  return {front, total - front};
}
/// The same for a car (W = m g0).
[[gnu::always_inline]] inline AxleLoads axle_loads(const Car& car, double drag_n,
                                                   double downforce_n, double balance,
                                                   double normal_share, double sin_slope,
                                                   double ax_mps2) {
  return axle_loads(axle_geometry(car), {car.mass_kg * units::g0, car.mass_kg, normal_share,
                                         sin_slope, downforce_n, balance, drag_n, ax_mps2});
}

/// The aero forces' part of the axle loads, each axle's by moments about the other's contact
/// patch (no weight, no acceleration):
///   front = DF bal - D z_D / L,  rear = DF (1 - bal) + D z_D / L,
/// the drag moment D z_D / L taken off the front axle and put on the rear. The front is
/// axle_loads' front with W = 0 and a_x = 0, to the last bit.
inline AxleLoads aero_axle_loads(double downforce_n, double balance, double drag_n,
                                 double drag_height_m, double wheelbase_m) {
  const double moment = drag_n * drag_height_m / wheelbase_m;
  return {downforce_n * balance - moment, downforce_n * (1.0 - balance) + moment};
}

/// Front share of the aero load with the drag moment: the aero load on the front axle over the
/// downforce, (DF bal - D z_D / L) / DF = (ClA bal - CdA z_D / L) / ClA, the same at every speed
/// since both forces scale with q = rho v^2 / 2 (so coefficients or forces may be given).
/// Without downforce (ClA <= 0) the share of no load is undefined: nullopt (the drag moment then
/// only unloads the front axle, by D z_D / L, which aero_axle_loads gives). So too where the
/// downforce is so small beside the drag moment that the share would exceed
/// max_drag_moment_share in size (a ClA of 1e-9 m^2 beside a CdA of 0.8 m^2 reads -1.6e8): a
/// ClA that is zero to the user, whose share is the division's noise, and which printed as a
/// percentage overflowed to -inf (a robustness campaign's finding: ClA 2.2e-308 m^2).
inline constexpr double max_drag_moment_share = 1e6;
inline std::optional<double> aero_balance_with_drag_moment(double cla_m2, double cda_m2,
                                                           double balance, double drag_height_m,
                                                           double wheelbase_m) {
  if (!(cla_m2 > 0.0)) return std::nullopt;
  const double share =
      aero_axle_loads(cla_m2, balance, cda_m2, drag_height_m, wheelbase_m).front_n / cla_m2;
  if (!(std::abs(share) <= max_drag_moment_share)) return std::nullopt;
  return share;
}

/// Lateral load transfer per newton of lateral force, per axle (Milliken & Milliken, Race Car
/// Vehicle Dynamics, ch. 18; all mass sprung):
///   dFz_f = F_y / t_f (h_ra k_f + f z_f),  dFz_r = F_y / t_r (h_ra (1 - k_f) + (1 - f) z_r),
/// with h_ra = h - (f z_f + (1 - f) z_r) the centre of gravity's height above the roll axis,
/// k_f the front's share of the roll stiffness, f the static front weight share (the front
/// axle's share of F_y, m a_y l_r / L), z the roll-centre heights and t the track widths. Both
/// roll centres at 0: dFz_f = m a_y h k_f / t_f. The moments add up:
/// dFz_f t_f + dFz_r t_r = F_y h. A car without roll geometry has none: {0, 0}.
struct TransferPerNewton {
  double front = 0.0, rear = 0.0;
};
inline TransferPerNewton lateral_transfer_per_n(const Car& car) {
  if (!car.roll) return {};
  const RollGeometry& g = *car.roll;
  const double f = car.front_weight;
  const double h_ra =
      car.cg_height_m - (f * g.roll_centre_front_m + (1.0 - f) * g.roll_centre_rear_m);
  return {
      (h_ra * g.roll_stiffness_front + f * g.roll_centre_front_m) / g.track_front_m,
      (h_ra * (1.0 - g.roll_stiffness_front) + (1.0 - f) * g.roll_centre_rear_m) / g.track_rear_m};
}

}  // namespace lapwing
