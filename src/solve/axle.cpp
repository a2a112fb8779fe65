#include "lapwing/solve/axle.hpp"

#include <algorithm>
#include <cmath>

#include "lapwing/base/units.hpp"

namespace lapwing {

namespace {
// Fixed-point passes for the load transfer the acceleration itself causes. The map a -> a'
// contracts by about mu m h / (L m_eff) (0.15 for the bundled cars): six passes leave 1e-5 of
// the first correction.
constexpr int transfer_passes = 6;
}  // namespace

AxleLoads axle_loads(const Car& car, double drag_n, double downforce_n, double balance,
                     double cos_slope, double sin_slope, double ax) {
  const double weight = car.mass_kg * units::g0;
  const double total = weight * cos_slope + downforce_n;
  const double front = weight * cos_slope * car.front_weight + downforce_n * balance -
                       (drag_n * car.drag_height_m + car.mass_kg * ax * car.cg_height_m +
                        weight * sin_slope * car.cg_height_m) /
                           car.wheelbase_m;
  return {front, total - front};
}

std::optional<double> aero_balance_with_drag_moment(double cla_m2, double cda_m2, double balance,
                                                    double drag_height_m, double wheelbase_m) {
  if (!(cla_m2 > 0.0)) return std::nullopt;
  return (cla_m2 * balance - cda_m2 * drag_height_m / wheelbase_m) / cla_m2;
}

AxleUsage axle_usage(const Envelope& env, const AxleLoads& loads, double fx, double ay) {
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  AxleUsage u{loads, 0, 0, 0, 0, 0, 0};
  const double total = loads.front_n + loads.rear_n;
  if (fx >= 0.0) {
    switch (car.powertrain.driven) {
      case DrivenAxle::rear:
        u.rear_fx_n = fx;
        break;
      case DrivenAxle::front:
        u.front_fx_n = fx;
        break;
      case DrivenAxle::all:
        u.front_fx_n = fx * loads.front_n / total;
        u.rear_fx_n = fx - u.front_fx_n;
        break;
    }
  } else {
    u.front_fx_n = fx * car.brake_front_bias;
    u.rear_fx_n = fx - u.front_fx_n;
  }
  u.front_fy_n = car.mass_kg * ay * car.front_weight;
  u.rear_fy_n = car.mass_kg * ay - u.front_fy_n;
  auto usage = [&t](double load, double fxa, double fya) {
    if (!(load > 0.0)) return 1e9;  // an unloaded axle cannot carry anything
    const TyreModel::Limits lim = t.axle_limits(load);
    return t.usage(std::abs(fxa) / lim.fx_max, std::abs(fya) / lim.fy_max);
  };
  u.front_usage = usage(loads.front_n, u.front_fx_n, u.front_fy_n);
  u.rear_usage = usage(loads.rear_n, u.rear_fx_n, u.rear_fy_n);
  return u;
}

namespace {

struct Aero {
  double drag, down, balance, resistance;
};
Aero aero_at(const Envelope& env, double u, double cos_slope, double sin_slope, bool trimmed) {
  const Envelope::Sample s = env.sample_sq(u, trimmed);
  const double down = s.lift_coef * u, drag = s.drag_coef * u;
  const double load = env.weight_n() * cos_slope + down;
  return {drag, down, s.balance,
          drag + env.rolling_resistance() * load + env.weight_n() * sin_slope};
}

double left_on(const TyreModel& t, double axle_load, double fy) {
  if (!(axle_load > 0.0)) return 0.0;
  return t.long_force_left(t.axle_limits(axle_load), fy);
}

}  // namespace

double axle_drive_force(const Envelope& env, double u, double k, double cos_slope, double sin_slope,
                        double drive_n, bool trimmed) {
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  const Aero a = aero_at(env, u, cos_slope, sin_slope, trimmed);
  const double fy = car.mass_kg * u * k;
  const double fy_front = fy * car.front_weight, fy_rear = fy - fy_front;
  double ax = 0.0, force = 0.0;
  for (int pass = 0; pass < transfer_passes; ++pass) {
    const AxleLoads l = axle_loads(car, a.drag, a.down, a.balance, cos_slope, sin_slope, ax);
    double traction = 0.0;
    switch (car.powertrain.driven) {
      case DrivenAxle::rear:
        traction = left_on(t, l.rear_n, fy_rear);
        break;
      case DrivenAxle::front:
        traction = left_on(t, l.front_n, fy_front);
        break;
      case DrivenAxle::all:
        traction = left_on(t, l.front_n, fy_front) + left_on(t, l.rear_n, fy_rear);
        break;
    }
    force = std::min(traction, drive_n) - a.resistance;
    ax = force / env.effective_mass_kg();
  }
  return force;
}

double axle_brake_force(const Envelope& env, double u, double k, double cos_slope,
                        double sin_slope) {
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  const Aero a = aero_at(env, u, cos_slope, sin_slope, false);
  const double fy = car.mass_kg * u * k;
  const double fy_front = fy * car.front_weight, fy_rear = fy - fy_front;
  const double bias = car.brake_front_bias;
  double ax = 0.0, force = 0.0;
  for (int pass = 0; pass < transfer_passes; ++pass) {
    const AxleLoads l = axle_loads(car, a.drag, a.down, a.balance, cos_slope, sin_slope, ax);
    // Braking force F splits bias F front, (1 - bias) F rear: the largest F neither axle refuses.
    const double brake = std::min(left_on(t, l.front_n, fy_front) / bias,
                                  left_on(t, l.rear_n, fy_rear) / (1.0 - bias));
    force = brake + a.resistance;
    ax = -force / env.effective_mass_kg();
  }
  return force;
}

double axle_steady_excess(const Envelope& env, double v, double k, double cos_slope,
                          double sin_slope) {
  const double u = v * v;
  const Aero a = aero_at(env, u, cos_slope, sin_slope, false);
  const AxleLoads l = axle_loads(env.car(), a.drag, a.down, a.balance, cos_slope, sin_slope, 0.0);
  const AxleUsage use = axle_usage(env, l, a.resistance, u * k);
  return std::max(use.front_usage, use.rear_usage) - 1.0;
}

}  // namespace lapwing
