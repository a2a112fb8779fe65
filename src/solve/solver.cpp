#include "lapwing/solve/solver.hpp"

#include <boost/math/tools/roots.hpp>
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>
#include <sstream>
#include <tuple>
#include <utility>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/solve/axle.hpp"

namespace lapwing {

std::string_view phase_name(Phase p) {
  switch (p) {
    case Phase::accelerate:
      return "accelerate";
    case Phase::brake:
      return "brake";
    case Phase::corner:
      return "corner";
    case Phase::shift:
      return "shift";
    case Phase::top_speed:
      return "top_speed";
  }
  return "accelerate";
}

namespace {

// cos and sin of the road's slope angle at a mesh point (Mesh keeps them: grade = tan(angle)).
struct Slope {
  double cos, sin;
  Slope(double c, double s) : cos(c), sin(s) {}
  Slope(const Mesh& m, std::size_t i) : cos(m.cos_slope[i]), sin(m.sin_slope[i]) {}
};

// Bracketing tolerance for steady speeds: 36 bits, about 1e-11 relative.
constexpr int steady_bits = 36;

// The forces along the path at speed v on a point of curvature |kappa| and slope: what the
// tyres have left for Fx after the lateral demand m v^2 |kappa| (friction ellipse), the
// resistance (drag + rolling + grade), and the drive in the best gear. One table read.
struct PathForces {
  double grip_left_n, resistance_n, drive_n;
};
inline PathForces path_forces(const Envelope& env, const Envelope::Rows& rows, double v2,
                              double abs_curvature, const Slope& slope) {
  const Envelope::Sample s = rows.at(v2);
  const double load = env.weight_n() * slope.cos + s.lift_coef * v2;
  const TyreModel::Limits lim = env.tyres().limits(load);
  const double fy = env.mass_kg() * v2 * abs_curvature;
  return {env.tyres().long_force_left(lim, fy),
          s.drag_coef * v2 + env.rolling_resistance() * load + env.weight_n() * slope.sin,
          s.drive_n};
}

std::string where(const Mesh& mesh, std::size_t i) {
  std::ostringstream os;
  os.precision(6);
  os << mesh.s_m[i] << " m";
  return os.str();
}

// Highest v in [0, v_max] with f(v) <= 0, for f <= 0 at 0 and monotone enough to have one
// crossing; f(v_max) <= 0 gives v_max. `hint` (the answer at the previous mesh point, or 0)
// first tries a bracket of +-2 % around it, which neighbouring points nearly always share.
template <typename F>
double highest_feasible(F f, double v_max, double hint) {
  namespace tools = boost::math::tools;
  const double f_hi = f(v_max);
  if (f_hi <= 0.0) return v_max;
  std::uintmax_t iters = 100;
  if (hint > 0.0 && hint < v_max) {
    const double a = 0.98 * hint, b = std::min(1.02 * hint, v_max);
    const double fa = f(a);
    if (fa <= 0.0) {
      const double fb = f(b);
      if (fb > 0.0)
        return tools::toms748_solve(f, a, b, fa, fb, tools::eps_tolerance<double>(steady_bits),
                                    iters)
            .first;
    }
  }
  const double f_lo = f(0.0);
  if (f_lo > 0.0) return 0.0;
  // The feasible end of the final bracket.
  return tools::toms748_solve(f, 0.0, v_max, f_lo, f_hi, tools::eps_tolerance<double>(steady_bits),
                              iters)
      .first;
}

}  // namespace

SteadyProfile steady_profile(const Envelope& env, const Mesh& mesh) {
  SteadyProfile p;
  steady_profile(env, mesh, p);
  return p;
}

void steady_profile(const Envelope& env, const Mesh& mesh, SteadyProfile& p) {
  const std::size_t n = mesh.size();
  p.speed_mps.resize(n);
  p.limit.resize(n);
  const double v_max = env.max_speed_mps();
  const TyreModel& tyres = env.tyres();
  const bool axle = env.car().model == VehicleModel::axle;
  double last_grade = std::nan(""), last_curv = std::nan("");
  bool last_trimmed = false;
  double v_engine = 0.0, v_grip = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double grade = mesh.grade[i], curv = std::abs(mesh.curvature_1pm[i]);
    const Slope slope(mesh, i);
    // The engine's limit is reached under full drive, where the straight-line trim applies.
    const bool trimmed = env.trims(curv);
    if (grade != last_grade || trimmed != last_trimmed) {
      // Engine: drive in the best gear >= resistance, the top speed on this grade.
      v_engine = highest_feasible(
          [&](double v) {
            return env.resistance_n(v, slope.cos, slope.sin, trimmed) - env.drive_n(v);
          },
          v_max, v_engine);
    }
    last_trimmed = trimmed;
    if (grade != last_grade || curv != last_curv) {
      // Tyres: (|R| / Fx_max)^n + (m v^2 |kappa| / Fy_max)^n <= 1, R = resistance to hold v.
      // With the axle model, on the axle that saturates first.
      v_grip =
          axle ? highest_feasible(
                     [&](double v) {
                       return axle_steady_excess(env, v, curv, slope.cos, slope.sin);
                     },
                     v_max, v_grip)
               : highest_feasible(
                     [&](double v) {
                       const double load = env.normal_load_n(v, slope.cos);
                       const double fx = std::abs(env.resistance_n(v, slope.cos, slope.sin));
                       const double fy = env.mass_kg() * v * v * curv;
                       return tyres.usage(fx / tyres.fx_max(load), fy / tyres.fy_max(load)) - 1.0;
                     },
                     v_max, v_grip);
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
}

namespace {

// One sweep, one step at a time, so that the forward and the backward sweep can advance in
// lockstep: two independent chains of dependent arithmetic keep the processor busier than one
// (each RK4 stage waits on the last). Forward and backward differ only in the acceleration.
// `Axle` picks the vehicle model at compile time (one branch per lap, none per stage).
template <bool Axle>
class Sweeper {
  SweepResult& r_;

 public:
  Sweeper(const Envelope& env, const Mesh& mesh, Sweep direction, const std::vector<double>& limit,
          std::size_t start, double v_start, SweepResult& out)
      : r_(out),
        env_(env),
        mesh_(mesh),
        limit_(limit),
        forward_(direction == Sweep::forward),
        ideal_(env.car().powertrain.ideal),
        n_(mesh.size()),
        period_(mesh.closed ? n_ - 1 : n_),
        ds_(mesh.step_m),
        inv_m_eff_(1.0 / env.effective_mass_kg()),
        shift_time_(env.car().powertrain.shift_time_s),
        i_(start),
        v_(v_start) {
    r_.speed_mps.resize(n_);  // every point is written on the way
    r_.clipped.assign(n_, 0);
    r_.cut.assign(n_, 0);
    r_.gear.assign(n_, 0);
    r_.speed_mps[start] = v_;
    gear_ = ideal_ ? 0 : env.gear(v_);
    r_.gear[start] = gear_;
  }

  /// Steps this sweep takes over the mesh from its start.
  std::size_t steps() const {
    if (mesh_.closed) return period_;
    return forward_ ? n_ - 1 - i_ : i_;
  }

  /// Prepares the step from the current point to the next; returns u = v^2 there.
  double begin_step() {
    const std::size_t i = i_;
    // Next point along the sweep; a closed mesh wraps through its seam (point n-1 == point 0).
    if (forward_)
      j_ = (i + 1 == period_ && mesh_.closed) ? 0 : i + 1;
    else
      j_ = (i == 0) ? period_ - 1 : i - 1;
    // Curvature varies linearly over the step; the grade is that of the step's first point in
    // distance (piecewise constant along segments).
    k0_ = std::abs(mesh_.curvature_1pm[i]);
    dk_ = (std::abs(mesh_.curvature_1pm[j_]) - k0_) / ds_;
    slope_ = Slope(mesh_, forward_ ? i : j_);
    // Under drive, movable aero trims where the step starts on a straight enough piece; under
    // braking it does not.
    trimmed_ = forward_ && env_.trims(k0_);
    rows_ = env_.rows(trimmed_);
    drive_share_ = 1.0;
    if (forward_ && cut_left_s_ > 0.0) {
      // Share of this step's time (estimated at the entry speed) with the drive still on.
      const double step_time = ds_ / std::max(v_, 1e-3);
      drive_share_ = 1.0 - std::min(1.0, cut_left_s_ / step_time);
    }
    return v_ * v_;
  }

  /// d(v^2)/dx = 2 a at u = v^2, a distance x (0 .. ds) into the step, along the sweep's own
  /// direction of travel: forward under drive, backward under braking.
  double rhs(double u, double x) const {
    const double u0 = std::max(u, 0.0);
    const double k = k0_ + dk_ * x;
    if constexpr (Axle) {
      const double force =
          forward_ ? axle_drive_force(env_, u0, k, slope_.cos, slope_.sin,
                                      drive_share_ * env_.sample_sq(u0).drive_n, trimmed_)
                   : axle_brake_force(env_, u0, k, slope_.cos, slope_.sin);
      return 2.0 * force * inv_m_eff_;
    }
    const PathForces f = path_forces(env_, rows_, u0, k, slope_);
    const double force = forward_
                             ? std::min(f.grip_left_n, drive_share_ * f.drive_n) - f.resistance_n
                             : f.grip_left_n + f.resistance_n;
    return 2.0 * force * inv_m_eff_;
  }

  /// Takes the integrated u at the next point: clips it to the limit and moves there.
  void end_step(double u) {
    const std::size_t j = j_;
    if (!(u > 0.0))
      throw CannotMove("the car stops at " + where(mesh_, j) +
                       ": drive cannot overcome the resistance there");
    double v_next = std::sqrt(u);
    if (v_next >= limit_[j]) {
      v_next = limit_[j];
      r_.clipped[j] = 1;
    }
    if (forward_) {
      const double dt = 2.0 * ds_ / (v_ + v_next);
      if (cut_left_s_ > 0.0) {
        r_.cut[j] = 1;
        cut_left_s_ = std::max(0.0, cut_left_s_ - dt);
      }
      if (!ideal_) {
        // An upshift cuts the drive. The speed lost in the cut must not shift back down (that
        // would hunt at the shift point): under drive the engaged gear only goes up; it
        // follows the speed down only where a limit, not the drive, set the speed.
        const int best = env_.gear(v_next);
        if (best > gear_ && shift_time_ > 0.0) cut_left_s_ = shift_time_;
        if (best > gear_ || r_.clipped[j]) gear_ = best;
      }
      r_.gear[j] = gear_;
    }
    r_.speed_mps[j] = v_next;
    v_ = v_next;
    i_ = j;
  }

  void finish() {
    if (mesh_.closed) {
      // The seam: point n-1 is point 0 again.
      r_.speed_mps[n_ - 1] = r_.speed_mps[0];
      r_.clipped[n_ - 1] = r_.clipped[0];
      r_.cut[n_ - 1] = r_.cut[0];
      r_.gear[n_ - 1] = r_.gear[0];
    }
  }

 private:
  const Envelope& env_;
  const Mesh& mesh_;
  const std::vector<double>& limit_;
  const bool forward_, ideal_;
  const std::size_t n_, period_;
  const double ds_, inv_m_eff_, shift_time_;
  std::size_t i_;
  double v_;
  // The step in progress.
  std::size_t j_ = 0;
  double k0_ = 0.0, dk_ = 0.0, drive_share_ = 1.0;
  bool trimmed_ = false;
  Envelope::Rows rows_{nullptr, 0, 0.0};  // the table the step reads
  Slope slope_{1.0, 0.0};
  int gear_ = 0;
  double cut_left_s_ = 0.0;  // drive cut still to run after an upshift
};

}  // namespace

namespace {
template <bool Axle>
SweepResult sweep_one(const Envelope& env, const Mesh& mesh, Sweep direction,
                      const std::vector<double>& limit, std::size_t start, double v_start) {
  namespace odeint = boost::numeric::odeint;
  SweepResult r;
  Sweeper<Axle> s(env, mesh, direction, limit, start, v_start, r);
  odeint::runge_kutta4<double> stepper;
  auto system = [&s](const double& u, double& dudx, double x) { dudx = s.rhs(u, x); };
  for (std::size_t k = 0, n = s.steps(); k < n; ++k) {
    double u = s.begin_step();
    stepper.do_step(system, u, 0.0, mesh.step_m);
    s.end_step(u);
  }
  s.finish();
  return r;
}

// Both sweeps in lockstep as one two-component state, (u_forward, u_backward): two independent
// chains of dependent arithmetic in one system keep the processor busier than one (each RK4
// stage waits on the last).
template <bool Axle>
void sweep_both(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                std::size_t f0, double vf, std::size_t b0, double vb, SweepResult& fwd,
                SweepResult& bwd) {
  namespace odeint = boost::numeric::odeint;
  using State = std::array<double, 2>;
  Sweeper<Axle> f(env, mesh, Sweep::forward, limit, f0, vf, fwd);
  Sweeper<Axle> b(env, mesh, Sweep::backward, limit, b0, vb, bwd);
  assert(f.steps() == b.steps());
  odeint::runge_kutta4<State> stepper;
  auto system = [&f, &b](const State& u, State& dudx, double x) {
    dudx[0] = f.rhs(u[0], x);
    dudx[1] = b.rhs(u[1], x);
  };
  for (std::size_t k = 0, steps = f.steps(); k < steps; ++k) {
    State u{f.begin_step(), b.begin_step()};
    stepper.do_step(system, u, 0.0, mesh.step_m);
    f.end_step(u[0]);
    b.end_step(u[1]);
  }
  f.finish();
  b.finish();
}
}  // namespace

SweepResult sweep(const Envelope& env, const Mesh& mesh, Sweep direction,
                  const std::vector<double>& limit, std::size_t start, double v_start) {
  return env.car().model == VehicleModel::axle
             ? sweep_one<true>(env, mesh, direction, limit, start, v_start)
             : sweep_one<false>(env, mesh, direction, limit, start, v_start);
}

Lap solve_lap(const Envelope& env, const Mesh& mesh, double start_speed_mps) {
  LapSolver solver;
  solver.solve(env, mesh, start_speed_mps);
  return solver.take();
}

const Lap& LapSolver::solve(const Envelope& env, const Mesh& mesh, double start_speed_mps,
                            bool channels) {
  const std::size_t n = mesh.size();
  assert(n >= 3);
  Lap& lap = lap_;
  steady_profile(env, mesh, lap.steady);
  const auto& steady = lap.steady.speed_mps;
  SweepResult& fwd = forward_;
  SweepResult& bwd = backward_;

  auto both = [&](std::size_t f0, double vf, std::size_t b0, double vb) {
    if (env.car().model == VehicleModel::axle)
      sweep_both<true>(env, mesh, steady, f0, vf, b0, vb, fwd, bwd);
    else
      sweep_both<false>(env, mesh, steady, f0, vf, b0, vb, fwd, bwd);
  };
  if (mesh.closed) {
    // Periodic lap: start both sweeps at the slowest steady point, where the speed is known.
    const std::size_t period = n - 1;
    const std::size_t i0 = static_cast<std::size_t>(
        std::min_element(steady.begin(), steady.begin() + static_cast<std::ptrdiff_t>(period)) -
        steady.begin());
    both(i0, steady[i0], i0, steady[i0]);
    // A sweep that comes round slower than it started (it could not regain the start speed)
    // runs once more from the speed it arrived at, so that the lap is periodic.
    if (fwd.speed_mps[i0] < steady[i0])
      fwd = sweep(env, mesh, Sweep::forward, steady, i0, fwd.speed_mps[i0]);
    if (bwd.speed_mps[i0] < steady[i0])
      bwd = sweep(env, mesh, Sweep::backward, steady, i0, bwd.speed_mps[i0]);
  } else {
    both(0, start_speed_mps, n - 1, steady[n - 1]);
  }

  lap.speed_mps.resize(n);
  lap.phase.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double v = std::min(fwd.speed_mps[i], bwd.speed_mps[i]);
    lap.speed_mps[i] = v;
    Phase ph;
    if (bwd.speed_mps[i] < fwd.speed_mps[i])
      ph = Phase::brake;
    else if (fwd.clipped[i])
      ph = lap.steady.limit[i] == SteadyLimit::grip ? Phase::corner : Phase::top_speed;
    else if (fwd.cut[i])
      ph = Phase::shift;
    else
      ph = Phase::accelerate;
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
  lap.has_channels = channels;
  if (!channels) {
    // Speed, phase and time only: what a study that needs the lap time reads.
    for (auto* v : {&lap.long_accel_mps2, &lap.lat_accel_mps2, &lap.engine_radps, &lap.drag_n,
                    &lap.downforce_n, &lap.front_load_n, &lap.rear_load_n, &lap.front_share,
                    &lap.aero_balance_eff, &lap.front_usage, &lap.rear_usage})
      v->clear();
    lap.gear.clear();
    lap.trimmed.clear();
    return lap;
  }

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
  lap.trimmed.resize(n);
  for (auto* v : {&lap.front_share, &lap.aero_balance_eff, &lap.front_usage, &lap.rear_usage})
    v->resize(n);
  const double inv_2ds = 0.5 / mesh.step_m;
  const double weight = m * g, m_eff = env.effective_mass_kg(), crr = env.rolling_resistance();
  for (std::size_t i = 0; i < n; ++i) {
    const double v = lap.speed_mps[i];
    // a = d(v^2)/(2 ds) over the interval that starts at i (the one ending at i for the last).
    const std::size_t a0 = (i + 1 < n) ? i : i - 1;
    const double ax =
        (lap.speed_mps[a0 + 1] * lap.speed_mps[a0 + 1] - lap.speed_mps[a0] * lap.speed_mps[a0]) *
        inv_2ds;
    lap.long_accel_mps2[i] = ax;
    lap.lat_accel_mps2[i] = v * v * mesh.curvature_1pm[i];
    // Under drive the gear the forward sweep engaged (held through a shift's cut); under
    // braking the best gear for the speed.
    const Powertrain& pt = car.powertrain;
    const int gear = pt.ideal ? 0 : (lap.phase[i] == Phase::brake ? env.gear(v) : fwd.gear[i]);
    lap.gear[i] = gear;
    lap.engine_radps[i] =
        pt.ideal ? 0.0
                 : std::clamp(v / car.tyres.rolling_radius_m *
                                  pt.gears[static_cast<std::size_t>(gear - 1)] * pt.final_drive,
                              pt.engine_radps.front(), pt.rev_limit_radps);
    const bool trimmed = env.trims(std::abs(mesh.curvature_1pm[i])) &&
                         (lap.phase[i] == Phase::accelerate || lap.phase[i] == Phase::top_speed ||
                          lap.phase[i] == Phase::shift);
    lap.trimmed[i] = trimmed;
    const Envelope::Sample row = env.sample(v, trimmed);
    const double drag = row.drag_coef * v * v, down = row.lift_coef * v * v;
    lap.drag_n[i] = drag;
    lap.downforce_n[i] = down;
    // Axle loads and what each axle carries (axle.hpp): the tyre force along the path is what
    // accelerates m_eff plus the resistance.
    const Slope slope(mesh, i);
    const AxleLoads loads = axle_loads(car, drag, down, row.balance, slope.cos, slope.sin, ax);
    lap.front_load_n[i] = loads.front_n;
    lap.rear_load_n[i] = loads.rear_n;
    lap.front_share[i] = loads.front_n / (loads.front_n + loads.rear_n);
    // Front share of the aero load with the drag moment (axle.hpp; the coefficients' rho / 2
    // cancels); NaN, written as an empty field, where there is no downforce to share.
    lap.aero_balance_eff[i] = aero_balance_with_drag_moment(row.lift_coef, row.drag_coef,
                                                            row.balance, car.drag_height_m, wb)
                                  .value_or(std::numeric_limits<double>::quiet_NaN());
    const double resistance = drag + crr * (weight * slope.cos + down) + weight * slope.sin;
    const AxleUsage use =
        axle_usage(env, loads, m_eff * ax + resistance, v * v * std::abs(mesh.curvature_1pm[i]));
    lap.front_usage[i] = use.front_usage;
    lap.rear_usage[i] = use.rear_usage;
  }
  return lap;
}

Lap LapSolver::take() {
  return std::move(lap_);
}

}  // namespace lapwing
