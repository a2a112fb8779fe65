#include "lapwing/solve/axle.hpp"

#include <boost/math/tools/roots.hpp>

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>

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

// The same upper root by Newton's method where one axle's limit sets phi: phi(a) =
// c_F left(L0 + dL a) + c_0 (all-wheel drive: over the axle's load) with the axle's load linear
// in a (axle_loads: a_x moves m a_x h / L between the axles) and its force left known with its
// slope (TyreModel::axle_long_left). Safeguarded as rtsafe is (Press et al., Numerical Recipes,
// 2nd ed., sec. 9.4; from memory): a bracket [lo, hi] with g(lo) >= 0 > g(hi) is kept, and a
// Newton step that leaves it is replaced by its midpoint (where the axle saturates its force
// left falls to 0 with an infinite slope, and plain Newton steps there cycle). Left of g's top
// (slope >= 0, an axle that gains load while its lateral force nearly fills it) the bracket's
// top is not known yet: a doubles. Converged when a Newton step is below 1e-10 m/s^2 (quadratic
// convergence: the root is then far closer than that) or the bracket is narrower than
// transfer_tolerance_mps2; the answer goes 2e-10 m/s^2 to the feasible side (the bracketing
// search's feasible end), never below lo. Three to five evaluations on the common path where
// the bracket search and TOMS 748 took ten to twenty. nullopt where g(0) < 0 or 60 steps do not
// settle: the caller takes the bracketing search.
// phi(a) and its slope as a quotient, slope_num / slope_den (slope_den > 0:
// TyreModel::LeftAndSlope), so that the Newton step a - g / g' with g' = (num - den) / den is
// a - g den / (num - den): one division on the chain from one iterate to the next, where the
// slope and then the step took one each. g' itself (for the tests on its sign and on how it
// moved) is worked beside it.
struct PhiSlope {
  double phi, slope_num, slope_den;
};
struct Step {
  double g, dg, next;
};
inline Step newton_step(const PhiSlope& p, double a) {
  const double g = p.phi - a, dg_num = p.slope_num - p.slope_den;
  return {g, dg_num / p.slope_den, a - g * p.slope_den / dg_num};
}
template <typename Phi>
std::optional<double> newton_upper_root(Phi phi) {
  constexpr double step_tolerance = 0.1 * transfer_tolerance_mps2;
  constexpr double feasible_side = 0.2 * transfer_tolerance_mps2;
  double lo = 0.0, hi = std::numeric_limits<double>::infinity(), a = 0.0;
  for (int k = 0; k < 60; ++k) {
    const PhiSlope p = phi(a);
    const auto [g, dg, newton] = newton_step(p, a);
    if (g >= 0.0) {
      if (k == 0 && g == 0.0 && !(dg > 0.0)) return 0.0;
      lo = std::max(lo, a);
    } else if (k == 0 || !(g < 0.0)) {
      return std::nullopt;  // infeasible at a = 0 (or NaN): the bracketing search decides
    } else {
      hi = std::min(hi, a);
    }
    if (hi - lo <= transfer_tolerance_mps2) return lo;
    double next;
    if (dg < 0.0) {
      next = newton;
      if (std::abs(next - a) <= step_tolerance) return std::max(lo, next - feasible_side);
    } else {
      next = std::isfinite(hi) ? 0.5 * (lo + hi) : std::max(2.0 * std::max(a, p.phi), 1e-3);
    }
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    a = next;
  }
  return std::nullopt;
}

// Whether a Newton iterate is settled a step early: where the last two steps s_(k-1), s_k show
// quadratic convergence (s_k at most 1e-3 s_(k-1): e_(k+1) = C e_k^2 with C ~ s_k / s_(k-1)^2),
// the error of the next iterate is about s_k^3 / s_(k-1)^2; at most 1e-13 m/s^2 (2 000 times
// under the 2e-10 the answer goes to the feasible side, where the iterates come from the other
// side: g is concave, its tangents lie above it), the evaluation that would confirm it is
// skipped. Measured on Brannock Park (sports car, exponent 2.2): the warm starts' steps run
// 1e-2, 2e-7, 1e-15 m/s^2, so the third of three evaluations goes.
// The estimate holds only where g' is smooth over the last step: across a kink (an inner tyre
// that lifts, mu at its floor) or near an axle's saturation (its force left falls to 0 with an
// infinite slope) the step ratio is no measure of the error, so g' must have moved by at most
// 1e-3 of itself over the last step (it moves by g'' s there, C s of itself).
inline bool settled(double step, double last_step, double dg, double last_dg) {
  constexpr double predicted_error = 1e-13;
  return std::isfinite(last_step) && step <= 1e-3 * last_step &&
         step * step * step <= predicted_error * last_step * last_step &&
         std::abs(dg - last_dg) <= 1e-3 * std::abs(dg);
}

// Warm start: the same Newton iteration from the last answer of this axle's fixed point (the
// neighbouring stage or step of a sweep: within a few per cent of this one), where a point of
// known sign brackets nothing yet on the other side. Two evaluations mostly (`settled` skips
// the one that would confirm the second), instead of four or five from a = 0. Where the iterate
// would leave what is known (an unbounded side, a step at g' >= 0 without a feasible point to
// its left), the cold start from a = 0 decides; so does an iterate below 0, the cold start's
// floor. The answer is the upper root of the feasible stretch that holds a = 0, and a hint
// from well above it can take a step past it into the stretch where the axle has nothing left
// (phi flat at the resistance's R / m, g not concave there), whose own root is no answer: a
// differential campaign's stale front hint of 8 m/s^2 settled on d = R / m = -0.30 m/s^2 down a
// 5 % slope, the front axle's usage 1.0022 with no braking force asked, where the answer from
// a = 0 is 1.89 (axle_test).
template <typename Phi>
std::optional<double> newton_from(Phi phi, double& hint) {
  constexpr double step_tolerance = 0.1 * transfer_tolerance_mps2;
  constexpr double feasible_side = 0.2 * transfer_tolerance_mps2;
  constexpr double inf = std::numeric_limits<double>::infinity();
  std::optional<double> r;
  if (hint > 0.0 && std::isfinite(hint)) {
    double lo = -inf, hi = inf, a = hint, last_step = inf, last_dg = 0.0;
    for (int k = 0; k < 8; ++k) {
      const auto [g, dg, next] = newton_step(phi(a), a);
      if (g >= 0.0)
        lo = std::max(lo, a);
      else if (g < 0.0)
        hi = std::min(hi, a);
      else
        break;
      if (!(dg < 0.0)) break;
      const double step = std::abs(next - a);
      if (step <= step_tolerance || settled(step, last_step, dg, last_dg)) {
        r = std::max(lo, next - feasible_side);
        if (*r < 0.0) r.reset();
        break;
      }
      if (!(next >= 0.0 && next > lo && next < hi)) break;
      a = next;
      last_step = step;
      last_dg = dg;
    }
  }
  if (!r) r = newton_upper_root(phi);
  if (r) hint = *r;
  return r;
}

// A term of the fixed point: phi(a) with its slope, and `surely(a)`, a test without powers that
// is true only where g(a) = phi(a) - a >= 0 beyond doubt (TyreModel::surely_leaves: the axle
// has the force a asks of it with room to spare), false where it cannot tell.
template <typename Phi, typename Surely>
struct Term {
  Phi phi;
  Surely surely;
  PhiSlope operator()(double a) const { return phi(a); }
};
template <typename Phi, typename Surely>
Term<Phi, Surely> term(Phi phi, Surely surely) {
  return {phi, surely};
}

// Whether a is feasible for one term: g(a) = phi(a) - a >= 0. Most checks are of an axle far
// from its limit (the undriven or unbraked side, the drive at the engine's limit): those the
// test without powers settles, and the answer is the same.
template <typename T>
bool feasible(const T& t, double a) {
  return t.surely(a) || t(a).phi - a >= 0.0;
}

// The least of `bound` and a term's upper root, where they meet its feasible interval: `bound`
// itself where the term allows it (g(bound) >= 0: bound lies in [lower root, upper root]),
// else the term's upper root found by newton_from, when that is below `bound`. nullopt where
// neither holds: the caller takes the bracketing search.
//
// `below` (the axle's flag in AxleHints): the last such call on this axle gave its root, below
// `bound` (a driven axle at its traction limit on a corner's exit, where the engine's bound
// lies above). Then the root comes first: the test of `bound`, which would fail (its power
// of the ellipse read for nothing: one evaluation in four there), is taken only where the root
// lies above `bound` or within `bound_margin` under it, and the answer is the same, to the bit,
// with the hint as the other order leaves it. With the feasible set an interval (g concave)
// whose top r* lies within newton_from's 2e-10 m/s^2 step to the feasible side (and its
// tolerance) above the root r it returns, g(bound) >= 0 with bound > r needs bound <= r*:
// bound more than bound_margin above r is infeasible for sure. g is not concave everywhere
// (where an inner tyre lifts, at the mu floor, and where the axle has nothing left and phi is
// flat at -R / m), and a warm start from well above the root could settle on that flat part's
// root, a = -R / m < 0 (found in review: invented cars with a 1 m centre of gravity); newton_from
// now starts afresh from 0 where its iterate would go below 0, and a root below 0 is never taken
// first, so the bound-first order decides there as well.
constexpr double bound_margin_mps2 = 1e-6;
template <typename Phi>
std::optional<double> lower_to(const Phi& phi, double& hint, double bound, bool* below = nullptr) {
  if (below && *below && std::isfinite(bound)) {
    const double before = hint;
    const std::optional<double> r = newton_from(phi, hint);
    // Only a root at or above 0 is the upper root of the interval that holds 0 (neither
    // newton_from nor newton_upper_root answers below 0; the test stays as the guard it was
    // before newton_from's iterates were kept at or above 0): a root where the axle has nothing
    // left (phi = -R / m, a = -R / m < 0: a saturated axle's flat phi, g not concave there) is
    // none, and a feasible bound above it is what the bound-first order returns.
    if (r && *r >= 0.0 && *r <= bound - bound_margin_mps2) return r;
    if (feasible(phi, bound)) {
      hint = before;  // the other order never solves for the root
      *below = false;
      return bound;
    }
    if (r && *r <= bound) return r;
    *below = false;
    return std::nullopt;
  }
  if (std::isfinite(bound) && feasible(phi, bound)) return bound;
  const std::optional<double> r = newton_from(phi, hint);
  if (r && *r <= bound) {
    if (below) *below = true;
    return r;
  }
  return std::nullopt;
}

}  // namespace

namespace {

// The forces each axle carries (usage 0 yet): fx >= 0 by the driven axle(s), all-wheel drive
// by load; braking by the brakes' front bias; fy by the static weight share.
AxleUsage split_forces(const Car& car, const AxleLoads& loads, double fx, double fy) {
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
  u.front_fy_n = fy * car.front_weight;
  u.rear_fy_n = fy - u.front_fy_n;
  return u;
}

}  // namespace

bool axle_surely_within(const Envelope& env, const AxleLoads& loads, double fx, double fy) {
  const AxleUsage u = split_forces(env.car(), loads, fx, fy);
  const TyreModel& t = env.tyres();
  const TransferPerNewton& d = env.transfer();
  return t.surely_leaves(loads.front_n, d.front * std::abs(fy), u.front_fy_n,
                         std::abs(u.front_fx_n)) &&
         t.surely_leaves(loads.rear_n, d.rear * std::abs(fy), u.rear_fy_n, std::abs(u.rear_fx_n));
}

AxleUsage axle_usage(const Envelope& env, const AxleLoads& loads, double fx, double fy) {
  const TyreModel& t = env.tyres();
  AxleUsage u = split_forces(env.car(), loads, fx, fy);
  const TransferPerNewton& d = env.transfer();
  auto usage = [&t](double load, double transfer, double fxa, double fya) {
    // An axle with no load (lifted, or at 0 to rounding: a rear-driven car's front at the
    // acceleration that unloads it) asked for nothing uses nothing; asked for a force it cannot
    // carry it at all: lifted_axle_usage stands for that (the lap's warning says so).
    if (!(load > 0.0)) return fxa == 0.0 && fya == 0.0 ? 0.0 : lifted_axle_usage;
    const TyreModel::Limits lim = t.axle_limits(load, transfer);
    return t.usage(std::abs(fxa) / lim.fx_max, std::abs(fya) / lim.fy_max);
  };
  u.front_usage = usage(loads.front_n, d.front * std::abs(fy), u.front_fx_n, u.front_fy_n);
  u.rear_usage = usage(loads.rear_n, d.rear * std::abs(fy), u.rear_fx_n, u.rear_fy_n);
  return u;
}

namespace {

// The forces at u on a point of curvature |k| (Envelope::road_forces), with the share of the
// weight the road carries normal to itself (axle_loads' c = N_body / W) and |F_y|.
struct Forces {
  double drag, down, balance, normal_share, resistance, fy, drive;
};
Forces forces_at(const Envelope& env, double u, double k, const Road& road, bool trimmed) {
  const Envelope::RoadForces f = env.road_forces(env.rows(trimmed), u, k, road);
  return {f.drag_n,       f.downforce_n,         f.balance, f.normal_share,
          f.resistance_n, std::abs(f.lateral_n), f.drive_n};
}

// The longitudinal force an axle has left at its load with `transfer` moved to its outer tyre,
// carrying lateral force fy.
double left_on(const TyreModel& t, double axle_load, double transfer, double fy) {
  if (!(axle_load > 0.0)) return 0.0;
  return t.long_force_left(t.axle_limits(axle_load, transfer), fy);
}

}  // namespace

double axle_drive_accel(const Envelope& env, double u, double k, const Road& road, double drive_n,
                        bool trimmed, AxleHints* hints) {
  AxleHints scratch;
  AxleHints& h = hints ? *hints : scratch;
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  const Forces a = forces_at(env, u, k, road, trimmed);
  const double fy = a.fy;
  const double fy_front = fy * car.front_weight, fy_rear = fy - fy_front;
  const double d_front = env.transfer().front * fy, d_rear = env.transfer().rear * fy;
  // Rotating inertia only where the engine limits (Gillespie, Fundamentals of Vehicle Dynamics,
  // ch. 2-3): the drive spins the rotating parts up too, (F_drive - R) = m_eff a; at the tyres'
  // limit the road force acts on m, (F_traction - R) = m a, and the engine supplies the wheels'
  // spin-up torque on top.
  const double inv_m = 1.0 / env.mass_kg();
  const double engine = (drive_n - a.resistance) / env.effective_mass_kg();
  const AxleLoads static_loads =
      axle_loads(car, a.drag, a.down, a.balance, a.normal_share, road.sin_slope, 0.0);
  // The front axle of a rear-driven car carries no drive but its share of the lateral force, on
  // a load that acceleration takes away (front = front(0) - m a h / L): it holds only while
  // front(a) stays in the stretch of loads around front(0) that hold fy_front, down to its least
  // (TyreModel::axle_load_holding_lateral), so a <= (front(0) - that load) L / (m h); where
  // front(0) holds no such force, the least load above it, a deceleration. The rear of a
  // front-driven car gains load under power: no bound there.
  double front_bound = std::numeric_limits<double>::infinity();
  if (car.powertrain.driven == DrivenAxle::rear && car.cg_height_m > 0.0)
    front_bound = (static_loads.front_n -
                   t.axle_load_holding_lateral(fy_front, d_front, static_loads.front_n)) *
                  car.wheelbase_m / (car.mass_kg * car.cg_height_m);
  // Fast path: the answer is the least of the engine's limit, the front's bound and each
  // driven axle's own fixed point (the upper root of a minimum of concave terms, where their
  // feasible intervals meet). Each axle is solved only where it refuses the least so far
  // (lower_to), by Newton from its last answer. Anything else takes the bracketing search below.
  {
    const AxleLoads l0 = static_loads;
    const double per_mps2 =
        car.mass_kg * car.cg_height_m / car.wheelbase_m;  // load moved per m/s^2
    const double total = l0.front_n + l0.rear_n;
    const bool by_load = car.powertrain.driven == DrivenAxle::all;
    const double m = env.mass_kg();
    auto driven = [&](double load0, double per_a, double d, double fy_axle) {
      return term(
          [&, load0, per_a, d, fy_axle](double ax) {
            const double load = load0 + per_a * ax;
            const TyreModel::LeftAndSlope s = t.axle_long_left(load, d, fy_axle);
            if (!by_load)
              return PhiSlope{(s.left_n - a.resistance) * inv_m, s.slope_num * per_a * inv_m,
                              s.slope_den};
            // All-wheel drive: the total this axle allows, left total / load.
            if (!(load > 0.0)) return PhiSlope{-a.resistance * inv_m, 0.0, 1.0};
            const double q = total / load;
            return PhiSlope{(s.left_n * q - a.resistance) * inv_m,
                            (s.per_load() * q - s.left_n * q / load) * per_a * inv_m, 1.0};
          },
          // phi(a) >= a: the axle leaves m a + R (its load's share of it, all-wheel drive).
          [&, load0, per_a, d, fy_axle](double ax) {
            const double load = load0 + per_a * ax;
            const double need = m * ax + a.resistance;
            return t.surely_leaves(load, d, fy_axle, by_load ? need * load / total : need);
          });
    };
    const auto front = driven(l0.front_n, -per_mps2, d_front, fy_front);
    const auto rear = driven(l0.rear_n, per_mps2, d_rear, fy_rear);
    const double bound = std::min(engine, front_bound);
    std::optional<double> r;
    switch (car.powertrain.driven) {
      case DrivenAxle::rear:
        r = lower_to(rear, h.rear, bound, &h.rear_below);
        break;
      case DrivenAxle::front:
        r = lower_to(front, h.front, bound, &h.front_below);
        break;
      case DrivenAxle::all: {
        const std::optional<double> rf = lower_to(front, h.front, bound, &h.front_below);
        if (rf) {
          r = lower_to(rear, h.rear, *rf, &h.rear_below);
          if (r && *r != *rf && !feasible(front, *r)) r.reset();
        }
        break;
      }
    }
    if (r) return *r;
  }
  return transfer_fixed_point([&](double ax) {
    const AxleLoads l =
        axle_loads(car, a.drag, a.down, a.balance, a.normal_share, road.sin_slope, ax);
    double traction = 0.0;
    switch (car.powertrain.driven) {
      case DrivenAxle::rear:
        traction = left_on(t, l.rear_n, d_rear, fy_rear);
        break;
      case DrivenAxle::front:
        traction = left_on(t, l.front_n, d_front, fy_front);
        break;
      case DrivenAxle::all: {
        // The drive shared by load (as axle_usage shares it): the largest total that neither
        // axle refuses, min(left_f N / front, left_r N / rear).
        const double total = l.front_n + l.rear_n;
        traction = l.front_n > 0.0 && l.rear_n > 0.0
                       ? std::min(left_on(t, l.front_n, d_front, fy_front) * total / l.front_n,
                                  left_on(t, l.rear_n, d_rear, fy_rear) * total / l.rear_n)
                       : 0.0;
        break;
      }
    }
    return std::min({engine, (traction - a.resistance) * inv_m, front_bound});
  });
}

double axle_brake_accel(const Envelope& env, double u, double k, const Road& road,
                        AxleHints* hints) {
  AxleHints scratch;
  AxleHints& h = hints ? *hints : scratch;
  const Car& car = env.car();
  const TyreModel& t = env.tyres();
  const Forces a = forces_at(env, u, k, road, false);
  const double fy = a.fy;
  const double fy_front = fy * car.front_weight, fy_rear = fy - fy_front;
  const double d_front = env.transfer().front * fy, d_rear = env.transfer().rear * fy;
  const double bias = car.brake_front_bias;
  // Braking at the tyres' limit decelerates m: the brakes spin the wheels down (as in drive).
  const double inv_m = 1.0 / env.mass_kg();
  // Fast path: each axle's own fixed point (the front gains m h / L per m/s^2 of deceleration,
  // the rear loses it), the smaller the answer; the axle that set the last answer is solved
  // first, and the other only where it refuses that (lower_to).
  {
    const AxleLoads l0 =
        axle_loads(car, a.drag, a.down, a.balance, a.normal_share, road.sin_slope, 0.0);
    const double per_mps2 = car.mass_kg * car.cg_height_m / car.wheelbase_m;
    const double m = env.mass_kg();
    auto axle = [&](double load0, double per_a, double d, double fy_axle, double share) {
      return term(
          [&, load0, per_a, d, fy_axle, inv_share = 1.0 / share](double decel) {
            const TyreModel::LeftAndSlope s = t.axle_long_left(load0 + per_a * decel, d, fy_axle);
            return PhiSlope{(s.left_n * inv_share + a.resistance) * inv_m,
                            s.slope_num * per_a * inv_share * inv_m, s.slope_den};
          },
          // phi(decel) >= decel: the axle leaves its share of m decel - R.
          [&, load0, per_a, d, fy_axle, share](double decel) {
            return t.surely_leaves(load0 + per_a * decel, d, fy_axle,
                                   share * (m * decel - a.resistance));
          });
    };
    const auto front = axle(l0.front_n, per_mps2, d_front, fy_front, bias);
    const auto rear = axle(l0.rear_n, -per_mps2, d_rear, fy_rear, 1.0 - bias);
    const bool rear_first = h.rear_binds;
    const auto& first = rear_first ? rear : front;
    const auto& second = rear_first ? front : rear;
    double& hint_first = rear_first ? h.rear : h.front;
    double& hint_second = rear_first ? h.front : h.rear;
    const double inf = std::numeric_limits<double>::infinity();
    const std::optional<double> r1 = lower_to(first, hint_first, inf);
    if (r1) {
      const std::optional<double> r2 = lower_to(second, hint_second, *r1);
      if (r2 && *r2 == *r1) return *r1;
      if (r2 && feasible(first, *r2)) {
        h.rear_binds = !rear_first;
        return *r2;
      }
    } else {
      // The first axle has no upper root the Newton iteration finds: its force left grows
      // faster than the deceleration asks (with no load sensitivity the front's capacity grows
      // with the load it gains, beyond 1 m/s^2 per m/s^2 where mu h / (L bias) > 1), so the
      // other axle bounds the answer. The next solve starts there, where this one fails after
      // sixty doublings on every call (found in review: a front-driven car with cg 0.8 m, bias
      // 0.4 and no load sensitivity took three times as long a point).
      h.rear_binds = !rear_first;
    }
  }
  return transfer_fixed_point([&](double decel) {
    const AxleLoads l =
        axle_loads(car, a.drag, a.down, a.balance, a.normal_share, road.sin_slope, -decel);
    // Braking force F splits bias F front, (1 - bias) F rear: the largest F neither axle refuses.
    const double brake = std::min(left_on(t, l.front_n, d_front, fy_front) / bias,
                                  left_on(t, l.rear_n, d_rear, fy_rear) / (1.0 - bias));
    return (brake + a.resistance) * inv_m;
  });
}

double axle_steady_excess(const Envelope& env, double v, double k, const Road& road, bool trimmed) {
  const double u = v * v;
  const Forces a = forces_at(env, u, k, road, trimmed);
  const AxleLoads l =
      axle_loads(env.car(), a.drag, a.down, a.balance, a.normal_share, road.sin_slope, 0.0);
  const AxleUsage use = axle_usage(env, l, a.resistance, a.fy);
  return std::max(use.front_usage, use.rear_usage) - 1.0;
}

}  // namespace lapwing
