#include "lapwing/solve/axle.hpp"

#include <boost/math/tools/roots.hpp>

#include <algorithm>
#include <cmath>
#include <limits>

#include "lapwing/base/units.hpp"

namespace lapwing {

namespace {
// The acceleration a_x moves load between the axles, and what the axles can carry sets a_x:
// the axle model's acceleration is the largest a with g(a) = phi(a) - a >= 0, phi(a) the
// acceleration the axles allow at the loads a sets. Plain passes a <- phi(a) do not find it
// everywhere: under braking that the rear axle limits the slope of phi is -mu h / (L (1 - bias))
// (-0.6 for the sports car: the passes alternate and six of them left 5 % of the first error),
// and where an axle's lateral demand nearly fills its ellipse the force it has left,
// c sqrt(Fy_max(load)^2 - Fy^2), changes without bound with the load: slopes beyond 1 in size,
// where passes and the secant method wander (the rear axle's usage read 1.1 under braking). The
// force left is concave in the load and the loads are linear in a, so g is concave: its upper
// root is bracketed from a = 0 outward and found by TOMS 748 (Alefeld, Potra & Shi, ACM TOMS 21
// (1995) 327; Boost.Math), keeping the feasible end (usage <= 1 there).
constexpr double transfer_tolerance_mps2 = 1e-9;  // bracket width: 1e-10 g
constexpr std::uintmax_t transfer_max_evaluations = 60;

template <typename Phi>
double transfer_fixed_point(Phi phi) {
  namespace tools = boost::math::tools;
  auto g = [&phi](double a) { return phi(a) - a; };
  double lo = 0.0, g_lo = g(lo);
  if (g_lo == 0.0) return lo;
  double step = std::max(std::abs(g_lo), transfer_tolerance_mps2);
  if (g_lo < 0.0) {
    // Infeasible at a = 0. Where g rises from 0 its feasible interval lies above (g is
    // concave): a driven axle at its limit at a = 0 that gains load as the car accelerates
    // (g(0) < 0 by rounding on the steady limit). Otherwise it lies below.
    const double up = g(step);
    if (up > g_lo) {
      for (double a = step, g_a = up; g_a > g_lo && a < 1e6; a *= 2.0) {
        if (g_a >= 0.0) {
          lo = a;
          g_lo = g_a;
          break;
        }
        const double next = g(2.0 * a);
        if (next <= g_a) break;  // past the top of g, still infeasible
        g_a = next;
      }
    }
  }
  double hi = lo, g_hi = g_lo;
  // From the feasible side step up by phi(0) (the first pass), doubling, until g changes sign;
  // from the infeasible side step down likewise. g is bounded by the tyres and the drive: a
  // few doublings at most.
  for (int k = 0; k < 64 && (g_lo > 0.0) == (g_hi > 0.0); ++k, step *= 2.0) {
    if (g_lo > 0.0) {
      hi = lo + step;
      g_hi = g(hi);
      if (g_hi > 0.0) {
        lo = hi;
        g_lo = g_hi;
      }
    } else {
      hi = lo;
      g_hi = g_lo;
      lo = hi - step;
      g_lo = g(lo);
    }
  }
  if (g_hi == 0.0) return hi;
  if (!(g_lo > 0.0 && g_hi < 0.0)) return lo;  // no sign change: not reached for finite data
  std::uintmax_t evaluations = transfer_max_evaluations;
  const auto done = [](double a, double b) { return std::abs(b - a) <= transfer_tolerance_mps2; };
  return tools::toms748_solve(g, lo, hi, g_lo, g_hi, done, evaluations).first;
}
}  // namespace

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
  const double load = normal_load_n(env.weight_n(), cos_slope, down);
  return {drag, down, s.balance,
          resistance_n(drag, env.rolling_resistance(), load, env.weight_n(), sin_slope)};
}

double left_on(const TyreModel& t, double axle_load, double fy) {
  if (!(axle_load > 0.0)) return 0.0;
  return t.long_force_left(t.axle_limits(axle_load), fy);
}

}  // namespace

double axle_drive_accel(const Envelope& env, double u, double k, double cos_slope, double sin_slope,
                        double drive_n, bool trimmed) {
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  const Aero a = aero_at(env, u, cos_slope, sin_slope, trimmed);
  const double fy = car.mass_kg * u * k;
  const double fy_front = fy * car.front_weight, fy_rear = fy - fy_front;
  // Rotating inertia only where the engine limits (Gillespie, Fundamentals of Vehicle Dynamics,
  // ch. 2-3): the drive spins the rotating parts up too, (F_drive - R) = m_eff a; at the tyres'
  // limit the road force acts on m, (F_traction - R) = m a, and the engine supplies the wheels'
  // spin-up torque on top.
  const double inv_m = 1.0 / env.mass_kg();
  const double engine = (drive_n - a.resistance) / env.effective_mass_kg();
  const AxleLoads static_loads =
      axle_loads(car, a.drag, a.down, a.balance, cos_slope, sin_slope, 0.0);
  // The front axle of a rear-driven car carries no drive but its share of the lateral force, on
  // a load that acceleration takes away (front = front(0) - m a h / L): it holds only while
  // front(a) >= the least load for fy_front, so a <= (front(0) - that load) L / (m h). The
  // rear of a front-driven car gains load under power: no bound there.
  double front_bound = std::numeric_limits<double>::infinity();
  if (car.powertrain.driven == DrivenAxle::rear && car.cg_height_m > 0.0)
    front_bound = (static_loads.front_n - t.axle_load_for_lateral(fy_front)) * car.wheelbase_m /
                  (car.mass_kg * car.cg_height_m);
  return transfer_fixed_point([&](double ax) {
    const AxleLoads l = axle_loads(car, a.drag, a.down, a.balance, cos_slope, sin_slope, ax);
    double traction = 0.0;
    switch (car.powertrain.driven) {
      case DrivenAxle::rear:
        traction = left_on(t, l.rear_n, fy_rear);
        break;
      case DrivenAxle::front:
        traction = left_on(t, l.front_n, fy_front);
        break;
      case DrivenAxle::all: {
        // The drive shared by load (as axle_usage shares it): the largest total that neither
        // axle refuses, min(left_f N / front, left_r N / rear).
        const double total = l.front_n + l.rear_n;
        traction = l.front_n > 0.0 && l.rear_n > 0.0
                       ? std::min(left_on(t, l.front_n, fy_front) * total / l.front_n,
                                  left_on(t, l.rear_n, fy_rear) * total / l.rear_n)
                       : 0.0;
        break;
      }
    }
    return std::min({engine, (traction - a.resistance) * inv_m, front_bound});
  });
}

double axle_brake_accel(const Envelope& env, double u, double k, double cos_slope,
                        double sin_slope) {
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  const Aero a = aero_at(env, u, cos_slope, sin_slope, false);
  const double fy = car.mass_kg * u * k;
  const double fy_front = fy * car.front_weight, fy_rear = fy - fy_front;
  const double bias = car.brake_front_bias;
  // Braking at the tyres' limit decelerates m: the brakes spin the wheels down (as in drive).
  const double inv_m = 1.0 / env.mass_kg();
  return transfer_fixed_point([&](double decel) {
    const AxleLoads l = axle_loads(car, a.drag, a.down, a.balance, cos_slope, sin_slope, -decel);
    // Braking force F splits bias F front, (1 - bias) F rear: the largest F neither axle refuses.
    const double brake = std::min(left_on(t, l.front_n, fy_front) / bias,
                                  left_on(t, l.rear_n, fy_rear) / (1.0 - bias));
    return (brake + a.resistance) * inv_m;
  });
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
