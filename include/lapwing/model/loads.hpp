// The loads on the road, the one home of each formula: the normal load, the resistance along
// the path, and the axle loads with the drag moment (the front share of the aero load follows
// from them). Inline: the solver's hot loop calls them at every stage.
#pragma once

#include <optional>

#include "lapwing/base/units.hpp"
#include "lapwing/model/car.hpp"

namespace lapwing {

/// Vertical load on the tyres (N): N = W cos(theta) + DF, theta the slope angle.
[[gnu::always_inline]] inline double normal_load_n(double weight_n, double cos_slope,
                                                   double downforce_n) {
  return weight_n * cos_slope + downforce_n;
}

/// Resistance to motion along the path (N): drag + rolling resistance + grade,
///   R = D + Crr N + W sin(theta),  N the normal load (normal_load_n).
[[gnu::always_inline]] inline double resistance_n(double drag_n, double rolling_resistance,
                                                  double normal_load, double weight_n,
                                                  double sin_slope) {
  return drag_n + rolling_resistance * normal_load + weight_n * sin_slope;
}

/// The forces that load the axles: the weight W = m g on a slope, the downforce DF with its
/// front share `balance`, the drag D (at the car's drag height) and the longitudinal
/// acceleration a_x (> 0 accelerating). Zero weight and acceleration leave the aero forces alone.
struct AxleForces {
  double weight_n = 0.0, mass_kg = 0.0;
  double cos_slope = 1.0, sin_slope = 0.0;
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
///   front = W cos(th) f + DF bal - (D z_D + m a_x h + W sin(th) h) / L,  rear = N - front,
/// N the normal load. The drag moment D z_D / L moves load from the front axle to the rear.
struct AxleLoads {
  double front_n, rear_n;
};
[[gnu::always_inline]] inline AxleLoads axle_loads(const AxleGeometry& g, const AxleForces& f) {
  const double total = normal_load_n(f.weight_n, f.cos_slope, f.downforce_n);
  const double front = f.weight_n * f.cos_slope * g.front_weight + f.downforce_n * f.balance -
                       (f.drag_n * g.drag_height_m + f.mass_kg * f.ax_mps2 * g.cg_height_m +
                        f.weight_n * f.sin_slope * g.cg_height_m) /
                           g.wheelbase_m;
  return {front, total - front};
}
/// The same for a car (W = m g0).
[[gnu::always_inline]] inline AxleLoads axle_loads(const Car& car, double drag_n,
                                                   double downforce_n, double balance,
                                                   double cos_slope, double sin_slope,
                                                   double ax_mps2) {
  return axle_loads(axle_geometry(car), {car.mass_kg * units::g0, car.mass_kg, cos_slope, sin_slope,
                                         downforce_n, balance, drag_n, ax_mps2});
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
/// only unloads the front axle, by D z_D / L, which aero_axle_loads gives).
inline std::optional<double> aero_balance_with_drag_moment(double cla_m2, double cda_m2,
                                                           double balance, double drag_height_m,
                                                           double wheelbase_m) {
  if (!(cla_m2 > 0.0)) return std::nullopt;
  return aero_axle_loads(cla_m2, balance, cda_m2, drag_height_m, wheelbase_m).front_n / cla_m2;
}

}  // namespace lapwing
