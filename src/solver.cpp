#include "lapwing/solver.hpp"

#include <boost/math/tools/roots.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <sstream>

#include "lapwing/error.hpp"
#include "lapwing/units.hpp"

namespace lapwing {

std::string_view phase_name(Phase p) {
  switch (p) {
    case Phase::accelerate: return "accelerate";
    case Phase::brake: return "brake";
    case Phase::corner: return "corner";
    case Phase::shift: return "shift";
    case Phase::top_speed: return "top_speed";
  }
  return "accelerate";
}

namespace {

// cos and sin of the road's slope angle from grade = tan(angle).
struct Slope {
  double cos, sin;
  explicit Slope(double grade) {
    const double h = 1.0 / std::sqrt(1.0 + grade * grade);
    cos = h;
    sin = grade * h;
  }
};

// Bracketing tolerance for steady speeds: 36 bits, about 1e-11 relative.
constexpr int steady_bits = 36;

// Longitudinal tyre force left by the friction ellipse at speed v with lateral demand
// m v^2 |kappa|.
double long_force_left(const Envelope& env, double v, double abs_curvature, const Slope& slope) {
  const double load = env.normal_load_n(v, slope.cos);
  const double fy = env.mass_kg() * v * v * abs_curvature;
  return env.tyres().fx_max(load) * env.tyres().long_share_left(fy / env.tyres().fy_max(load));
}

std::string where(const Mesh& mesh, std::size_t i) {
  std::ostringstream os;
  os.precision(6);
  os << mesh.s_m[i] << " m";
  return os.str();
}

// Highest v in [0, v_max] with f(v) <= 0, for f <= 0 at 0 and monotone enough to have one
// crossing; f(v_max) <= 0 gives v_max.
template <typename F>
double highest_feasible(F f, double v_max) {
  const double f_hi = f(v_max);
  if (f_hi <= 0.0) return v_max;
  const double f_lo = f(0.0);
  if (f_lo > 0.0) return 0.0;
  std::uintmax_t iters = 100;
  auto [lo, hi] = boost::math::tools::toms748_solve(
      f, 0.0, v_max, f_lo, f_hi, boost::math::tools::eps_tolerance<double>(steady_bits), iters);
  (void)hi;
  return lo;  // the feasible end of the final bracket
}

}  // namespace

SteadyProfile steady_profile(const Envelope& env, const Mesh& mesh) {
  const std::size_t n = mesh.size();
  SteadyProfile p;
  p.speed_mps.resize(n);
  p.limit.resize(n);
  const double v_max = env.max_speed_mps();
  const TyreModel& tyres = env.tyres();
  double last_grade = std::nan(""), last_curv = std::nan("");
  double v_engine = 0.0, v_grip = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double grade = mesh.grade[i], curv = std::abs(mesh.curvature_1pm[i]);
    const Slope slope(grade);
    if (grade != last_grade) {
      // Engine: drive in the best gear >= resistance, the top speed on this grade.
      v_engine = highest_feasible(
          [&](double v) { return env.resistance_n(v, slope.cos, slope.sin) - env.drive_n(v); },
          v_max);
    }
    if (grade != last_grade || curv != last_curv) {
      // Tyres: (|R| / Fx_max)^n + (m v^2 |kappa| / Fy_max)^n <= 1, R = resistance to hold v.
      v_grip = highest_feasible(
          [&](double v) {
            const double load = env.normal_load_n(v, slope.cos);
            const double fx = std::abs(env.resistance_n(v, slope.cos, slope.sin));
            const double fy = env.mass_kg() * v * v * curv;
            return tyres.usage(fx / tyres.fx_max(load), fy / tyres.fy_max(load)) - 1.0;
          },
          v_max);
    }
    last_grade = grade;
    last_curv = curv;
    if (v_grip < v_engine) {
      p.speed_mps[i] = v_grip;
      p.limit[i] = SteadyLimit::grip;
    } else {
      p.speed_mps[i] = v_engine;
      p.limit[i] = SteadyLimit::engine;
    }
    if (!(p.speed_mps[i] > 0.0))
      throw CannotMove("the car cannot hold any speed at " + where(mesh, i) + " (" +
                       (p.limit[i] == SteadyLimit::engine
                            ? "drive never exceeds the resistance on this grade"
                            : "the tyres cannot hold the car on this grade") +
                       ")");
  }
  return p;
}

SweepResult sweep(const Envelope& env, const Mesh& mesh, Sweep direction,
                  const std::vector<double>& limit, std::size_t start, double v_start) {
  namespace odeint = boost::numeric::odeint;
  const std::size_t n = mesh.size();
  const std::size_t period = mesh.closed ? n - 1 : n;  // unique points
  const bool forward = direction == Sweep::forward;
  SweepResult r;
  r.speed_mps.assign(n, 0.0);
  r.clipped.assign(n, 0);
  r.cut.assign(n, 0);
  r.gear.assign(n, 0);

  const double ds = mesh.step_m;
  const double m_eff = env.effective_mass_kg();
  const double shift_time = env.car().powertrain.shift_time_s;
  const bool ideal = env.car().powertrain.ideal;
  odeint::runge_kutta4<double> stepper;

  double v = v_start;
  r.speed_mps[start] = v;
  int gear = ideal ? 0 : env.gear(v);
  r.gear[start] = gear;
  double cut_left_s = 0.0;  // drive cut still to run after an upshift
  const std::size_t steps = mesh.closed ? period : (forward ? n - 1 - start : start);
  std::size_t i = start;
  for (std::size_t k = 0; k < steps; ++k) {
    // Next point along the sweep; a closed mesh wraps through its seam (point n-1 == point 0).
    std::size_t j;
    if (forward) j = (i + 1 == period && mesh.closed) ? 0 : i + 1;
    else j = (i == 0) ? period - 1 : i - 1;
    // Curvature varies linearly over the step; the grade is the one of the step's first point
    // in travel order (piecewise constant along segments).
    const std::size_t lower = forward ? i : j;  // index where the step starts in distance
    const double k0 = std::abs(mesh.curvature_1pm[i]), k1 = std::abs(mesh.curvature_1pm[j]);
    const Slope slope(mesh.grade[lower]);
    double drive_share = 1.0;
    if (forward && cut_left_s > 0.0) {
      // Fraction of this step's time (estimated at the entry speed) still under the cut.
      const double step_time = ds / std::max(v, 1e-3);
      drive_share = 1.0 - std::min(1.0, cut_left_s / step_time);
    }
    // d(v^2)/dx = 2 a along the sweep's own direction of travel x (0 .. ds over the step).
    auto rhs = [&](const double& u, double& dudx, double x) {
      const double vv = std::sqrt(std::max(u, 0.0));
      const double curv = k0 + (k1 - k0) * (x / ds);
      const double grip = long_force_left(env, vv, curv, slope);
      const double resist = env.resistance_n(vv, slope.cos, slope.sin);
      const double a = forward ? (std::min(grip, drive_share * env.drive_n(vv)) - resist) / m_eff
                               : (grip + resist) / m_eff;
      dudx = 2.0 * a;
    };
    double u = v * v;
    stepper.do_step(rhs, u, 0.0, ds);
    if (!(u > 0.0)) {
      throw CannotMove("the car stops at " + where(mesh, j) +
                       ": drive cannot overcome the resistance there");
    }
    double v_next = std::sqrt(u);
    if (v_next >= limit[j]) {
      v_next = limit[j];
      r.clipped[j] = 1;
    }
    if (forward) {
      const double dt = 2.0 * ds / (v + v_next);
      if (cut_left_s > 0.0) {
        r.cut[j] = 1;
        cut_left_s = std::max(0.0, cut_left_s - dt);
      }
      if (!ideal) {
        // An upshift cuts the drive. The speed lost in the cut must not shift back down (that
        // would hunt at the shift point): under drive the engaged gear only goes up; it follows
        // the speed down only where a limit, not the drive, set the speed.
        const int best = env.gear(v_next);
        if (best > gear && shift_time > 0.0) cut_left_s = shift_time;
        if (best > gear || r.clipped[j]) gear = best;
      }
      r.gear[j] = gear;
    }
    r.speed_mps[j] = v_next;
    v = v_next;
    i = j;
  }
  if (mesh.closed) {
    // The seam: point n-1 is point 0 again.
    r.speed_mps[n - 1] = r.speed_mps[0];
    r.clipped[n - 1] = r.clipped[0];
    r.cut[n - 1] = r.cut[0];
    r.gear[n - 1] = r.gear[0];
  }
  return r;
}

Lap solve_lap(const Envelope& env, const Mesh& mesh, double start_speed_mps) {
  const std::size_t n = mesh.size();
  assert(n >= 3);
  Lap lap;
  lap.steady = steady_profile(env, mesh);
  const auto& steady = lap.steady.speed_mps;

  SweepResult fwd, bwd;
  if (mesh.closed) {
    // Periodic lap: start both sweeps at the slowest steady point, where the speed is known.
    const std::size_t period = n - 1;
    const std::size_t i0 = static_cast<std::size_t>(
        std::min_element(steady.begin(), steady.begin() + static_cast<std::ptrdiff_t>(period)) -
        steady.begin());
    // A sweep that comes round slower than it started (it could not regain the start speed)
    // is run once more from the speed it arrived at, so that the lap is periodic.
    auto periodic = [&](Sweep dir) {
      SweepResult r = sweep(env, mesh, dir, steady, i0, steady[i0]);
      if (r.speed_mps[i0] < steady[i0]) r = sweep(env, mesh, dir, steady, i0, r.speed_mps[i0]);
      return r;
    };
    fwd = periodic(Sweep::forward);
    bwd = periodic(Sweep::backward);
  } else {
    fwd = sweep(env, mesh, Sweep::forward, steady, 0, start_speed_mps);
    bwd = sweep(env, mesh, Sweep::backward, steady, n - 1, steady[n - 1]);
  }

  lap.speed_mps.resize(n);
  lap.phase.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double v = std::min(fwd.speed_mps[i], bwd.speed_mps[i]);
    lap.speed_mps[i] = v;
    Phase ph;
    if (bwd.speed_mps[i] < fwd.speed_mps[i]) ph = Phase::brake;
    else if (fwd.clipped[i]) ph = lap.steady.limit[i] == SteadyLimit::grip ? Phase::corner : Phase::top_speed;
    else if (fwd.cut[i]) ph = Phase::shift;
    else ph = Phase::accelerate;
    lap.phase[i] = ph;
  }

  // Time: sum of 2 ds / (v_i + v_{i+1}) (SPEC section 6).
  lap.time_s.resize(n);
  lap.time_s[0] = 0.0;
  for (std::size_t i = 0; i + 1 < n; ++i) {
    const double vsum = lap.speed_mps[i] + lap.speed_mps[i + 1];
    if (!(vsum > 0.0)) throw CannotMove("the car does not move at " + where(mesh, i));
    lap.time_s[i + 1] = lap.time_s[i] + 2.0 * mesh.step_m / vsum;
  }
  lap.lap_time_s = lap.time_s[n - 1];

  // Channels along the lap.
  const Car& car = env.car();
  const double g = units::g0, m = env.mass_kg(), wb = car.wheelbase_m;
  lap.long_accel_mps2.resize(n);
  lap.lat_accel_mps2.resize(n);
  lap.gear.resize(n);
  lap.engine_radps.resize(n);
  lap.drag_n.resize(n);
  lap.downforce_n.resize(n);
  lap.front_load_n.resize(n);
  lap.rear_load_n.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double v = lap.speed_mps[i];
    // a = d(v^2)/(2 ds) over the interval that starts at i (the one ending at i for the last).
    const std::size_t a0 = (i + 1 < n) ? i : i - 1;
    const double ax = (lap.speed_mps[a0 + 1] * lap.speed_mps[a0 + 1] -
                       lap.speed_mps[a0] * lap.speed_mps[a0]) /
                      (2.0 * mesh.step_m);
    lap.long_accel_mps2[i] = ax;
    lap.lat_accel_mps2[i] = v * v * mesh.curvature_1pm[i];
    // Under drive the gear the forward sweep engaged (held through a shift's cut); under
    // braking the best gear for the speed.
    const Powertrain& pt = car.powertrain;
    const int gear = pt.ideal ? 0 : (lap.phase[i] == Phase::brake ? env.gear(v) : fwd.gear[i]);
    lap.gear[i] = gear;
    lap.engine_radps[i] =
        pt.ideal ? 0.0
                 : std::clamp(v / car.tyres.rolling_radius_m * pt.gears[static_cast<std::size_t>(gear - 1)] *
                                  pt.final_drive,
                              pt.engine_radps.front(), pt.rev_limit_radps);
    const double drag = env.drag_n(v), down = env.downforce_n(v);
    lap.drag_n[i] = drag;
    lap.downforce_n[i] = down;
    // Axle loads, moments about the rear contact patch (REFERENCES: load transfer):
    // front = W cos(th) f + DF bal - D z_D / L - m a_x h / L - W sin(th) h / L.
    const Slope slope(mesh.grade[i]);
    const double weight = m * g;
    const double total = weight * slope.cos + down;
    const double front = weight * slope.cos * car.front_weight + down * env.aero_balance(v) -
                         drag * car.drag_height_m / wb - m * ax * car.cg_height_m / wb -
                         weight * slope.sin * car.cg_height_m / wb;
    lap.front_load_n[i] = front;
    lap.rear_load_n[i] = total - front;
  }
  return lap;
}

}  // namespace lapwing
