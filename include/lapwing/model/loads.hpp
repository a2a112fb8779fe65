// The loads on the road, the one home of each formula: the road under the car (slope, bank,
// wind), the normal load and the lateral demand on a banked road, the airspeed, and the lateral
// load transfer per axle. Inline: the solver's hot loop calls them at every stage.
#pragma once

#include <cmath>

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

/// The load normal to the road from gravity and the turn, without downforce (N), and the
/// lateral force in the road's plane the tyres must supply (N, + towards the turn's centre), on
/// a road of slope theta and bank b in a turn of curvature |k| at u = v^2 (REFERENCES, banked
/// road; the grade as before, W cos(theta) the weight's part normal to the slope):
///   N_body = W cos(theta) cos(b) + m v^2 |k| sin(b),
///   F_y    = m v^2 |k| cos(b) - W cos(theta) sin(b).
/// Level and flat: N_body = W, F_y = m v^2 |k|.
struct BodyLoads {
  double normal_n, lateral_n;
};
[[gnu::always_inline]] inline BodyLoads body_loads(double mass_kg, double weight_n, double u,
                                                   double abs_curvature, const Road& r) {
  const double centripetal = mass_kg * u * abs_curvature;
  const double gravity = weight_n * r.cos_slope;
  return {gravity * r.cos_bank + centripetal * r.sin_bank,
          centripetal * r.cos_bank - gravity * r.sin_bank};
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
