#include "lapwing/solve/solver.hpp"

#include <boost/math/tools/roots.hpp>

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>
#include <memory>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <tuple>
#include <type_traits>
#include <utility>

#include "lapwing/base/error.hpp"
#include "lapwing/base/exp_ratio.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/base/memory.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/solve/axle.hpp"
#include "lapwing/solve/level_tables.hpp"

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

// The road at mesh points (model/loads.hpp): the slope's cos and sin from the mesh's grade
// (grade = tan(angle): cos = 1 / sqrt(1 + grade^2), sin = grade cos), the bank's taken in the
// direction of the point's turn (the mesh's bank helps a left turn: a right turn sees it negated;
// a straight as given) and the head wind. Grade and bank are piecewise constant along segments:
// their cos and sin are worked again only where they differ from the last point read, not at
// every point (a reader per pass, so that each keeps its own last point).
class RoadReader {
 public:
  explicit RoadReader(const Mesh& m) : m_(m) {}
  [[gnu::always_inline]] Road operator()(std::size_t i) {
    const double grade = m_.grade_at(i), bank = m_.bank_at(i);
    if (!(grade == grade_)) {
      grade_ = grade;
      cos_slope_ = 1.0 / std::sqrt(1.0 + grade * grade);
      sin_slope_ = grade * cos_slope_;
    }
    if (!(bank == bank_)) {
      bank_ = bank;
      cos_bank_ = std::cos(bank);
      sin_bank_ = std::sin(bank);
    }
    const double turn = m_.curvature_1pm[i] < 0.0 ? -1.0 : 1.0;
    return {cos_slope_, sin_slope_, cos_bank_, turn * sin_bank_, m_.head_wind_at(i)};
  }
  /// What operator() gives at point i of a level mesh (level_mesh: no grade, bank or head wind
  /// anywhere), without reading the mesh but for the turn's sign: the level road in still air,
  /// its bank's sine a zero of that sign.
  [[gnu::always_inline]] Road level(std::size_t i) const {
    return {1.0, 0.0, 1.0, (m_.curvature_1pm[i] < 0.0 ? -1.0 : 1.0) * 0.0, 0.0};
  }

 private:
  const Mesh& m_;
  double grade_ = std::numeric_limits<double>::quiet_NaN(), cos_slope_ = 1.0, sin_slope_ = 0.0;
  double bank_ = std::numeric_limits<double>::quiet_NaN(), cos_bank_ = 1.0, sin_bank_ = 0.0;
};
bool same_road(const Road& a, const Road& b) {
  return a.cos_slope == b.cos_slope && a.sin_slope == b.sin_slope && a.cos_bank == b.cos_bank &&
         a.sin_bank == b.sin_bank && a.head_wind_mps == b.head_wind_mps;
}

// Bracketing tolerance for steady speeds: 36 bits, about 1e-11 relative.
constexpr int steady_bits = 36;

// A sweep that lands within this share of the limit is on it: the steady limit is known to
// 2^-36 of itself and the axle model's accelerations to 1e-9 m/s^2, and a forward sweep that
// settles on a limit where the drive is exactly spent (a = 0 there) lands a rounding error under
// it or over it. Without the margin such a point read `accelerate` or `corner` by the sign of
// that error, and a hairpin's limit with it.
constexpr double clip_tolerance = 1e-9;

// The forces along the path at speed v on a point of curvature |kappa| and its road: what the
// tyres have left for Fx after the lateral demand (friction ellipse; m v^2 |kappa| on a flat
// road), the resistance (drag + rolling + grade), and the drive in the best gear. One table
// read (Envelope::road_forces).
struct PathForces {
  double grip_left_n, resistance_n, drive_n;
};
[[gnu::always_inline]] inline PathForces path_forces(const Envelope& env,
                                                     const Envelope::Rows& rows, double v2,
                                                     double abs_curvature, const Road& road) {
  const Envelope::RoadForces f = env.road_forces(rows, v2, abs_curvature, road);
  // No load on the road (off camber, faster than the bank lets the tyres touch): no grip. The
  // limits of a negative load are negative, and the ellipse's squares would lose their sign.
  if (!(f.normal_n > 0.0)) return {0.0, f.resistance_n, f.drive_n};
  const TyreModel::Limits lim = env.tyres().limits(f.normal_n);
  return {env.tyres().long_force_left(lim, f.lateral_n), f.resistance_n, f.drive_n};
}

// The model's accelerations (m/s^2) at u = v^2 on a point of curvature |k|, positive along the
// sweep's own direction of travel. The rotating parts' inertia counts only where the engine
// limits (Gillespie, Fundamentals of Vehicle Dynamics, ch. 2-3):
//   drive:   a = min((share x drive - R) / m_eff, (grip left - R) / m)
//   braking: a = (grip left + R) / m
// at the tyres' limit the road force acts on m, and the engine (or the brakes) supply the torque
// that spins the wheels up (or down). The axle model's forms are in axle.hpp.
struct InverseMass {
  double m, m_eff;  // 1 / m, 1 / m_eff: no division per stage
};
//
// `straight`: a level straight in still air (curvature 0 over the step, no grade, bank or head
// wind), where the axle model's accelerations depend on u alone and its Envelope has them in
// tables (solve/level_tables.hpp). Braking reads its table. Under drive the engine's limit is
// worked as axle_drive_accel works it, and the table gives the tyres' (the largest acceleration
// they allow with no limit from the engine); the smaller is the answer, the model's to the
// table's tolerance. Within `straight_margin` of each other, or where the table has no cell, the
// model decides.
constexpr double straight_margin = 1e-6;  // m/s^2: 100 x LevelTables::tolerance_mps2
// No grade, bank or head wind anywhere on the mesh (the Sweeper's `Level`).
bool level_mesh(const Mesh& m) {
  return m.grade.empty() && m.bank_rad.empty() && m.head_wind_mps.empty();
}
bool level_in_still_air(const Road& r) {
  return r.sin_slope == 0.0 && r.sin_bank == 0.0 && r.cos_slope == 1.0 && r.cos_bank == 1.0 &&
         r.head_wind_mps == 0.0;
}
// The same where the forces at u are known (`f`: Envelope::road_forces on the rows of `trimmed`
// at curvature 0 on the straight's road), as the channels pass has them at each point.
[[gnu::always_inline]] inline bool straight_drive_on(const Envelope& env,
                                                     const Envelope::RoadForces& f, double u,
                                                     bool trimmed, double drive_share,
                                                     double& out) {
  const LevelTables& t = *env.level_tables();
  double grip;
  if (!(trimmed ? t.grip_trimmed : t.grip).at(u, grip)) return false;
  const double engine = (drive_share * f.drive_n - f.resistance_n) / env.effective_mass_kg();
  if (engine >= 0.0 && engine <= grip - straight_margin) {
    out = engine;  // as axle_drive_accel: the engine's limit, which the tyres allow
    return true;
  }
  if (engine >= grip + straight_margin) {
    out = grip;
    return true;
  }
  return false;
}
[[gnu::always_inline]] inline bool straight_drive(const Envelope& env, const Envelope::Rows& rows,
                                                  double u, const Road& road, bool trimmed,
                                                  double drive_share, double& out) {
  return straight_drive_on(env, env.road_forces(rows, u, 0.0, road), u, trimmed, drive_share, out);
}
template <bool Axle>
[[gnu::always_inline]] inline double drive_accel(const Envelope& env, const Envelope::Rows& rows,
                                                 double u, double k, const Road& road, bool trimmed,
                                                 double drive_share, const InverseMass& inv,
                                                 AxleHints* hints = nullptr,
                                                 bool straight = false) {
  if constexpr (Axle) {
    double a;
    if (straight && straight_drive(env, rows, u, road, trimmed, drive_share, a)) return a;
    return axle_drive_accel(env, u, k, road, drive_share * rows.at(u).drive_n, trimmed, hints);
  } else {
    const PathForces f = path_forces(env, rows, u, k, road);
    return std::min((drive_share * f.drive_n - f.resistance_n) * inv.m_eff,
                    (f.grip_left_n - f.resistance_n) * inv.m);
  }
}
template <bool Axle>
[[gnu::always_inline]] inline double brake_accel(const Envelope& env, const Envelope::Rows& rows,
                                                 double u, double k, const Road& road,
                                                 const InverseMass& inv, AxleHints* hints = nullptr,
                                                 bool straight = false) {
  if constexpr (Axle) {
    double a;
    if (straight && env.level_tables()->brake.at(u, a)) return a;
    return axle_brake_accel(env, u, k, road, hints);
  } else {
    const PathForces f = path_forces(env, rows, u, k, road);
    return (f.grip_left_n + f.resistance_n) * inv.m;
  }
}

std::string where(const Mesh& mesh, std::size_t i) {
  std::ostringstream os;
  os.precision(6);
  os << mesh.s_m[i] << " m";
  return os.str();
}

// Highest v in [0, v_max] with f(v) <= 0, for f <= 0 at 0 and monotone enough to have one
// crossing; f(v_max) <= 0 gives v_max. `hint` (a guess of the answer: the previous mesh
// point's, or one extrapolated from the last two; 0 for none) first tries a bracket of
// +-`width` of itself, then one of +-2 %, which neighbouring points nearly always share; the
// narrower the bracket, the fewer steps TOMS 748 takes to 2^-36 of the answer.
// Where f > 0 at 0 (the car cannot hold a standstill there: its drive with the clutch slipping
// below the resistance of a steep grade or of a very heavy car, or tyres that hold it only with
// downforce) it may still hold a speed higher up: `infeasible_start_samples` speeds from v_max
// down are tried, and the highest that holds is the foot of the bracket (0, none holding). It
// answered 0 there, and a flying start at a speed the car holds was refused as "cannot hold
// any speed" (a robustness campaign's finding: a torque curve weak below 5 000 rpm only).
constexpr int infeasible_start_samples = 64;
template <typename F>
double highest_feasible(F f, double v_max, double hint, double width = 0.02) {
  namespace tools = boost::math::tools;
  const double f_hi = f(v_max);
  if (f_hi <= 0.0) return v_max;
  std::uintmax_t iters = 100;
  if (hint > 0.0 && hint < v_max) {
    for (const double w : {width, 0.02}) {
      const double a = (1.0 - w) * hint, b = std::min((1.0 + w) * hint, v_max);
      const double fa = f(a);
      if (fa <= 0.0) {
        const double fb = f(b);
        if (fb > 0.0)
          return tools::toms748_solve(f, a, b, fa, fb, tools::eps_tolerance<double>(steady_bits),
                                      iters)
              .first;
      }
      if (w >= 0.02) break;
    }
  }
  const double f_lo = f(0.0);
  if (f_lo > 0.0) {
    double above = v_max, f_above = f_hi;
    for (int k = infeasible_start_samples - 1; k >= 1; --k) {
      const double v = v_max * k / infeasible_start_samples;
      const double fv = f(v);
      if (fv <= 0.0)
        return tools::toms748_solve(f, v, above, fv, f_above,
                                    tools::eps_tolerance<double>(steady_bits), iters)
            .first;
      above = v;
      f_above = fv;
    }
    return 0.0;
  }
  // The feasible end of the final bracket.
  return tools::toms748_solve(f, 0.0, v_max, f_lo, f_hi, tools::eps_tolerance<double>(steady_bits),
                              iters)
      .first;
}

// Whether the tyres hold the car at v on a point of curvature |curv| and its road: their usage
// less 1 (<= 0: they do), (|R| / Fx_max)^n + (|F_y| / Fy_max)^n with R the resistance that
// holds v and F_y the lateral demand (m v^2 |kappa| on a flat road); with the axle model on
// the axle that saturates first (axle_steady_excess). The steady grip limit's test, and the
// level-road traction limit's.
double grip_excess(const Envelope& env, bool axle, double v, double curv, const Road& road,
                   bool trimmed) {
  if (axle) return axle_steady_excess(env, v, curv, road, trimmed);
  const TyreModel& tyres = env.tyres();
  const Envelope::RoadForces f = env.road_forces(env.rows(trimmed), v * v, curv, road);
  // No load on the road: the tyres hold nothing (as axle_usage reads a lifted axle). Above the
  // speed where an off-camber bank steeper than atan(1/mu) lifts the car, the ratios' signs
  // would otherwise cancel in the ellipse's squares (or read 0 in its powers) and call a car
  // with no load on its tyres held: the search then took the top of the table.
  if (!(f.normal_n > 0.0))
    return f.lateral_n == 0.0 && f.resistance_n == 0.0 ? -1.0 : lifted_axle_usage;
  return tyres.usage(std::abs(f.resistance_n) / tyres.fx_max(f.normal_n),
                     std::abs(f.lateral_n) / tyres.fy_max(f.normal_n)) -
         1.0;
}

// The grip limit's guess at a point of curvature `k` from the last two points of the same road
// (k1, v1 the last, k0, v0 the one before): w = 1 / v^2 is nearly affine in |kappa| (mu (m g +
// L v^2) = m v^2 kappa gives w = (m kappa - mu L) / (mu m g), L the downforce per v^2), so its
// straight-line extrapolation lands within some 1e-4 of the answer along a clothoid, where the
// curvature changes at every point. 0 (no guess) where the two do not make a line.
double extrapolated_grip(double k, double k1, double v1, double k0, double v0) {
  if (!(v1 > 0.0 && v0 > 0.0) || !(k1 != k0)) return 0.0;
  const double w1 = 1.0 / (v1 * v1), w0 = 1.0 / (v0 * v0);
  const double w = w1 + (w1 - w0) * (k - k1) / (k1 - k0);
  return w > 0.0 ? 1.0 / std::sqrt(w) : 0.0;
}
// The bracket tried first around an extrapolated guess.
constexpr double extrapolated_width = 2e-4;

// The axle model's lift limit at a point of curvature |k| and its road, on the rows given: the
// highest speed at which both axle loads at a_x = 0 (axle_loads) stay above zero, and the axle
// whose load reaches zero there (the lighter one at the tables' top). {v_max, grip} where
// neither reaches zero up to the tables' top: one evaluation, as on every road of the bundled
// cars.
LevelLift lift_speed(const Envelope& env, const Envelope::Rows& rows, double k, const Road& road) {
  const Car& car = env.car();
  auto loads = [&](double v) {
    const Envelope::RoadForces f = env.road_forces(rows, v * v, k, road);
    return axle_loads(car, f.drag_n, f.downforce_n, f.balance, f.normal_share, road.sin_slope, 0.0);
  };
  const double v_max = env.max_speed_mps();
  const AxleLoads top = loads(v_max);
  if (top.front_n > 0.0 && top.rear_n > 0.0) return {v_max, SteadyLimit::grip};
  const SteadyLimit axle =
      top.front_n <= top.rear_n ? SteadyLimit::front_lift : SteadyLimit::rear_lift;
  const double v = highest_feasible(
      [&](double s) {
        const AxleLoads l = loads(s);
        return -std::min(l.front_n, l.rear_n);
      },
      v_max, 0.0);
  return {v, axle};
}

}  // namespace

namespace {

// A lap on two threads (LapSolver::set_threads) puts its sweeps and its passes' halves apart on
// meshes of at least this many points: a thread's start and join cost some 25 microseconds here
// (measured), what a few hundred points of a sweep take.
constexpr std::size_t min_points_apart = 2000;

// `engine` false leaves the engine's limit out (the tyres' and the axles' alone: what a car
// above the engine's top speed is held to, LapSolver::speed_pass). Returns whether the engine's
// limit at some point is below the limit at the point before it (`drops`, steady_points).
bool steady_halves(const Envelope& env, const Mesh& mesh, SteadyProfile& p, SecondThread* second,
                   bool engine = true);
void steady_points(const Envelope& env, const Mesh& mesh, SteadyProfile& p, std::size_t lo,
                   std::size_t hi, bool engine, bool& drops);

}  // namespace

SteadyProfile steady_profile(const Envelope& env, const Mesh& mesh) {
  SteadyProfile p;
  steady_profile(env, mesh, p);
  return p;
}

void steady_profile(const Envelope& env, const Mesh& mesh, SteadyProfile& p) {
  steady_halves(env, mesh, p, nullptr);
}

namespace {

bool steady_halves(const Envelope& env, const Mesh& mesh, SteadyProfile& p, SecondThread* second,
                   bool engine) {
  const std::size_t n = mesh.size();
  resize_ready({&p.speed_mps}, n, second);
  p.limit.resize(n);
  std::array<bool, 2> drops{false, false};  // each half's own (the halves may run apart)
  in_halves(n, second, [&](std::size_t lo, std::size_t hi) {
    steady_points(env, mesh, p, lo, hi, engine, drops[lo == 0 ? 0 : 1]);
  });
  // And where the halves meet.
  const std::size_t mid = n / 2;
  return drops[0] || drops[1] ||
         (mid > 0 && mid < n && p.limit[mid] == SteadyLimit::engine &&
          p.speed_mps[mid] < p.speed_mps[mid - 1]);
}

// The steady limits of points lo to hi (not included), each half of the mesh from a fresh start
// (no answer carried in from the point before lo). `Level`: as the Sweeper's (level_mesh).
// Where a car cannot hold any speed: "on this grade" where the road has one, "even on the level"
// where it is level (a bank or a head wind named where there is one).
std::string road_words(const Road& road) {
  if (road.sin_slope != 0.0) return "on this grade";
  if (road.sin_bank != 0.0) return "on this bank";
  if (road.head_wind_mps != 0.0) return "in this wind";
  return "even on the level";
}

// `drops` is set where a point's limit is the engine's and below the limit at the point before
// it (a steeper grade, a trim zone's end, a head wind): a car there may arrive faster than its
// drive holds (LapSolver::speed_pass).
template <bool Level>
void steady_points_as(const Envelope& env, const Mesh& mesh, SteadyProfile& p, std::size_t lo,
                      std::size_t hi, bool engine, bool& drops) {
  const double v_max = env.max_speed_mps();
  const bool axle = env.car().model == VehicleModel::axle;
  const LevelTables* tables = axle ? env.level_tables() : nullptr;
  double last_curv = std::nan("");
  Road last_road{std::nan(""), 0.0, 0.0, 0.0, 0.0};
  bool last_trimmed = false;
  double v_engine = 0.0, v_grip = 0.0, v_lift = 0.0;
  SteadyLimit lift_axle = SteadyLimit::grip;  // grip: no axle lifts below the tables' top
  double prev_curv = 0.0, prev_grip = 0.0;    // the point before the last whose grip was solved
  bool have_two = false;
  double speed = 0.0;                     // the last point's limit (p.speed_mps[i - 1])
  SteadyLimit limit = SteadyLimit::grip;  // and its kind (p.limit[i - 1])
  RoadReader road_at(mesh);
  for (std::size_t i = lo; i < hi; ++i) {
    // A point in the same state as the one before it (the same signed curvature, road and trim
    // zone: most points of a straight or an arc) has the same limit; the loop below would find
    // nothing changed there.
    if (i > lo && mesh.curvature_1pm[i] == mesh.curvature_1pm[i - 1] &&
        (Level ||
         (mesh.grade_at(i) == mesh.grade_at(i - 1) && mesh.bank_at(i) == mesh.bank_at(i - 1) &&
          mesh.head_wind_at(i) == mesh.head_wind_at(i - 1))) &&
        mesh.trim_zone[i] == mesh.trim_zone[i - 1]) {
      // From registers: a copy from the point before would wait on that point's store.
      p.speed_mps[i] = speed;
      p.limit[i] = limit;
      continue;
    }
    const double curv = std::abs(mesh.curvature_1pm[i]);
    const Road road = road_at(i);
    const bool road_changed = !same_road(road, last_road);
    // The engine's limit is reached under full drive, where the straight-line trim applies.
    const bool trimmed = env.trims(curv) && mesh.trim_zone[i];
    // A bank makes the normal load, and with it the rolling resistance, depend on the curvature.
    if (road_changed || trimmed != last_trimmed || (road.sin_bank != 0.0 && curv != last_curv)) {
      // Engine: drive in the best gear >= resistance, the top speed on this road (from rest up).
      const Envelope::Rows rows = env.rows(trimmed);
      const auto short_n = [&](double v) {
        const Envelope::RoadForces f = env.road_forces(rows, v * v, curv, road);
        return f.resistance_n - f.drive_n;
      };
      v_engine = engine ? engine_from_rest(env, trimmed, road, short_n,
                                           highest_feasible(short_n, v_max, v_engine), steady_bits)
                        : std::numeric_limits<double>::infinity();
      // Axles (axle model): the highest speed at which both keep some load at a_x = 0.
      if (axle) {
        const LevelLift l = lift_speed(env, rows, curv, road);
        v_lift = l.speed_mps;
        lift_axle = l.axle;
      }
    }
    last_trimmed = trimmed;
    if (road_changed || curv != last_curv) {
      // The guess: extrapolated along a clothoid (two earlier points on this road), else the
      // last answer.
      const bool line = !road_changed && have_two && curv != last_curv;
      const double guess =
          line ? extrapolated_grip(curv, last_curv, v_grip, prev_curv, prev_grip) : 0.0;
      prev_curv = last_curv;
      prev_grip = v_grip;
      have_two = !road_changed;
      const double hint = guess > 0.0 ? guess : v_grip;
      const double width = guess > 0.0 ? extrapolated_width : 0.02;
      // Tyres (grip_excess). On a level road in still air the axle model's Envelope has the
      // grip limit in a table (LevelTables::steady_grip_speed).
      double v_table = 0.0;
      // The table's search starts at the guess's node (nodes lateral_du apart in u = v^2; a
      // guess beyond the last node, none).
      std::size_t grip_cell = 0;
      const double u_guess = hint * hint;
      if (tables && hint > 0.0 &&
          u_guess < static_cast<double>(tables->lateral_nodes.size()) * tables->lateral_du)
        grip_cell = static_cast<std::size_t>(u_guess / tables->lateral_du);
      const bool level_road = tables && level_in_still_air(road);
      if (level_road && tables->grip_holds_at_top(curv))
        v_grip = v_max;  // what the search finds there (LevelTables::grip_holds_at_top)
      else if (level_road && tables->steady_grip_speed(curv, v_table, &grip_cell))
        v_grip = v_table;
      else
        v_grip =
            highest_feasible([&](double v) { return grip_excess(env, axle, v, curv, road, false); },
                             v_max, hint, width);
    }
    last_road = road;
    last_curv = curv;
    if (v_grip < v_engine) {
      p.speed_mps[i] = v_grip;
      p.limit[i] = SteadyLimit::grip;
    } else {
      p.speed_mps[i] = v_engine;
      p.limit[i] = SteadyLimit::engine;
    }
    // Only strictly below the others: where an axle asked for a lateral force lifts, the tyres'
    // limit is the same speed (axle_usage reads the lifted axle), and stays `grip`.
    if (lift_axle != SteadyLimit::grip && v_lift < p.speed_mps[i]) {
      p.speed_mps[i] = v_lift;
      p.limit[i] = lift_axle;
    }
    if (i > lo && p.limit[i] == SteadyLimit::engine && p.speed_mps[i] < speed) drops = true;
    speed = p.speed_mps[i];
    limit = p.limit[i];
    if (!(p.speed_mps[i] > 0.0))
      throw CannotMove("the car cannot hold any speed at " + where(mesh, i) + " (" +
                       (p.limit[i] == SteadyLimit::engine
                            ? "drive never exceeds the resistance " + road_words(road)
                        : lift_limit(p.limit[i])
                            ? (p.limit[i] == SteadyLimit::front_lift ? "the front" : "the rear") +
                                  std::string(" axle has no load ") + road_words(road)
                            : "the tyres cannot hold the car " + road_words(road)) +
                       ")");
  }
}
void steady_points(const Envelope& env, const Mesh& mesh, SteadyProfile& p, std::size_t lo,
                   std::size_t hi, bool engine, bool& drops) {
  if (level_mesh(mesh))
    steady_points_as<true>(env, mesh, p, lo, hi, engine, drops);
  else
    steady_points_as<false>(env, mesh, p, lo, hi, engine, drops);
}

}  // namespace

LevelLift level_lift_speed(const Envelope& env) {
  if (env.car().model != VehicleModel::axle) return {env.max_speed_mps(), SteadyLimit::grip};
  return lift_speed(env, env.rows(env.has_trim()), 0.0, Road{});
}

double level_traction_speed_mps(const Envelope& env) {
  const Road level{};
  // With the straight-line trim where the config has one, as Envelope's level top speed.
  const bool trimmed = env.has_trim();
  const bool axle = env.car().model == VehicleModel::axle;
  return highest_feasible([&](double v) { return grip_excess(env, axle, v, 0.0, level, trimmed); },
                          env.max_speed_mps(), 0.0);
}

namespace {

// The exponential step's secant (exponential_step, below): its relative floor and its reach.
constexpr double slope_spread = 1e-5;
constexpr double secant_reach = 2.0 / 3.0;
// Deceleration by the resistance alone (m/s^2) above which a held backward step's braking is
// surely positive: a thousand times the axle model's tolerance (1e-9 m/s^2) and thirty times
// the straight-line tables' (3e-8 m/s^2), so that neither can turn it.
constexpr double held_margin_mps2 = 1e-6;
// How far above the engine's steady limit (relative) a car slowing at full drive towards it
// must be for the sweeps to leave that limit out (LapSolver::speed_pass): 1e-7, ten thousand
// times the steady limits' root tolerance (steady_bits), so that no rounding starts a stretch,
// and where the stretch ends the sweeps hold the car down to the limit by at most that much
// (some 1e-4 g over a 0.5 m step at 300 km/h, against the 1e-3 g of the slowing there).
constexpr double engine_above_tolerance = 1e-7;
// The backward sweep's steps over a stretch where it is above the forward sweep
// (Sweeper::skippable): taken at once where braking on the level decelerates by at least this
// much at any speed (Envelope::level_resistance_floor_mps2; some 0.13 m/s^2 for the bundled
// cars, whose rolling resistance is 0.013): every step then raises u by 2 x 0.01 x the step
// or more, 1e-2 m^2/s^2 at 0.5 m, some 5 000 times the straight-line step tables' error and
// far beyond the integrator's. And the relative margin on the speeds compared there.
constexpr double skip_floor_mps2 = 0.01;
constexpr double skip_margin = 1e-12;

// One sweep, one step at a time, so that the forward and the backward sweep can advance in
// lockstep: two independent chains of dependent arithmetic keep the processor busier than one
// (each RK4 stage waits on the last). Forward and backward differ only in the acceleration.
// `Axle` picks the vehicle model at compile time (one branch per lap, none per stage).
// `Level`: the mesh has no grade, bank or head wind anywhere (level_mesh): every point's road
// is the level one in still air, known without reading the mesh, and every step's road the
// same as the last.
template <bool Axle, bool Level>
class Sweeper {
  SweepResult& r_;

 public:
  Sweeper(const Envelope& env, const Mesh& mesh, Sweep direction, const std::vector<double>& limit,
          std::size_t start, double v_start, SweepResult& out, const StepTables* steps = nullptr)
      : r_(out),
        env_(env),
        mesh_(mesh),
        road_at_(mesh),
        limit_(limit),
        forward_(direction == Sweep::forward),
        ideal_(env.car().powertrain.ideal),
        n_(mesh.size()),
        period_(mesh.closed ? n_ - 1 : n_),
        ds_(mesh.step_m),
        inv_mass_{1.0 / env.mass_kg(), 1.0 / env.effective_mass_kg()},
        shift_time_(env.car().powertrain.shift_time_s),
        steps_(steps),
        reach_base_(steps ? ds_ * steps->slope_bound : 0.0),
        i_(start),
        v_(v_start) {
    resize_ready(r_.speed_mps, n_);  // every point is written on the way
    r_.speed_mps[start] = v_;
    if (forward_) {
      // Every point the sweep reaches is written (end_step writes both at each step, finish the
      // seam), and a part's are read only over the steps it took (take_part): no fill first,
      // where a solver's buffers of the last lap hold the mesh's points already.
      r_.cut.resize(n_);
      r_.gear.resize(n_);
      gear_ = ideal_ ? 0 : env.gear(v_);
      r_.cut[start] = 0;
      r_.gear[start] = gear_;
    } else {  // no shift under braking: the backward sweep keeps no cut or gear
      r_.cut = {};
      r_.gear = {};
    }
  }

  /// Steps this sweep takes over the mesh from its start.
  std::size_t steps() const {
    if (mesh_.closed) return period_;
    return forward_ ? n_ - 1 - i_ : i_;
  }

  /// u = v^2 at the start. From there the caller carries u from step to step (end_step
  /// returns it; table_step, held_step and begin_step take it): the step's own u where the
  /// limit did not clip it (not sqrt(u)^2: the square root is then off the chain of dependent
  /// arithmetic from step to step, which sets a sweep's pace), the limit's square where it
  /// did. In a local of the loop it stays in a register, where a member of the Sweeper (whose
  /// address the axle model's hints take out of line) went through memory at every step.
  double start_u() const { return v_ * v_; }

  /// The next point along the sweep; a closed mesh wraps through its seam (point n-1 == 0).
  std::size_t next(std::size_t i) const {
    if (forward_) return (i + 1 == period_ && mesh_.closed) ? 0 : i + 1;
    return (i == 0) ? period_ - 1 : i - 1;
  }

  /// The step from the current point to the next read from the step tables (StepTables), where
  /// they hold it: a level straight in still air (curvature 0 at both ends), the drive fully on,
  /// and the limit further above the start than the step reads the model (so that the step is
  /// the one the tables hold, unlimited), in a cell with a cubic. Then u at the next point goes
  /// into `u1` (for end_step) and true; otherwise the step is the integrator's (begin_step).
  [[gnu::always_inline]] bool table_step(double u0, double& u1) {
    if (!steps_) return false;
    const std::size_t i = i_, j = next(i);
    if (mesh_.curvature_1pm[i] != 0.0 || mesh_.curvature_1pm[j] != 0.0) return false;
    const std::size_t p = forward_ ? i : j;  // where begin_step reads the road
    if (!Level && !mesh_.level_in_still_air(p)) return false;
    const CellCubics* table = &steps_->brake;
    if (forward_) {
      if (cut_left_s_ > 0.0) return false;
      table = env_.trims(0.0) && mesh_.trim_zone[i] ? &steps_->drive_trimmed : &steps_->drive;
    }
    // The step reads the model at u0 and at most this far from it (exponential_step's secant).
    const double reach = reach_base_ + slope_spread * std::max(u0, 1.0);
    if (!(u0 >= reach && u0 + reach <= std::min(limit_[i] * limit_[i], limit_[j] * limit_[j])))
      return false;
    if (!table->at(u0, u1)) return false;
    j_ = j;
    return true;
  }

  /// A backward step held on the limit, told without asking the model: one that starts at or
  /// above the limit at its end (the exponential step's `clipped` test) where braking surely
  /// decelerates. The model's braking is the tyres' force left, which is never negative, plus
  /// the resistance (drag, rolling resistance and grade); where the resistance alone
  /// decelerates by more than `held_margin`, the step's reading is positive, and the step ends
  /// on the limit whatever its size (end_step clips it there). Then `u1` (at or above the limit,
  /// for end_step) and true; otherwise the step is the integrator's.
  [[gnu::always_inline]] bool held_step(double u0, double& u1) {
    if (forward_) return false;
    const std::size_t i = i_, j = next(i);
    // As begin_step and exponential_step work the limit over the step, to the same rounding.
    const double ulim0 = limit_[i] * limit_[i];
    const double dulim = (limit_[j] * limit_[j] - ulim0) / ds_;
    if (!(u0 >= ulim0 + dulim * ds_)) return false;
    const double xm = 0.5 * ds_;
    const double um = std::min(u0, ulim0 + dulim * xm);
    const double k0 = std::abs(mesh_.curvature_1pm[i]);
    const double k = k0 + (std::abs(mesh_.curvature_1pm[j]) - k0) / ds_ * xm;
    const Road road = road_at(j);
    // The last held step's state stands for this one where it is the same (an arc or a top
    // speed held: the limit, the curvature and the road the same step after step).
    if (!(held_.valid && um == held_.um && k == held_.k &&
          (Level || same_road(road, held_.road)))) {
      const double r = env_.road_forces(env_.rows(false), std::max(um, 0.0), k, road).resistance_n;
      if (!(r * inv_mass_.m > held_margin_mps2)) return false;
      held_ = {um, k, road, true};
    }
    j_ = j;
    u1 = u0;
    return true;
  }

  /// Prepares the step from the current point to the next; returns u = v^2 there.
  [[gnu::always_inline]] double begin_step(double u0) {
    const std::size_t i = i_;
    j_ = next(i);
    // Curvature varies linearly over the step; the grade is that of the step's first point in
    // distance (piecewise constant along segments).
    k0_ = std::abs(mesh_.curvature_1pm[i]);
    dk_ = (std::abs(mesh_.curvature_1pm[j_]) - k0_) / ds_;
    // The limit in u = v^2 over the step, linear between its ends: no stage state goes above it.
    ulim0_ = limit_[i] * limit_[i];
    dulim_ = (limit_[j_] * limit_[j_] - ulim0_) / ds_;
    road_ = road_at(forward_ ? i : j_);
    straight_ = Axle && env_.level_tables() && k0_ == 0.0 && dk_ == 0.0 &&
                (Level || level_in_still_air(road_));
    const bool trims_now = forward_ && env_.trims(k0_) && mesh_.trim_zone[i];
    // Under drive, movable aero trims where the step starts on a straight enough piece (inside
    // a trim zone, where the track has them); under braking it does not.
    trimmed_ = trims_now;
    rows_ = env_.rows(trimmed_);
    const double last_share = drive_share_;
    drive_share_ = 1.0;
    if (forward_ && cut_left_s_ > 0.0) {
      // Share of this step's time (estimated at the entry speed) with the drive still on.
      const double step_time = ds_ / std::max(v_, 1e-3);
      drive_share_ = 1.0 - std::min(1.0, cut_left_s_ / step_time);
    }
    // The last answer stands for a stage of the same state (memo_): the same road, trim, drive
    // share and table choice as the step it came from.
    if (!((Level || same_road(road_, memo_road_)) && trimmed_ == memo_trimmed_ &&
          drive_share_ == last_share && straight_ == memo_straight_)) {
      memo_.valid = false;
      memo_road_ = road_;
      memo_trimmed_ = trimmed_;
      memo_straight_ = straight_;
    }
    return u0;
  }

  /// d(v^2)/dx = 2 a at u = v^2, a distance x (0 .. ds) into the step, along the sweep's own
  /// direction of travel: forward under drive, backward under braking.
  ///
  /// A stage of the same u and curvature as the last one asked, in the same state (an arc taken
  /// at its limit: every step's first stage held at the same limit), gets the last answer
  /// again without asking the model.
  [[gnu::always_inline]] double rhs(double u, double x) const {
    const double u0 = std::max(u, 0.0);
    const double k = k0_ + dk_ * x;
    if (memo_.valid && u0 == memo_.u && k == memo_.k) return memo_.f;
    const double f =
        2.0 * (forward_
                   ? drive_accel<Axle>(env_, rows_, u0, k, road_, trimmed_, drive_share_, inv_mass_,
                                       &hints_, straight_)
                   : brake_accel<Axle>(env_, rows_, u0, k, road_, inv_mass_, &hints_, straight_));
    memo_ = {u0, k, f, true};
    return f;
  }

  // The axle model's hints (AxleHints: each axle's last root, where its next Newton solve
  // starts) at the exponential step's two readings. A sweep's readings on a corner's entry or
  // exit move from step to step and between a step's two readings by more than the solve
  // takes in one evaluation (0.3 to 1 m/s^2 on Brannock Park's entries, where the ellipse is
  // nearly full and the Newton iteration converges slowly), so the hints are moved first:
  //  - the first reading (at the step's start) from the axle's roots at the first readings of
  //    the last two steps, where those were exponential steps in a row that solved that axle,
  //    extrapolated by the line through them;
  //  - the second (the secant's, du further on in u at the same point) from the first's root
  //    along the slope d(2a)/du the last two steps' secants extrapolate to.
  // Only where they stay above 0 (a warm start needs a positive hint). An axle that a reading
  // did not solve (its bound held, a table or the memo answered) keeps its hint as it was
  // before the move and starts its trail again. Where g = phi(a) - a is concave (axle.cpp) a
  // hint changes where the solve starts, not the root it converges to (to its 1e-9 m/s^2
  // tolerance): lap times move by 3e-12 relative at most over the bundled laps
  // (tools/lap-times) and 174 laps of invented cars at the edges of the inputs, and the
  // evaluations of the ellipse a lap takes fall by a fifth (docs/performance.md, "Nearer starts for
  // the axle model's solves"). Where g is not concave (an inner tyre lifts, mu reaches its floor)
  // it can have more than one root, and the one a warm start settles on depends on the start, moved
  // or not: the quadratic through three roots, tried first, overshot into such a place on an
  // invented car with a 1 m centre of gravity and moved its lap by 5.6e-6 (found in review), the
  // line does not. (The point mass reads no hints: the moves are the axle model's alone.)
  [[gnu::always_inline]] void predict_hints() {
    if constexpr (!Axle) return;
    const bool in_row = trail_at_ == i_;
    for (int q = 0; q < 2; ++q) {
      Trail& t = trail_[q];
      if (!in_row) t.n = 0;
      move_hint(q, t.n >= 2 ? 2.0 * t.a[0] - t.a[1] : 0.0);
    }
  }
  [[gnu::always_inline]] void note_first_reading() {
    if constexpr (!Axle) return;
    for (int q = 0; q < 2; ++q) {
      Trail& t = trail_[q];
      if (!solved(q)) {
        t.n = 0;
        continue;
      }
      t.a[1] = t.a[0];
      t.a[0] = hint(q);
      t.n = std::min(t.n + 1, 2);
    }
    trail_at_ = j_;
  }
  [[gnu::always_inline]] void nudge_hints(double du) {
    if constexpr (!Axle) return;
    const bool slope = slope_at_ == i_ && slopes_ > 0;
    const double shift =
        slope ? 0.5 * (slopes_ >= 2 ? 2.0 * slope_[0] - slope_[1] : slope_[0]) * du : 0.0;
    for (int q = 0; q < 2; ++q) move_hint(q, slope ? hint(q) + shift : 0.0);
  }
  [[gnu::always_inline]] void note_second_reading(double j) {
    if constexpr (!Axle) return;
    for (int q = 0; q < 2; ++q) solved(q);
    slopes_ = slope_at_ == i_ ? std::min(slopes_ + 1, 2) : 1;
    slope_[1] = slope_[0];
    slope_[0] = j;
    slope_at_ = j_;
  }
  // Axle q's hint (0 front, 1 rear).
  double& hint(int q) { return q == 0 ? hints_.front : hints_.rear; }
  // Moves axle q's hint to `to` where that is above 0, keeping it as it was for solved().
  void move_hint(int q, double to) {
    double& h = hint(q);
    before_[q] = moved_[q] = h;
    if (to > 0.0) h = moved_[q] = to;
  }
  // Whether the reading since move_hint solved axle q (its hint is no longer the moved one);
  // where it did not, the hint goes back to what it was.
  bool solved(int q) {
    double& h = hint(q);
    if (h != moved_[q]) return true;
    h = before_[q];
    return false;
  }

  /// The road at point i (RoadReader; on a Level mesh its level road).
  [[gnu::always_inline]] Road road_at(std::size_t i) {
    if constexpr (Level)
      return road_at_.level(i);
    else
      return road_at_(i);
  }
  /// The limit in u = v^2 a distance x into the step (linear between the step's ends).
  double cap(double x) const { return ulim0_ + dulim_ * x; }
  /// Curvature and limit the same at both ends (an arc or a straight on its steady limit):
  /// every stage held at the limit reads the same state.
  bool uniform() const { return dk_ == 0.0 && dulim_ == 0.0; }
  /// Whether end_step clips u at the step in progress's end to the limit there (its own test).
  bool clips(double u) const {
    const double clip_from = limit_[j_] * (1.0 - clip_tolerance);
    return u >= clip_from * clip_from;
  }

  /// Takes the integrated u at the next point: clips it to the limit and moves there.
  [[gnu::always_inline]] double end_step(double u) {
    const std::size_t j = j_;
    // Forward, the speed falls to nothing under full drive; backward, the speed the car may
    // have to arrive at the next point does (braking there is less than the grade or the wind
    // pushes it on: even from a standstill it would arrive too fast).
    if (!(u > 0.0))
      throw CannotMove(forward_ ? "the car stops at " + where(mesh_, j) +
                                      ": drive cannot overcome the resistance there"
                                : "the car cannot be slowed in time at " + where(mesh_, j) +
                                      ": braking cannot hold it against the grade or the wind "
                                      "there");
    // Where the limit, not the integration, gives the speed: sqrt(u) >= the limit less
    // clip_tolerance, compared in u so that the next step need not wait for the root.
    const double clip_from = limit_[j] * (1.0 - clip_tolerance);
    const bool clipped = u >= clip_from * clip_from;
    const double v_next = clipped ? limit_[j] : std::sqrt(u);
    if (forward_) {
      const double dt = 2.0 * ds_ / (v_ + v_next);
      bool cut = false;
      if (cut_left_s_ > 0.0) {
        // The point counts as cut when the drive was off for at least half of the step that
        // reached it: the cut's share of the lap is then the same on any mesh (rounded to the
        // nearest step, not up to the next).
        cut = cut_left_s_ >= 0.5 * dt;
        cut_left_s_ = std::max(0.0, cut_left_s_ - dt);
      }
      r_.cut[j] = cut;
      if (!ideal_) {
        // An upshift cuts the drive. The speed lost in the cut must not shift back down (that
        // would hunt at the shift point): under drive the engaged gear only goes up; it
        // follows the speed down only where a limit, not the drive, set the speed.
        const int best = env_.gear(v_next);
        if (best > gear_ && shift_time_ > 0.0) cut_left_s_ = shift_time_;
        if (best > gear_ || clipped) gear_ = best;
      }
      r_.gear[j] = gear_;
    }
    r_.speed_mps[j] = v_next;
    v_ = v_next;
    i_ = j;
    return clipped ? v_next * v_next : u;
  }

  /// Whether the sweep stands on its limit at the current point with no drive cut left to run:
  /// the state a sweep started afresh at that point on its limit begins in (the speed, the gear
  /// the limit's speed engages: end_step engages it where it clips; no cut), but for the axle
  /// model's hints and the memos, which move where a solve starts, not its answer beyond its
  /// tolerance. (The point's own cut flag, from the step that reached it, stays the first
  /// part's: nothing after it reads it.)
  bool on_limit_afresh() const { return v_ == limit_[i_] && cut_left_s_ == 0.0; }

  /// A backward sweep beside the forward sweep's final speeds (`forward`),
  /// which it may step over where it is above them (skippable); null: it takes every step.
  void set_above(const std::vector<double>* forward) { above_ = forward; }
  bool skips() const { return above_ != nullptr; }
  /// Steps the backward sweep can take at once from the current point at speed v: the count to
  /// the first point j whose limit is at or below v, where no point before j has a forward
  /// speed at or above v (0 where there is none within `max_steps`; `scanned`: the steps looked
  /// at). Braking decelerates by at least the resistance, whose floor on a level road in still
  /// air (Envelope::level_resistance_floor_mps2) is at least skip_floor_mps2 where set_above is
  /// called, so the sweep's speed only rises step by step from v (u by some 0.1 m^2/s^2 a
  /// step, far beyond the steps' errors): at every point before j it stays at or above v
  /// (or its limit there, which is above v), above the forward sweep, and the lap's speed
  /// there is the forward sweep's whatever the backward sweep's exact value; at j it is
  /// clipped to the limit (Sweeper::end_step), exactly as the steps would leave it. The margin
  /// (skip_margin) covers the rounding of the speeds' square roots.
  /// Off a level mesh the floor holds for a step only where its road's grade and bank leave
  /// it (surely_decelerates).
  std::size_t skippable(std::size_t max_steps, std::size_t& scanned) {
    const std::vector<double>& forward = *above_;
    const double v = v_ * (1.0 - skip_margin);
    std::size_t i = i_;
    scanned = 1;
    if (!(forward[i] < v)) return 0;
    for (std::size_t c = 1; c <= max_steps; ++c) {
      const std::size_t from = i;
      i = next(i);
      if (!Level && !surely_decelerates(from, i)) {
        scanned = c;
        return 0;
      }
      if (limit_[i] <= v) return c;
      if (!(forward[i] < v)) {
        scanned = c;
        return 0;
      }
    }
    scanned = std::max<std::size_t>(max_steps, 1);
    return 0;
  }
  /// Whether braking surely decelerates by skip_floor_mps2 over the backward step from point
  /// `from` to the next, `to`, at any speed it can have there (up to the higher of the two
  /// limits): R = u (drag_coef + crr lift_coef) + crr W c + W sin(slope) on the step's road (the
  /// one at `to`, as begin_step reads it), whose first term is not negative (the Envelope's
  /// floor is set) and whose share of the weight on the road c = cos(slope) cos(bank) +
  /// (u |k| / g) sin(bank) (body_loads) is least at the highest u and |k| on a bank that falls
  /// away from the turn, at the lowest (0) on one that rises to it. A head wind (a tail wind
  /// can make the drag push) ends the stretch.
  bool surely_decelerates(std::size_t from, std::size_t to) {
    const Road road = road_at(to);
    if (road.head_wind_mps != 0.0) return false;
    double share = road.cos_slope * road.cos_bank;
    if (road.sin_bank < 0.0) {
      const double top = std::max(limit_[from] * limit_[from], limit_[to] * limit_[to]);
      const double k =
          std::max(std::abs(mesh_.curvature_1pm[from]), std::abs(mesh_.curvature_1pm[to]));
      share += top * k * road.sin_bank * (1.0 / units::g0);
    }
    const double weight = env_.weight_n();
    const double floor =
        (env_.rolling_resistance() * weight * share + weight * road.sin_slope) * inv_mass_.m;
    return floor >= skip_floor_mps2;
  }
  /// Takes the `c` steps skippable found: the points on the way keep the speed at the start
  /// (at or below what the steps would give them, above the forward sweep's), the last its
  /// limit. Returns u there, for the next step.
  double skip(std::size_t c) {
    const double v = v_;
    std::size_t i = i_;
    for (std::size_t k = 1; k < c; ++k) {
      i = next(i);
      r_.speed_mps[i] = v;
    }
    i = next(i);
    v_ = limit_[i];
    r_.speed_mps[i] = v_;
    i_ = i;
    return v_ * v_;
  }

  void finish() {
    if (mesh_.closed) {
      // The seam: point n-1 is point 0 again.
      r_.speed_mps[n_ - 1] = r_.speed_mps[0];
      if (forward_) {
        r_.cut[n_ - 1] = r_.cut[0];
        r_.gear[n_ - 1] = r_.gear[0];
      }
    }
  }

 private:
  const Envelope& env_;
  const Mesh& mesh_;
  RoadReader road_at_;
  const std::vector<double>& limit_;
  const bool forward_, ideal_;
  const std::size_t n_, period_;
  const double ds_;
  const InverseMass inv_mass_;
  const double shift_time_;
  const StepTables* const steps_;  // null: every step is the integrator's
  const double reach_base_;        // table_step's reach without its floor
  std::size_t i_;
  double v_;
  // The step in progress.
  std::size_t j_ = 0;
  double k0_ = 0.0, dk_ = 0.0, drive_share_ = 1.0;
  double ulim0_ = 0.0, dulim_ = 0.0;  // the limit in u at the step's start, and its slope
  bool trimmed_ = false;
  bool straight_ = false;  // a level straight in still air: the straight-line tables apply
  Envelope::Rows rows_{nullptr, 0, 0.0};  // the table the step reads
  Road road_{};
  int gear_ = 0;
  double cut_left_s_ = 0.0;  // drive cut still to run after an upshift
  // The axle model's last answers, where its next solve starts (rhs is const: a cache).
  mutable AxleHints hints_;
  // The last stage's state and answer (rhs), and the step state it holds for.
  struct Memo {
    double u = 0.0, k = 0.0, f = 0.0;
    bool valid = false;
  };
  mutable Memo memo_;
  // The last step held_step took: its state at the midpoint (the resistance there decelerates).
  struct Held {
    double um = 0.0, k = 0.0;
    Road road{};
    bool valid = false;
  };
  Held held_;
  const std::vector<double>* above_ = nullptr;  // set_above
  // The hints' moves (predict_hints and nudge_hints): each axle's roots at the first readings
  // of the steps in a row that solved it (latest first; n of them hold), the point the last
  // such step ended at, the last two secants, and each axle's hint before a move and after it.
  struct Trail {
    double a[2] = {0.0, 0.0};
    int n = 0;
  };
  std::array<Trail, 2> trail_{};
  std::size_t trail_at_ = std::numeric_limits<std::size_t>::max();
  std::array<double, 2> slope_{};
  int slopes_ = 0;
  std::size_t slope_at_ = std::numeric_limits<std::size_t>::max();
  std::array<double, 2> before_{}, moved_{};
  Road memo_road_{std::numeric_limits<double>::quiet_NaN(), 0.0, 0.0, 0.0, 0.0};
  bool memo_trimmed_ = false, memo_straight_ = false;
};

}  // namespace

namespace {

constexpr double stiff_z = 1.0;     // |z| up to which RK4 is taken as it is
constexpr int max_substeps = 16;    // per split; splits nest twice at most
constexpr int max_split_depth = 2;  // worst case 16 x 16 substeps for one step
// Below this relative spread of the mid-point stage states the estimate of z is rounding: the
// sweep is within 1e-6 of a settled state and the step is taken as it is.
constexpr double z_resolution = 1e-6;

// The step. Classical fourth-order Runge-Kutta (Kutta 1901; Hairer, Norsett & Wanner, Solving
// Ordinary Differential Equations I, sec. II.1) with two guards that the grip limit needs:
//  - every stage state is held at or under the sweep's limit (linear in u over the step), so no
//    stage reads the tyres beyond their steady limit, where the force left by the ellipse falls
//    to nothing and d(v^2)/ds is not smooth;
//  - near the limit d(v^2)/ds is stiff: for the sports car in a 15 m hairpin (sea-level air)
//    z = ds d(du/ds)/du = 2 ds da/du is -0.13 at 90 % of the limiting v^2, -1.4 at 99.9 % and
//    -4.2 on the limit at 0.5 m (computed here), outside RK4's stability interval on the real
//    axis: |R(z)| = |1 + z + z^2/2 + z^3/6 + z^4/24| <= 1 down to z = -2.785 (Hairer & Wanner,
//    Solving ODEs II, sec. IV.2). There the sweep oscillated just under the limit and never
//    reached it. A step whose stage states had to be held, or whose z
//    (estimated from its two mid-point stages, (k3 - k2) / (y3 - y2) = du'/du for free) is above
//    1 in size, is taken again in substeps short enough for |z| <= 1, where RK4 follows
//    exp(z) to 2 % per substep. The step is then what a finer mesh gives, and the sweep settles
//    on the limit as the exact solution does. A step that starts on the limit and ends on it or
//    above (the sweep holds the limit: most of the backward sweep, every arc taken at the limit)
//    is clipped whatever its stages: it is not taken again.
struct StageCheck {
  double u1;   // u at the step's end
  double z;    // step x d(du/ds)/du, estimated; 0 where the stages cannot tell
  bool held;   // a stage state was held at the limit
  bool stays;  // starts on the limit and ends on it or above
  bool flagged() const { return !stays && (held || std::abs(z) > stiff_z); }
};

// One RK4 step of length h from x0 for N sweeps at once (N = 2: forward and backward in lockstep,
// two independent chains of dependent arithmetic that keep the processor busier than one).
template <class Sw, std::size_t N>
[[gnu::always_inline]] inline std::array<StageCheck, N> rk4(const std::array<Sw*, N>& s,
                                                            const std::array<double, N>& u0,
                                                            double x0, double h) {
  std::array<double, N> y1, k1, y2, k2, y3, k3, k4;
  std::array<bool, N> held{};
  // A lane that starts on its limit with d(u)/dx > 0 on a uniform step (an arc taken at its
  // limit, where the backward sweep spends most of its steps) holds every stage at the same
  // limit in the same state: stages 2 to 4 are stage 1 again (the held stages' rhs reads the
  // same u, curvature and road), and the step ends above the limit and is clipped to it.
  std::array<bool, N> same{};
  const double xm = x0 + 0.5 * h, x1 = x0 + h;
  for (std::size_t c = 0; c < N; ++c) {
    const double top = s[c]->cap(x0);
    held[c] = u0[c] > top;
    y1[c] = held[c] ? top : u0[c];
    k1[c] = s[c]->rhs(y1[c], x0);
    same[c] = u0[c] >= top && k1[c] > 0.0 && s[c]->uniform();
  }
  for (std::size_t c = 0; c < N; ++c) {
    const double y = y1[c] + 0.5 * h * k1[c], top = s[c]->cap(xm);
    held[c] |= y > top;
    y2[c] = std::min(y, top);
    k2[c] = same[c] ? k1[c] : s[c]->rhs(y2[c], xm);
  }
  for (std::size_t c = 0; c < N; ++c) {
    const double y = y1[c] + 0.5 * h * k2[c], top = s[c]->cap(xm);
    held[c] |= y > top;
    y3[c] = std::min(y, top);
    k3[c] = same[c] ? k1[c] : s[c]->rhs(y3[c], xm);
  }
  for (std::size_t c = 0; c < N; ++c) {
    const double y = y1[c] + h * k3[c], top = s[c]->cap(x1);
    held[c] |= y > top;
    k4[c] = same[c] ? k1[c] : s[c]->rhs(std::min(y, top), x1);
  }
  std::array<StageCheck, N> out;
  for (std::size_t c = 0; c < N; ++c) {
    const double u1 = y1[c] + h / 6.0 * (k1[c] + 2.0 * (k2[c] + k3[c]) + k4[c]);
    const double dy = y3[c] - y2[c], dk = h * (k3[c] - k2[c]);
    // |z| = |dk / dy| > stiff_z, without a division on the common path.
    const bool stiff =
        std::abs(dk) > stiff_z * std::abs(dy) && std::abs(dy) > z_resolution * std::max(y2[c], 1.0);
    out[c] = {u1, stiff ? dk / dy : 0.0, held[c], false};
    if (held[c] || stiff)  // on the limit as end_step clips (v within clip_tolerance)
      out[c].stays = u0[c] >= s[c]->cap(x0) * (1.0 - 2.0 * clip_tolerance) &&
                     u1 >= s[c]->cap(x1) * (1.0 - 2.0 * clip_tolerance);
  }
  return out;
}

// Substeps for a step (or substep) that rk4 flagged: |z| <= stiff_z each, as far as the split
// allows. Returns u at x0 + h.
template <class Sw>
double split_step(Sw& s, double u0, double x0, double h, const StageCheck& flagged, int depth) {
  const int n =
      std::clamp(static_cast<int>(std::ceil(std::abs(flagged.z) / stiff_z)), 2, max_substeps);
  const double sub = h / n;
  double u = u0;
  for (int k = 0; k < n; ++k) {
    const double x = x0 + k * sub;
    const StageCheck c = rk4<Sw, 1>({&s}, {u}, x, sub)[0];
    const bool again = c.flagged() && depth < max_split_depth;
    u = again ? split_step(s, u, x, sub, c, depth + 1) : c.u1;
  }
  return u;
}

// The exponential step (Integrator::exponential). Over a step of length h, d(u)/dx = f(u, x),
// f = 2 a(u, kappa(x)), is linearised in u at the step's midpoint in x,
//   f(u, x) ~ f_m + J (u - u_m),  f_m = f(u_m, x_m),  J = df/du there,
// and that linear equation is solved exactly from u0 (its closed form: w = u - u_m + f_m / J
// has w' = J w):
//   u1 = u0 + h phi1(h J) (f_m + J (u0 - u_m)),  phi1(z) = (e^z - 1) / z,
// with u_m = u0 except where the limit falls below u0 within the step (then u_m is held at the
// limit, as RK4's stages are). This is the exponential Rosenbrock-Euler step (Hochbruck &
// Ostermann, "Exponential integrators", Acta Numerica 19 (2010), sec. 2.4; from memory) with
// the x-dependence taken by the midpoint. Its order, by Taylor expansion (derived here): the
// exact solution is u(h) = u0 + h f + h^2/2 (f_u f + f_x) + O(h^3) (f and its partials at
// (u0, x0)); the step gives f_m = f + h/2 f_x + O(h^2) and h phi1(h J) = h + h^2 J / 2 + O(h^3),
// so u1 = u0 + h f + h^2/2 (J f + f_x) + O(h^3): local error O(h^3) when J = f_u + O(h), second
// order over a lap. It is exact (to rounding) where f is affine in u at an x-independent
// curvature and road: a drive force and resistance linear in v^2 on a straight, a = A - B u,
// whose closed form is u(x) = A/B + (u0 - A/B) e^{-2 B x}. For z = h J -> -inf, u1 ->
// u_m - f_m / J: the root of the linearisation, where the sweep settles at the grip limit, for
// any step (no substeps: phi1 is bounded by 1 for z <= 0).
// Where z = h J is beyond exponential_jump_z (16), J is a secant across a jump in the model,
// not a slope, and the step takes f_m alone (base/exp_ratio.hpp, exponential_update): phi1
// would overflow beyond z = 709.8 and make the speed a NaN.
//
// J is the difference quotient of two evaluations at the midpoint, the second a reach
// d = max(2/3 h |f_m|, 1e-5 max(u_m, 1 m^2/s^2)) from u_m the way the sweep moves (the other
// way where that would read above the limit, where the tyres have nothing left). A reach of
// c h f_m makes J = f_u + h/2 f_ux + c h f f_uu / 2 + O(h^2), so the order holds; in the local
// error, h^3 (c/4 - 1/6) f^2 f_uu (the rest: h^3 (f_u f_x / 12 - f f_ux / 12 - f_xx / 24)), and
// c = 2/3 cancels that term, which dominates near the grip limit (measured on Brannock Park:
// a backward secant, c = -1/2, left 10 times the lap-time difference from RK4). The floor keeps
// the quotient well above the axle model's 1e-9 m/s^2 resolution (2e-9 / d < 2e-4 of J's
// typical 1e-3 per m).
// slope_spread and secant_reach: above the Sweeper (its table steps bound the step's reach).

//
// A step whose end is clipped to the limit whatever its second reading takes the first alone
// (`clipped`, `held`): the lap is the same, the second reading's cost is not paid. With
// delta = u0 - u_m >= 0 and f_m <= 0, u1 = u0 + h phi1(z) f_m + delta (e^z - 1), z = h J, is at
// least u_m + h f_m for every J: for z <= 0, phi1(z) is in (0, 1] and e^z - 1 >= -1; for
// 0 < z <= exponential_jump_z, phi1(z) <= e^z gives u1 >= u_m + e^z (delta + h f_m), at least
// u_m where delta >= h |f_m|; beyond it, u1 = u0 + h f_m. So where delta >= h |f_m| and
// end_step clips u_m + h f_m (both with held_bound_margin for the rounding of phi1 and of the
// sums, within an ulp or two), the step ends on the limit, as the second reading would have
// it: a forward step at a corner's entry, on a limit that falls faster than drive slows the
// car (docs/performance.md, "The speed pass in loops of one kind, and what a corner's entry
// costs the forward sweep"). The speeds are the same; the axle model's hints are not moved by
// a second reading, so later solves start elsewhere, to their tolerance.
constexpr double held_bound_margin = 1e-9;

template <class Sw, std::size_t N>
[[gnu::always_inline]] inline std::array<double, N> exponential_step(
    const std::array<Sw*, N>& s, const std::array<double, N>& u0, double h) {
  const double xm = 0.5 * h;
  std::array<double, N> um, fm, ud, inv_du, u1;
  std::array<bool, N> clipped, held;
  for (std::size_t c = 0; c < N; ++c) {
    um[c] = std::min(u0[c], s[c]->cap(xm));
    s[c]->predict_hints();
    fm[c] = s[c]->rhs(um[c], xm);
    s[c]->note_first_reading();
    clipped[c] = fm[c] > 0.0 && u0[c] >= s[c]->cap(h);
    const double fall = -h * fm[c] * (1.0 + held_bound_margin);  // h |f_m|, and a margin
    held[c] = !clipped[c] && fm[c] <= 0.0 && u0[c] - um[c] >= fall &&
              s[c]->clips((um[c] - fall) * (1.0 - held_bound_margin));
    const double d =
        std::max(secant_reach * h * std::abs(fm[c]), slope_spread * std::max(um[c], 1.0));
    const double ahead = fm[c] >= 0.0 ? um[c] + d : um[c] - d;
    ud[c] = ahead >= 0.0 && ahead <= s[c]->cap(xm) ? ahead : (fm[c] >= 0.0 ? um[c] - d : um[c] + d);
    // Worked while the model is read at ud: the secant's division off the chain from step to
    // step.
    inv_du[c] = 1.0 / (um[c] - ud[c]);
  }
  for (std::size_t c = 0; c < N; ++c) {
    if (clipped[c]) {
      u1[c] = u0[c] + h * fm[c];
      continue;
    }
    if (held[c]) {  // end_step clips it to the limit, as it would the step's own end
      u1[c] = um[c] - (-h * fm[c] * (1.0 + held_bound_margin));
      continue;
    }
    s[c]->nudge_hints(ud[c] - um[c]);
    const double j = (fm[c] - s[c]->rhs(ud[c], xm)) * inv_du[c];
    s[c]->note_second_reading(j);
    u1[c] = exponential_update(u0[c], um[c], fm[c], j, h);
  }
  return u1;
}

// One step of N sweeps in lockstep with the integrator I; u at the step's end, for end_step.
// RK4 takes a flagged step again in substeps, for the sweep that needs it alone.
template <Integrator I, class Sw, std::size_t N>
[[gnu::always_inline]] inline std::array<double, N> step(const std::array<Sw*, N>& s,
                                                         const std::array<double, N>& u0,
                                                         double h) {
  if constexpr (I == Integrator::exponential) {
    return exponential_step<Sw, N>(s, u0, h);
  } else {
    const std::array<StageCheck, N> c = rk4<Sw, N>(s, u0, 0.0, h);
    std::array<double, N> u1;
    for (std::size_t k = 0; k < N; ++k)
      u1[k] = c[k].flagged() ? split_step(*s[k], u0[k], 0.0, h, c[k], 1) : c[k].u1;
    return u1;
  }
}

// A step the exponential step's sweeps take without it: from the step tables, or held on the
// limit (RK4 takes every step itself).
template <Integrator I, class Sw>
[[gnu::always_inline]] inline bool quick_step(Sw& s, double u0, double& u1, bool quick) {
  if constexpr (I == Integrator::exponential)
    return quick && (s.table_step(u0, u1) || s.held_step(u0, u1));
  else
    return false;
}

// A closed lap's sweep in two parts (forward_split, backward_split): the first from the lap's
// start, the second afresh from the point the first part's steps end at, on the limit there.
// The second part is taken where the first part arrives there on its limit with no drive cut
// left to run (Sweeper::on_limit_afresh: the state the fresh start begins in, but for the axle
// model's hints and memos, which move where a solve starts, not its answer beyond its
// tolerance); else the first part goes on to the sweep's end. On two threads each sweep's
// second part runs beside the other sweep's first (sweep_apart), so that the threads' shares
// are about even; on one the same parts are taken in turn (sweep_both): the same lap bit for
// bit.
//
// Each sweep's first part's steps (its steps: no split; forward_split, backward_split).
struct SweepSplits {
  std::size_t forward, backward;
};

// A sweep (or part) in progress: its Sweeper, u carried from step to step, the next step and
// the step it ends before, and its error where a step threw (the step it was in `at`). Where
// `split` < `end`, the part tests the hand-over at that step (`taken`: it stops there; else it
// goes on).
template <class Sw>
struct Lane {
  Sw* s = nullptr;
  double u = 0.0;
  std::size_t k = 0, end = 0, split = 0;
  bool taken = false;
  std::ptrdiff_t at = -1;
  std::exception_ptr error;
  std::size_t skipped = 0;    // steps try_skip took at once
  std::size_t scan_at = 0;    // the step from which try_skip looks again
  std::size_t scan_wait = 1;  // steps to wait after a look that found nothing (doubling)

  Lane() = default;
  Lane(Sw& sweeper, std::size_t from, std::size_t to, std::size_t split_at)
      : s(&sweeper),
        u(sweeper.start_u()),
        k(from),
        end(to),
        split(split_at),
        at(static_cast<std::ptrdiff_t>(from) - 1),
        scan_at(from) {}
  // Whether the part may skip steps (Sweeper::set_above), and looks for a stretch to skip at
  // the step it is at.
  bool scans() const { return s->skips(); }
  bool scan_due(std::size_t c) const { return k + c >= scan_at; }
  // Once ready: the steps Sweeper::skippable finds taken at once (no further than the
  // hand-over's test or the end). Where it finds none, the next look waits for the point the
  // scan stopped at, and at least 1, 2, 4 ... up to max_scan_wait steps after looks that found
  // nothing in a row (a braking zone, where the backward sweep is below the forward one step
  // after step: a look at every step would cost more than the steps).
  static constexpr std::size_t max_scan_wait = 64;
  void try_skip() {
    if (!scans() || !scan_due(0)) return;
    std::size_t scanned = 0;
    if (const std::size_t c = s->skippable(run(), scanned)) {
      at = static_cast<std::ptrdiff_t>(k + c - 1);
      u = s->skip(c);
      k += c;
      skipped += c;
      scan_wait = 1;
    } else {
      scan_at = k + std::max(scanned, scan_wait);
      scan_wait = std::min(2 * scan_wait, max_scan_wait);
    }
  }
  // Whether the part has a step to take (testing the hand-over where it is due).
  bool ready() {
    if (!s || error || k >= end) return false;
    if (k == split && s->on_limit_afresh()) {
      taken = true;
      end = k;
      return false;
    }
    return true;
  }
  // Steps it takes before its hand-over's test or its end (once ready).
  std::size_t run() const { return (k < split ? std::min(split, end) : end) - k; }
  // What the part leaves (its steps, hand-over and error), without its Sweeper, which does not
  // outlive it.
  Lane outcome() const {
    Lane l = *this;
    l.s = nullptr;
    return l;
  }
  // Ends a step at u1 (the integrator's u at its end), catching what Sweeper::end_step throws
  // (where u1 stops the car): the part then stops with its error, the step in `at`.
  void end_step(double u1) {
    at = static_cast<std::ptrdiff_t>(k);
    try {
      u = s->end_step(u1);
      ++k;
    } catch (...) {
      error = std::current_exception();
    }
  }
};

// Two parts in lockstep (a step of each from the tables where they hold them, the others
// together) while both have steps to take; a part whose step stops the car stops there. Each
// stretch between the parts' tests carries u in locals: a part's members would go through
// memory at every step (the Sweeper's stores might alias them).
template <Integrator I, class Sw>
void lockstep(Lane<Sw>& a, Lane<Sw>& b, double h, bool quick) {
  while (a.ready() && b.ready()) {
    // A stretch a part skips (try_skip) can end on its hand-over's test or its end.
    a.try_skip();
    b.try_skip();
    if (!a.ready() || !b.ready()) break;
    Sw& sa = *a.s;
    Sw& sb = *b.s;
    const bool scan_a = a.scans(), scan_b = b.scans();
    const std::size_t m = std::min(a.run(), b.run());
    double u_a = a.u, u_b = b.u, ua = 0.0, ub = 0.0;
    std::size_t c = 0;
    bool stopped = false;
    for (; c < m; ++c) {
      if ((scan_a && a.scan_due(c)) || (scan_b && b.scan_due(c))) break;
      const bool ta = quick_step<I>(sa, u_a, ua, quick), tb = quick_step<I>(sb, u_b, ub, quick);
      if (!ta && !tb) {
        const std::array<double, 2> u1 =
            step<I, Sw, 2>({&sa, &sb}, {sa.begin_step(u_a), sb.begin_step(u_b)}, h);
        ua = u1[0];
        ub = u1[1];
      } else if (!ta) {
        ua = step<I, Sw, 1>({&sa}, {sa.begin_step(u_a)}, h)[0];
      } else if (!tb) {
        ub = step<I, Sw, 1>({&sb}, {sb.begin_step(u_b)}, h)[0];
      }
      if (!(ua > 0.0) || !(ub > 0.0)) {  // Sweeper::end_step throws there
        stopped = true;
        break;
      }
      u_a = sa.end_step(ua);
      u_b = sb.end_step(ub);
    }
    a.u = u_a;
    b.u = u_b;
    a.k += c;
    b.k += c;
    if (stopped) {  // a step that stops the car, in either part or both
      a.end_step(ua);
      b.end_step(ub);
    }
  }
}
// One part alone while it has steps to take.
template <Integrator I, class Sw>
void alone(Lane<Sw>& a, double h, bool quick) {
  while (a.ready()) {
    a.try_skip();
    if (!a.ready()) break;
    Sw& sa = *a.s;
    const bool scan = a.scans();
    const std::size_t m = a.run();
    double u = a.u, u1 = 0.0;
    std::size_t c = 0;
    bool stopped = false;
    for (; c < m; ++c) {
      if (scan && a.scan_due(c)) break;
      if (!quick_step<I>(sa, u, u1, quick)) u1 = step<I, Sw, 1>({&sa}, {sa.begin_step(u)}, h)[0];
      if (!(u1 > 0.0)) {  // Sweeper::end_step throws there
        stopped = true;
        break;
      }
      u = sa.end_step(u1);
    }
    a.u = u;
    a.k += c;
    if (stopped) a.end_step(u1);
  }
}

// One sweep into `r`, whole (throwing where it stops the car): one part alone.
template <bool Axle, Integrator I, bool Level>
void sweep_into_as(const Envelope& env, const Mesh& mesh, Sweep direction,
                   const std::vector<double>& limit, std::size_t start, double v_start,
                   SweepResult& r, const StepTables* steps, bool quick) {
  using Sw = Sweeper<Axle, Level>;
  Sw s(env, mesh, direction, limit, start, v_start, r, steps);
  Lane<Sw> whole(s, 0, s.steps(), s.steps());
  alone<I>(whole, mesh.step_m, quick);
  if (whole.error) std::rethrow_exception(whole.error);
  s.finish();
}

template <bool Axle, Integrator I>
SweepResult sweep_one(const Envelope& env, const Mesh& mesh, Sweep direction,
                      const std::vector<double>& limit, std::size_t start, double v_start,
                      const StepTables* steps = nullptr, bool quick = false) {
  SweepResult r;
  if (level_mesh(mesh))
    sweep_into_as<Axle, I, true>(env, mesh, direction, limit, start, v_start, r, steps, quick);
  else
    sweep_into_as<Axle, I, false>(env, mesh, direction, limit, start, v_start, r, steps, quick);
  return r;
}

// The point where a sweep's second part starts: `split` steps on from its start s0.
std::size_t split_point(const Mesh& mesh, Sweep direction, std::size_t s0, std::size_t split) {
  const std::size_t period = mesh.size() - 1;
  return direction == Sweep::forward ? (s0 + split) % period
                                     : (s0 + period - split % period) % period;
}

// A sweep's second part (steps `split` to `n`), afresh on the limit at its start, its Sweeper
// made in `s`, writing into `part`. A Sweeper that cannot be made (its buffers) is the part's
// error, at the step before its first, as a step's would be: reported only where the part is
// taken (join_parts), on one thread or two.
template <class Sw>
Lane<Sw> second_part(std::optional<Sw>& s, const Envelope& env, const Mesh& mesh, Sweep direction,
                     const std::vector<double>& limit, std::size_t s0, std::size_t split,
                     std::size_t n, SweepResult& part, const StepTables* steps) {
  const std::size_t j = split_point(mesh, direction, s0, split);
  try {
    s.emplace(env, mesh, direction, limit, j, limit[j], part, steps);
  } catch (...) {
    Lane<Sw> failed;
    failed.k = failed.end = failed.split = split;
    failed.at = static_cast<std::ptrdiff_t>(split) - 1;
    failed.error = std::current_exception();
    return failed;
  }
  return Lane<Sw>(*s, split, n, n);
}

// Two parts in lockstep, then each alone to its end (or its hand-over's test).
template <Integrator I, class Sw>
void both_then_alone(Lane<Sw>& a, Lane<Sw>& b, double h, bool quick) {
  lockstep<I>(a, b, h, quick);
  alone<I>(a, h, quick);
  alone<I>(b, h, quick);
}

// A second part's points (after its start, the last the lap's start again) into its sweep's
// result, and the seam written again (Sweeper::finish).
void take_part(const Mesh& mesh, Sweep direction, std::size_t s0, std::size_t split,
               const SweepResult& part, SweepResult& r) {
  const std::size_t period = mesh.size() - 1;
  const bool forward = direction == Sweep::forward;
  for (std::size_t c = split, i = split_point(mesh, direction, s0, split); c < period; ++c) {
    i = forward ? (i + 1 == period ? 0 : i + 1) : (i == 0 ? period - 1 : i - 1);
    r.speed_mps[i] = part.speed_mps[i];
    if (forward) {
      r.cut[i] = part.cut[i];
      r.gear[i] = part.gear[i];
    }
  }
  r.speed_mps[period] = r.speed_mps[0];
  if (forward) {
    r.cut[period] = r.cut[0];
    r.gear[period] = r.gear[0];
  }
}

// The part whose outcome stands for a sweep: its first part's where that failed or went on to
// the end, else its second part's.
template <class Sw>
const Lane<Sw>& sweep_outcome(const Lane<Sw>& first, const Lane<Sw>& second) {
  return first.error || !first.taken ? first : second;
}
// The error the lockstep of the whole sweeps would have met first rethrown, where either sweep
// (sweep_outcome) has one: of the two, the lower step's, counted along each sweep from its
// start, the forward sweep's at the same step.
template <class Sw>
void rethrow_first_error(const Lane<Sw>& f, const Lane<Sw>& b) {
  if (f.error && (!b.error || f.at <= b.at)) std::rethrow_exception(f.error);
  if (b.error) std::rethrow_exception(b.error);
}

// After the parts: the first error rethrown (rethrow_first_error), else the second parts taken
// into the sweeps' results.
template <class Sw>
void join_parts(const Mesh& mesh, std::size_t f0, std::size_t b0, const Lane<Sw>& f1,
                const Lane<Sw>& f2, const Lane<Sw>& b1, const Lane<Sw>& b2, SweepResult& fwd,
                SweepResult& bwd, const SweepResult& f_part, const SweepResult& b_part) {
  rethrow_first_error(sweep_outcome(f1, f2), sweep_outcome(b1, b2));
  if (f1.taken) take_part(mesh, Sweep::forward, f0, f1.split, f_part, fwd);
  if (b1.taken) take_part(mesh, Sweep::backward, b0, b1.split, b_part, bwd);
}

// Both sweeps on one thread in lockstep: their first parts side by side, each followed by its
// second part where that is taken.
template <bool Axle, Integrator I, bool Level>
void sweep_both_as(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                   std::size_t f0, double vf, std::size_t b0, double vb, SweepSplits split,
                   SweepResult& fwd, SweepResult& bwd, SweepResult& f_part, SweepResult& b_part,
                   const StepTables* steps, bool quick) {
  using Sw = Sweeper<Axle, Level>;
  Sw f(env, mesh, Sweep::forward, limit, f0, vf, fwd, steps);
  Sw b(env, mesh, Sweep::backward, limit, b0, vb, bwd, steps);
  assert(f.steps() == b.steps());
  const std::size_t n = f.steps();
  const double h = mesh.step_m;
  Lane<Sw> f1(f, 0, n, split.forward), b1(b, 0, n, split.backward), f2, b2;
  std::optional<Sw> fs, bs;
  Lane<Sw>* fl = &f1;
  Lane<Sw>* bl = &b1;
  // A first part that stopped at its hand-over goes on as its second part.
  const auto second_parts = [&] {
    bool moved = false;
    if (fl == &f1 && f1.taken) {
      f2 = second_part(fs, env, mesh, Sweep::forward, limit, f0, split.forward, n, f_part, steps);
      fl = &f2;
      moved = true;
    }
    if (bl == &b1 && b1.taken) {
      b2 = second_part(bs, env, mesh, Sweep::backward, limit, b0, split.backward, n, b_part, steps);
      bl = &b2;
      moved = true;
    }
    return moved;
  };
  do lockstep<I>(*fl, *bl, h, quick);
  while (second_parts());
  do {
    alone<I>(*fl, h, quick);
    alone<I>(*bl, h, quick);
  } while (second_parts());
  f.finish();
  b.finish();
  join_parts(mesh, f0, b0, f1, f2, b1, b2, fwd, bwd, f_part, b_part);
}
template <bool Axle, Integrator I>
void sweep_both(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                std::size_t f0, double vf, std::size_t b0, double vb, SweepSplits split,
                SweepResult& fwd, SweepResult& bwd, SweepResult& f_part, SweepResult& b_part,
                const StepTables* steps, bool quick) {
  if (level_mesh(mesh))
    sweep_both_as<Axle, I, true>(env, mesh, limit, f0, vf, b0, vb, split, fwd, bwd, f_part, b_part,
                                 steps, quick);
  else
    sweep_both_as<Axle, I, false>(env, mesh, limit, f0, vf, b0, vb, split, fwd, bwd, f_part, b_part,
                                  steps, quick);
}

// Both sweeps side by side: on this thread the forward sweep's first part (going on where its
// second part is not taken) beside the backward sweep's second part, on the other the backward
// sweep's first part beside the forward sweep's second, each pair in lockstep (a second part
// runs whether or not it is taken: that is known only when its first part arrives). A sweep
// that does not split has all its steps in its first part. Each part takes the steps it takes
// in sweep_both (the parts share nothing but the Envelope, the mesh, the limits and the step
// tables, all read only), so the results and the error rethrown (join_parts) are the same bit
// for bit.
template <bool Axle, Integrator I, bool Level>
void sweep_apart_as(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                    std::size_t f0, double vf, std::size_t b0, double vb, SweepSplits split,
                    SweepResult& fwd, SweepResult& bwd, SweepResult& f_part, SweepResult& b_part,
                    const StepTables* steps, bool quick, SecondThread& second) {
  using Sw = Sweeper<Axle, Level>;
  const double h = mesh.step_m;
  // Each thread works its parts in its own stack's locals and hands them over once at the end:
  // nothing either writes as it steps shares a cache line with the other's (two step counts
  // side by side on one line, written every step by the two processors, made both sweeps some
  // 15 % slower in the processes whose stack put them there; docs/performance.md, "The two-thread
  // lap's sweeps evened out").
  Lane<Sw> f1, f2, b1, b2;
  // A thread's share: sweep d's first part beside the other sweep's second part (the forward's
  // first in the lockstep, as on one thread), handed over into `first` and `second_of_other`.
  const auto share = [&](Sweep d, Lane<Sw>& first, Lane<Sw>& second_of_other) {
    const bool forward = d == Sweep::forward;
    Sw s(env, mesh, d, limit, forward ? f0 : b0, forward ? vf : vb, forward ? fwd : bwd, steps);
    const std::size_t n = s.steps();
    const std::size_t own = forward ? split.forward : split.backward;
    const std::size_t other = forward ? split.backward : split.forward;
    std::optional<Sw> s2;
    Lane<Sw> a(s, 0, n, own), b;
    if (other < n)
      b = second_part(s2, env, mesh, forward ? Sweep::backward : Sweep::forward, limit,
                      forward ? b0 : f0, other, n, forward ? b_part : f_part, steps);
    both_then_alone<I>(forward ? a : b, forward ? b : a, h, quick);
    s.finish();
    first = a.outcome();
    second_of_other = b.outcome();
  };
  std::exception_ptr failed;  // the backward sweep's Sweeper could not be made (its buffers)
  second.start([&] {
    try {
      share(Sweep::backward, b1, f2);
    } catch (...) {
      failed = std::current_exception();
    }
  });
  try {
    share(Sweep::forward, f1, b2);
  } catch (...) {
    second.wait_quietly();
    throw;
  }
  second.wait();
  if (failed) std::rethrow_exception(failed);
  join_parts(mesh, f0, b0, f1, f2, b1, b2, fwd, bwd, f_part, b_part);
}
template <bool Axle, Integrator I>
void sweep_apart(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                 std::size_t f0, double vf, std::size_t b0, double vb, SweepSplits split,
                 SweepResult& fwd, SweepResult& bwd, SweepResult& f_part, SweepResult& b_part,
                 const StepTables* steps, bool quick, SecondThread& second) {
  if (level_mesh(mesh))
    sweep_apart_as<Axle, I, true>(env, mesh, limit, f0, vf, b0, vb, split, fwd, bwd, f_part, b_part,
                                  steps, quick, second);
  else
    sweep_apart_as<Axle, I, false>(env, mesh, limit, f0, vf, b0, vb, split, fwd, bwd, f_part,
                                   b_part, steps, quick, second);
}

// A closed lap's sweeps in two phases, where few of its steps are level straight ones
// (docs/performance.md, "The backward sweep over the stretches above the forward one"): the
// forward sweep first, then the backward sweep beside the forward sweep's final speeds,
// stepping at once over the stretches where it stands above them (Sweeper::skippable): there
// the lap's speed is the forward sweep's, and the stretch ends where the backward sweep is
// clipped to its limit, as the steps would leave it.
// Each sweep in two parts, its second afresh on the limit at its split point (phase_splits),
// as sweep_apart's: side by side in lockstep on one thread, one on each of two, the same steps
// either way, so that the lap is the same bit for bit. A forward sweep that stops the car, or
// must run again from the speed it came round at (speed_pass), leaves the backward sweep to
// take every step (its final speeds are not there yet); the error rethrown is join_parts'.
template <bool Axle, Integrator I, bool Level>
void sweep_phases_as(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                     std::size_t i0, SweepSplits split, SweepResult& fwd, SweepResult& bwd,
                     SweepResult& f_part, SweepResult& b_part, const StepTables* steps, bool quick,
                     SecondThread* second, std::size_t& skipped) {
  using Sw = Sweeper<Axle, Level>;
  const double h = mesh.step_m;
  const double v0 = limit[i0];
  // One sweep's parts into `first` and `other` (what they leave: Lane::outcome). On two
  // threads each part's Sweeper is made on its own thread's stack: nothing either writes as it
  // steps shares a cache line with the other's (sweep_apart).
  const auto phase = [&](Sweep d, std::size_t at, SweepResult& r, SweepResult& part,
                         const std::vector<double>* above, Lane<Sw>& first, Lane<Sw>& other) {
    const auto second_of = [&](std::optional<Sw>& s2, std::size_t n) {
      Lane<Sw> b = second_part(s2, env, mesh, d, limit, i0, at, n, part, steps);
      if (s2) s2->set_above(above);
      return b;
    };
    Sw s(env, mesh, d, limit, i0, v0, r, steps);
    s.set_above(above);
    const std::size_t n = s.steps();
    Lane<Sw> a(s, 0, n, at);
    if (at < n && second) {
      std::exception_ptr failed;
      second->start([&] {
        try {
          std::optional<Sw> s2;
          Lane<Sw> b = second_of(s2, n);
          alone<I>(b, h, quick);
          other = b.outcome();
        } catch (...) {
          failed = std::current_exception();
        }
      });
      try {
        alone<I>(a, h, quick);
      } catch (...) {
        second->wait_quietly();
        throw;
      }
      second->wait();
      if (failed) std::rethrow_exception(failed);
    } else {
      std::optional<Sw> s2;
      Lane<Sw> b = at < n ? second_of(s2, n) : Lane<Sw>();
      both_then_alone<I>(a, b, h, quick);
      other = b.outcome();
    }
    s.finish();
    first = a.outcome();
  };
  Lane<Sw> f1, f2, b1, b2;
  phase(Sweep::forward, split.forward, fwd, f_part, nullptr, f1, f2);
  const Lane<Sw>& f = sweep_outcome(f1, f2);
  bool final_forward = !f.error;
  if (final_forward) {
    if (f1.taken) take_part(mesh, Sweep::forward, i0, f1.split, f_part, fwd);
    final_forward = !(fwd.speed_mps[i0] < limit[i0]);
  }
  phase(Sweep::backward, split.backward, bwd, b_part, final_forward ? &fwd.speed_mps : nullptr, b1,
        b2);
  rethrow_first_error(f, sweep_outcome(b1, b2));
  if (b1.taken) take_part(mesh, Sweep::backward, i0, b1.split, b_part, bwd);
  skipped = b1.skipped + (b1.taken ? b2.skipped : 0);
}
template <bool Axle, Integrator I>
void sweep_phases(const Envelope& env, const Mesh& mesh, const std::vector<double>& limit,
                  std::size_t i0, SweepSplits split, SweepResult& fwd, SweepResult& bwd,
                  SweepResult& f_part, SweepResult& b_part, const StepTables* steps, bool quick,
                  SecondThread* second, std::size_t& skipped) {
  if (level_mesh(mesh))
    sweep_phases_as<Axle, I, true>(env, mesh, limit, i0, split, fwd, bwd, f_part, b_part, steps,
                                   quick, second, skipped);
  else
    sweep_phases_as<Axle, I, false>(env, mesh, limit, i0, split, fwd, bwd, f_part, b_part, steps,
                                    quick, second, skipped);
}

// The exponential step with no limit on a level straight in still air, as the sweeps take it
// there (Sweeper::rhs at curvature 0 on a level road): the lane the step tables are built from.
struct FreeLane {
  const Envelope& env;
  Envelope::Rows rows;
  bool forward, trimmed;
  InverseMass inv;
  mutable AxleHints hints;
  double cap(double) const { return std::numeric_limits<double>::infinity(); }
  bool clips(double) const { return false; }  // no limit
  // The sweeps' moves of the hints (Sweeper::predict_hints) are not the tables': none here.
  void predict_hints() const {}
  void note_first_reading() const {}
  void nudge_hints(double) const {}
  void note_second_reading(double) const {}
  // The largest |rhs| read so far (build_step_tables' bound).
  mutable double largest = 0.0;
  double rhs(double u, double) const {
    const double u0 = std::max(u, 0.0);
    const Road level{};
    const double f =
        2.0 * (forward
                   ? drive_accel<true>(env, rows, u0, 0.0, level, trimmed, 1.0, inv, &hints, true)
                   : brake_accel<true>(env, rows, u0, 0.0, level, inv, &hints, true));
    largest = std::max(largest, std::abs(f));
    return f;
  }
};

// A step table needs this many level still-air straight steps on a lap's mesh to be built: building
// costs about 2 million instructions and a straight step read from the tables saves about 570 over
// both sweeps (measured; docs/performance.md, "Straight steps from a table"), so one lap of a mesh
// with fewer straight steps would pay more than it gains.
constexpr std::size_t min_straight_steps = 2000;

}  // namespace

double free_straight_step(const Envelope& env, double u0, double h, Sweep direction, bool trimmed) {
  const bool forward = direction == Sweep::forward;
  FreeLane lane{env,
                env.rows(forward && trimmed),
                forward,
                forward && trimmed,
                {1.0 / env.mass_kg(), 1.0 / env.effective_mass_kg()},
                {}};
  return exponential_step<FreeLane, 1>({&lane}, {u0}, h)[0];
}

StepTables build_step_tables(const Envelope& env, double h) {
  StepTables t;
  if (!env.level_tables()) return t;
  t.h = h;
  const double top = env.max_speed_mps() * env.max_speed_mps();
  const std::size_t cells = StepTables::cell_count;
  const double du = top / static_cast<double>(cells);
  const InverseMass inv{1.0 / env.mass_kg(), 1.0 / env.effective_mass_kg()};
  // The bound on |f|: the largest the steps read (each node's step reads f at its node and,
  // for the secant, a little way on; a checked cell's middle step the same there), with a
  // quarter to spare for between them and the secant's reach beyond the top. f changes by some
  // 1e-4 of itself over half a cell (drag: d(2a)/du ~ rho CdA / m), so the readings a cell
  // apart come far within that spare. (It was read at every node and cell middle apart from
  // the steps, 2 049 more model readings a table.)
  double bound = 0.0;
  auto table = [&](bool forward, bool trimmed) {
    FreeLane lane{env, env.rows(trimmed), forward, trimmed, inv, {}};
    FreeLane* l = &lane;
    auto step_from = [&](double u0) { return exponential_step<FreeLane, 1>({l}, {u0}, h)[0]; };
    std::vector<double> nodes(cells + 1);
    for (std::size_t i = 0; i <= cells; ++i) nodes[i] = step_from(static_cast<double>(i) * du);
    CellCubics c(
        nodes, du, StepTables::check_per_m * h,
        [&](std::size_t i) { return step_from((static_cast<double>(i) + 0.5) * du); },
        !env.has_map());  // the fourth differences' screen, off with a ride-height map
    bound = std::max(bound, lane.largest);
    return c;
  };
  t.brake = table(false, false);
  t.drive = table(true, false);
  if (env.has_trim()) t.drive_trimmed = table(true, true);
  t.slope_bound = 1.25 * bound;
  return t;
}

namespace {

// The step tables for a lap on `mesh` with the exponential step, where the Envelope has
// straight-line tables and the mesh enough straight steps; else null.
// Whether a mesh has at least min_straight_steps steps the step tables can answer: curvature 0
// at both ends, level and in still air at the first (a count that decides whether to build
// them, and which order a closed lap's sweeps take, not which step reads the tables).
bool many_straight_steps(const Mesh& mesh) {
  // Counted in blocks of points, each block's count a loop without a branch (which the
  // compiler vectorises on a level mesh), until the count is reached.
  std::size_t straight = 0;
  const double* const k = mesh.curvature_1pm.data();
  const std::size_t steps = mesh.size() == 0 ? 0 : mesh.size() - 1;
  const bool level = level_mesh(mesh);
  constexpr std::size_t block = 512;
  for (std::size_t lo = 0; lo < steps && straight < min_straight_steps; lo += block) {
    const std::size_t hi = std::min(steps, lo + block);
    if (level)
      for (std::size_t i = lo; i < hi; ++i) straight += k[i] == 0.0 && k[i + 1] == 0.0;
    else
      for (std::size_t i = lo; i < hi; ++i)
        straight += k[i] == 0.0 && k[i + 1] == 0.0 && mesh.level_in_still_air(i);
  }
  return straight >= min_straight_steps;
}

// `straight`: many_straight_steps(mesh), counted once for the solve.
std::shared_ptr<const StepTables> step_tables_for(const Envelope& env, const Mesh& mesh,
                                                  Integrator integrator, bool wanted,
                                                  bool straight) {
  if (!wanted || integrator != Integrator::exponential || !env.level_tables() || !straight)
    return nullptr;
  const double h = mesh.step_m;
  return env.level_tables()->steps->get(h, [&] { return build_step_tables(env, h); });
}

// The vehicle model and the integrator, picked once per sweep: F is called as
// F.template operator()<Axle, I>().
template <typename F>
decltype(auto) dispatch(const Envelope& env, Integrator integrator, F&& f) {
  const bool axle = env.car().model == VehicleModel::axle;
  if (integrator == Integrator::exponential)
    return axle ? f.template operator()<true, Integrator::exponential>()
                : f.template operator()<false, Integrator::exponential>();
  return axle ? f.template operator()<true, Integrator::rk4>()
              : f.template operator()<false, Integrator::rk4>();
}
}  // namespace

SweepResult sweep(const Envelope& env, const Mesh& mesh, Sweep direction,
                  const std::vector<double>& limit, std::size_t start, double v_start,
                  Integrator integrator) {
  const std::size_t n = mesh.size();
  if (limit.size() != n)
    throw std::invalid_argument("sweep: a limit of " + std::to_string(limit.size()) +
                                " points for a mesh of " + std::to_string(n));
  if (start >= n)
    throw std::out_of_range("sweep: start " + std::to_string(start) +
                            " is not a point of a mesh of " + std::to_string(n));
  // A closed mesh's last point is its first (the seam): the sweep from it is the sweep from
  // point 0 (a forward sweep would otherwise step past the mesh's end).
  if (mesh.closed && start == n - 1) start = 0;
  return dispatch(env, integrator, [&]<bool Axle, Integrator I>() {
    return sweep_one<Axle, I>(env, mesh, direction, limit, start, v_start);
  });
}

namespace {

// The step count k in [lo, hi) from i0 along a sweep (forward or backward round a period of
// `period` points) of the slowest steady point to which the limit falls from the point before
// it along the sweep and no faster point follows (a corner's apex, or the first point of its
// arc); `period` where there is none.
std::size_t slowest_split(const std::vector<double>& steady, std::size_t i0, std::size_t period,
                          bool forward, std::size_t lo, std::size_t hi) {
  std::size_t split = period;
  double slowest = std::numeric_limits<double>::infinity();
  if (lo >= hi) return split;
  // Point i of step k, moved on by one a step (a division a point cost more than the test).
  std::size_t i = forward ? (i0 + lo) % period : (i0 + period - lo) % period;
  for (std::size_t k = lo; k < hi; ++k) {
    const std::size_t before = i == 0 ? period - 1 : i - 1, after = i + 1 == period ? 0 : i + 1;
    const std::size_t from = forward ? before : after, to = forward ? after : before;
    if (steady[i] < steady[from] && steady[i] <= steady[to] && steady[i] < slowest) {
      slowest = steady[i];
      split = k;
    }
    i = forward ? after : before;
  }
  return split;
}

// forward_split and backward_split (solver.hpp), worked together (one scan of the curvature):
// the slowest point 80 to 90 % of the way round along the sweep to which the limit falls from
// the point before it along the sweep, on a closed mesh of min_points_apart points or more,
// for the forward sweep where its curvature repeats at half its points or more, else for the
// backward one. The rule from measurement (lapwing_bench, two threads, lap
// time only; docs/performance.md, "The two-thread lap's sweeps evened out"): on the tracks of
// segments the forward sweep is the longer (Brannock Park, the Caldra GT with ellipse exponent 2.2:
// 226 against 159 microseconds) and its split 84 % round gave 47 ns a point against 52 whole (78 %,
// the corner before: 52, the second thread then the longer; the backward sweep split as well:
// 47 to 49); on the surveyed centerline the backward sweep brakes at every ripple of its limit
// and is the longer (1 330 against 818), the forward split made it slower (282 to 307) and the
// backward one 85 % round faster (231; 70 to 80 %: 255, 60 to 70 %: 287, 85 to 95 %: 253).
SweepSplits lap_splits(const Mesh& mesh, const std::vector<double>& steady, std::size_t i0) {
  const std::size_t n = mesh.size(), period = n - 1;
  if (steady.size() != n)
    throw std::invalid_argument("forward_split / backward_split: " + std::to_string(steady.size()) +
                                " steady limits for " + std::to_string(n) + " points");
  if (!mesh.closed) return {period, period};
  if (i0 >= period)
    throw std::out_of_range("forward_split / backward_split: start " + std::to_string(i0) +
                            " is not a point of the lap's period (" + std::to_string(period) +
                            " points)");
  if (n < min_points_apart) return {period, period};
  std::size_t repeats = 0, changes = 0;
  for (std::size_t i = 1; i < n && 2 * repeats < period && 2 * changes <= period; ++i)
    (mesh.curvature_1pm[i] == mesh.curvature_1pm[i - 1] ? repeats : changes) += 1;
  const bool forward = 2 * repeats >= period;  // which sweep splits; the other stays whole
  const std::size_t split =
      slowest_split(steady, i0, period, forward, period * 8 / 10, period * 9 / 10);
  return forward ? SweepSplits{split, period} : SweepSplits{period, split};
}

// The splits of sweep_phases: each sweep's at the slowest point (as lap_splits picks it) in
// the middle fifth of its steps from i0, so that the two parts of each phase are about even;
// a sweep with no such point, or on a mesh too short to share, stays whole.
SweepSplits phase_splits(const Mesh& mesh, const std::vector<double>& steady, std::size_t i0) {
  const std::size_t n = mesh.size(), period = n - 1;
  if (!mesh.closed || n < min_points_apart) return {period, period};
  const std::size_t lo = period * 4 / 10, hi = period * 6 / 10;
  return {slowest_split(steady, i0, period, true, lo, hi),
          slowest_split(steady, i0, period, false, lo, hi)};
}

}  // namespace

std::size_t forward_split(const Mesh& mesh, const std::vector<double>& steady, std::size_t i0) {
  return lap_splits(mesh, steady, i0).forward;
}
std::size_t backward_split(const Mesh& mesh, const std::vector<double>& steady, std::size_t i0) {
  return lap_splits(mesh, steady, i0).backward;
}

LapSolver::LapSolver(Integrator integrator, bool quick_steps)
    : integrator_(integrator), quick_steps_(quick_steps) {}
LapSolver::~LapSolver() = default;
LapSolver::LapSolver(LapSolver&&) noexcept = default;
LapSolver& LapSolver::operator=(LapSolver&&) noexcept = default;

SecondThread* LapSolver::second_thread(std::size_t points) {
  if (threads_ < 2 || points < min_points_apart) return nullptr;
  if (!second_) {
    second_ = SecondThread::try_start();
    if (!second_) threads_ = 1;  // no thread to be had: the lap on one, the same lap
  }
  return second_.get();
}

Lap solve_lap(const Envelope& env, const Mesh& mesh, double start_speed_mps,
              Integrator integrator) {
  return LapSolver(integrator).solve_once(env, mesh, start_speed_mps);
}

const Lap& LapSolver::solve(const Envelope& env, const Mesh& mesh, double start_speed_mps) {
  // The channels pass overwrites every channel: they keep their storage from the last lap (no
  // clear, which would cost a fill of each on the way back).
  speed_pass(env, mesh, start_speed_mps);
  return add_channels(env, mesh);
}

const Lap& LapSolver::solve_speed(const Envelope& env, const Mesh& mesh, double start_speed_mps) {
  speed_pass(env, mesh, start_speed_mps);
  // Speed, phase and time only: what a study that needs the lap time reads. The channels of an
  // earlier lap go, so that none is read against this lap's speeds; the storage of those it
  // held waits in spare_channels_ for the next channels pass (a channel it did not hold leaves
  // its spare as it is).
  Lap& lap = lap_;
  const auto channels = double_channels(lap);
  for (std::size_t c = 0; c < channels.size(); ++c) {
    if (!channels[c]->empty()) std::swap(*channels[c], spare_channels_[c]);
    channels[c]->clear();
  }
  lap.gear.clear();
  lap.trimmed.clear();
  return lap;
}

void LapSolver::speed_pass(const Envelope& env, const Mesh& mesh, double start_speed_mps) {
  const std::size_t n = mesh.size();
  assert(n >= 3);
  Lap& lap = lap_;
  lap.has_channels = lap.has_loads = false;  // none of this lap yet (also if the solve throws)
  lap.row_loads = false;
  lap.loads_above_mps = 0.0;
  speed_solved_ = false;
  skipped_steps_ = 0;
  SecondThread* const second = second_thread(n);
  const bool engine_drops = steady_halves(env, mesh, steady_, second);
  const auto& steady = steady_.speed_mps;
  SweepResult& fwd = forward_;
  SweepResult& bwd = backward_;

  // Counted once for the solve: whether the step tables pay and which order a closed lap's
  // sweeps take (both only with the quick steps).
  const bool straight = quick_steps_ && many_straight_steps(mesh);
  const std::shared_ptr<const StepTables> tables =
      step_tables_for(env, mesh, integrator_, quick_steps_, straight);
  auto both = [&](const std::vector<double>& limit, std::size_t f0, double vf, std::size_t b0,
                  double vb, SweepSplits split) {
    dispatch(env, integrator_, [&]<bool Axle, Integrator I>() {
      if (second)
        sweep_apart<Axle, I>(env, mesh, limit, f0, vf, b0, vb, split, fwd, bwd, forward_part_,
                             backward_part_, tables.get(), quick_steps_, *second);
      else
        sweep_both<Axle, I>(env, mesh, limit, f0, vf, b0, vb, split, fwd, bwd, forward_part_,
                            backward_part_, tables.get(), quick_steps_);
    });
  };
  auto again = [&](const std::vector<double>& limit, Sweep direction, std::size_t start, double v) {
    return dispatch(env, integrator_, [&]<bool Axle, Integrator I>() {
      return sweep_one<Axle, I>(env, mesh, direction, limit, start, v, tables.get(), quick_steps_);
    });
  };
  start_limit_mps_ = steady.front();
  // Where the sweeps start: a closed lap at its slowest steady point that the tyres or an
  // axle's lift set, where the car is on its limit however it comes (periodic; an engine's
  // limit is no such point: the car may come to it faster, at a climb's foot or into a head
  // wind), else at its slowest point of all; an open one at its first point at `start_speed`.
  std::size_t i0 = 0;
  bool engine_only = false;  // a closed lap whose every point's limit is the engine's
  if (mesh.closed) {
    const std::size_t period = n - 1;
    i0 = period;
    for (std::size_t i = 0; i < period; ++i)
      if (steady_.limit[i] != SteadyLimit::engine && (i0 == period || steady[i] < steady[i0]))
        i0 = i;
    engine_only = i0 == period;
    if (engine_only)
      i0 = static_cast<std::size_t>(
          std::min_element(steady.begin(), steady.begin() + static_cast<std::ptrdiff_t>(period)) -
          steady.begin());
  }
  // Both sweeps within `limit`, each point's speed held at or under it.
  auto sweeps = [&](const std::vector<double>& limit) {
    if (mesh.closed) {
      if (quick_steps_ && (!straight || order_ == Order::phases) &&
          env.level_resistance_floor_mps2() >= skip_floor_mps2)
        dispatch(env, integrator_, [&]<bool Axle, Integrator I>() {
          sweep_phases<Axle, I>(env, mesh, limit, i0, phase_splits(mesh, limit, i0), fwd, bwd,
                                forward_part_, backward_part_, tables.get(), quick_steps_, second,
                                skipped_steps_);
        });
      else
        both(limit, i0, limit[i0], i0, limit[i0], lap_splits(mesh, limit, i0));
      // A sweep that comes round slower than it started (it could not regain the start speed)
      // runs once more from the speed it arrived at, so that the lap is periodic.
      if (fwd.speed_mps[i0] < limit[i0]) fwd = again(limit, Sweep::forward, i0, fwd.speed_mps[i0]);
      if (bwd.speed_mps[i0] < limit[i0]) bwd = again(limit, Sweep::backward, i0, bwd.speed_mps[i0]);
    } else {
      both(limit, 0, start_speed_mps, n - 1, limit[n - 1], {n, n});
    }
  };
  // The engine's steady limit is where drive and resistance balance (or the rev limit): a car
  // that arrives there faster (a flying start, the foot of a downhill, a trim zone's end, a
  // steeper climb) slows at full drive until it is back on it, as the drive and the resistance
  // have it; the limit is not a speed to brake to. The sweeps hold every point to its steady
  // limit, which is right wherever the car reaches the engine's from below (its drive then
  // approaches it, and a backward sweep held there changes nothing: README, "Physics and
  // assumptions"). Where it would arrive above it, the sweeps are held to the tyres' and the
  // axles' limits alone at every point where a forward sweep within those alone is above the
  // engine's limit by more than engine_above_tolerance, and to the steady limits elsewhere.
  const bool flying = !mesh.closed && start_speed_mps > steady.front() * (1.0 + 1e-9) &&
                      steady_.limit.front() == SteadyLimit::engine;
  // Whether the forward sweep came to a point whose limit is the engine's faster than that
  // limit (and was held down to it there) where the backward sweep is on that limit too (so
  // that the limit, not braking for a corner ahead, sets the lap's speed there: where the
  // backward sweep is below it the forward sweep's speed changes nothing of the lap up to the
  // corner, since braking slows the car faster than drive can): only where that limit drops.
  const auto arrived_above_engine = [&]() {
    for (std::size_t i = 1; i < n; ++i)
      if (steady_.limit[i] == SteadyLimit::engine &&
          fwd.speed_mps[i - 1] > steady[i] * (1.0 + engine_above_tolerance) &&
          bwd.speed_mps[i] >= steady[i] * (1.0 - engine_above_tolerance))
        return true;
    return false;
  };
  above_engine_ = false;
  if (!flying) sweeps(steady);
  if (flying || (engine_drops && arrived_above_engine())) {
    above_engine_ = true;
    steady_halves(env, mesh, flying_, second, false);
    std::vector<double>& limit = flying_.speed_mps;
    if (flying) start_limit_mps_ = limit.front();  // the start held to the tyres' limit
    // The forward sweep within the tyres' and the axles' limits alone ("free"), from the same
    // start; the stretches where the engine's limit is left out, in the sweep's order: each
    // from a flying start or a point where the engine's limit drops with the free sweep above
    // it, to the first point where the free sweep is within engine_above_tolerance of the
    // steady limit (the sweeps then hold the car to it from there, as on any straight; the
    // free sweep can come above it elsewhere only by a step's overshoot at a rev limit, where
    // the drive stops).
    SweepResult free = again(limit, Sweep::forward, i0, mesh.closed ? steady[i0] : start_speed_mps);
    // A closed lap with no limit but the engine's starts where the car need not be on its limit
    // (it may come to i0 from above): the free sweep again from the speed it came round at,
    // until it comes round at the speed it started (the start's effect fades by exp(-3 k s /
    // m) over a lap: two or three passes).
    for (int pass = 0; engine_only && pass < 8; ++pass) {
      const double start = free.speed_mps[i0];
      free = again(limit, Sweep::forward, i0, start);
      if (std::abs(free.speed_mps[i0] - start) <= engine_above_tolerance * start) break;
    }
    const std::size_t period = mesh.closed ? n - 1 : n;
    bool lifted =
        flying || (engine_only && free.speed_mps[i0] > steady[i0] * (1.0 + engine_above_tolerance));
    if (!lifted) limit[i0] = steady[i0];
    for (std::size_t c = 1; c < period; ++c) {
      const std::size_t i = (i0 + c) % period, before = (i0 + c - 1) % period;
      const bool above = free.speed_mps[i] > steady[i] * (1.0 + engine_above_tolerance);
      const bool drop = steady_.limit[i] == SteadyLimit::engine && steady[i] < steady[before];
      lifted = above && (lifted || drop);
      if (!lifted) limit[i] = steady[i];
    }
    // There the sweeps start at the speed the free sweep comes round at (no braking sets a speed
    // on such a lap: the lap is the forward sweep's).
    if (engine_only) limit[i0] = std::min(limit[i0], free.speed_mps[i0]);
    if (mesh.closed) limit[n - 1] = limit[0];  // the seam: point n-1 is point 0 again
    sweeps(limit);
  }

  resize_ready({&lap.speed_mps, &lap.time_s}, n, second);
  lap.phase.resize(n);
  // Each point's speed and phase, and each step's time 2 ds / (v_i + v_(i+1)), exact for a
  // constant acceleration over the step (ds / mean speed; README, "Physics and assumptions"):
  // in halves of the points, the second on the second thread where there is one. The first
  // half adds its steps' times up as it goes (time_s[i + 1], the time at point i + 1); the
  // second half, which cannot know the time at its first point yet, keeps each step's own in
  // time_s[i + 1], added up after. A half stops at its first point that does not move; the
  // first half's error is the one rethrown (in_halves), the first such point of the lap.
  const double two_ds = 2.0 * mesh.step_m;
  const auto on_limit_at = [&](std::size_t i, double v) {
    return v >= steady[i] * (1.0 - phase_on_limit);
  };
  // Whether each half has a point whose steady limit is an axle's lift (most laps have none).
  std::array<bool, 2> lift_limited{false, false};
  std::size_t first_end = 0;  // the first half's last point + 1 (time_s is a running sum to it)
  lap.time_s[0] = 0.0;
  in_halves(n, second, [&](std::size_t lo, std::size_t hi) {
    const bool first = lo == 0;
    const double* const f = fwd.speed_mps.data();
    const double* const b = bwd.speed_mps.data();
    double* const speed = lap.speed_mps.data();
    double* const time = lap.time_s.data();
    const double step_twice = two_ds;  // a local: a stored time might alias the captured one
    // In loops of one kind each, the first two without a branch (the compiler vectorises them):
    // the speeds, the steps' times, the running sum, then the phases. The same operations in the
    // same order as a point at a time, so the same bits.
    for (std::size_t i = lo; i < hi; ++i) speed[i] = std::min(f[i], b[i]);
    // The step from each point of the half to the next (the last one's to the other half's
    // first point, whose speed is read from the sweeps: the other half writes it).
    // `moves` falls to 0 at a step whose speeds do not add up to more than 0 (a select, not a
    // count: the compiler vectorises the one and not the other).
    double moves = 1.0;
    for (std::size_t i = lo + 1; i < hi; ++i) {
      const double vsum = speed[i - 1] + speed[i];
      moves = vsum > 0.0 ? moves : 0.0;
      time[i] = step_twice / vsum;
    }
    const double v_after = hi < n ? std::min(f[hi], b[hi]) : 0.0;
    if (hi < n) {
      const double vsum = speed[hi - 1] + v_after;
      moves = vsum > 0.0 ? moves : 0.0;
      time[hi] = step_twice / vsum;
    }
    if (moves == 0.0)
      for (std::size_t i = lo; i < hi && i + 1 < n; ++i)
        if (!(speed[i] + (i + 1 < hi ? speed[i + 1] : v_after) > 0.0))
          throw CannotMove("the car does not move at " + where(mesh, i));
    if (first) {
      double t = 0.0;  // the first half's running time
      for (std::size_t i = lo; i < hi && i + 1 < n; ++i) {
        t += time[i + 1];
        time[i + 1] = t;
      }
    }
    bool lift = false;
    for (std::size_t i = lo; i < hi; ++i) {
      lift |= lift_limit(steady_.limit[i]);
      const bool braking = b[i] < f[i];
      lap.phase[i] = classify_phase(on_limit_for_phase(speed[i], steady[i], braking, f[i]), braking,
                                    steady_.limit[i], fwd.cut[i]);
    }
    lift_limited[first ? 0 : 1] = lift;
    if (first) first_end = hi;
  });
  // Then in order: the second half's running time on from the first's (the same additions in
  // the same order as one running sum over the lap, whatever the threads: time_s[i] =
  // time_s[i - 1] + the step's), and the stretch held on a lift limit, where there is one to
  // hold (a point held there is on a lift limit; without one the stretch is none, as the loop
  // would find).
  // The sum carried in a register: read back from time_s[i - 1], each addition waited on the
  // store before it.
  if (first_end + 1 < n) {
    double t = lap.time_s[first_end];
    for (std::size_t i = first_end + 1; i < n; ++i) {
      t = t + lap.time_s[i];
      lap.time_s[i] = t;
    }
  }
  lap.lift_hold = {};
  bool held_before = false;
  for (std::size_t i = 0; i < n && (lift_limited[0] || lift_limited[1]); ++i) {
    const bool held = lift_limit(steady_.limit[i]) && on_limit_at(i, lap.speed_mps[i]);
    if (held && !lap.lift_hold.held)
      lap.lift_hold = {true, steady_.limit[i] == SteadyLimit::front_lift, i, 0.0};
    if (i > 0) lap.lift_hold.length_m += 0.5 * mesh.step_m * (held + held_before);
    held_before = held;
  }
  lap.lap_time_s = lap.time_s[n - 1];
  speed_solved_ = true;
}

const Lap& LapSolver::add_channels(const Envelope& env, const Mesh& mesh, ChannelSet set,
                                   double loads_above_mps) {
  return fill_channels(env, mesh, set, set == ChannelSet::loads ? loads_above_mps : 0.0, nullptr,
                       "add_channels");
}

const Lap& LapSolver::add_row_loads(const Envelope& env, const Mesh& mesh, const RowLoads& want) {
  return fill_channels(env, mesh, ChannelSet::loads,
                       std::min(want.drive_above_mps, want.turning_above_mps), &want,
                       "add_row_loads");
}

const Lap& LapSolver::fill_channels(const Envelope& env, const Mesh& mesh, ChannelSet set,
                                    double floor_mps, const RowLoads* row, const char* caller) {
  const std::size_t n = mesh.size();
  Lap& lap = lap_;
  if (!speed_solved_ || lap.speed_mps.size() != n || forward_.gear.size() != n)
    throw std::logic_error(std::string("LapSolver::") + caller + ": no speed solve on this mesh");
  // A lap that already holds what is asked stays: every channel, or the loads at every point
  // from this floor or a lower one up (a row's loads hold fewer).
  if (lap.has_channels || (set == ChannelSet::loads && lap.has_loads && !lap.row_loads &&
                           lap.loads_above_mps <= floor_mps))
    return lap;
  // A copy: the forward sweep keeps its buffer for the next lap. The loads alone do not read
  // the gears (channels_pass clears them).
  if (set == ChannelSet::all) lap.gear.assign(forward_.gear.begin(), forward_.gear.end());
  channels_pass(env, mesh, set, floor_mps, row);
  return lap;
}

Lap LapSolver::solve_once(const Envelope& env, const Mesh& mesh, double start_speed_mps) {
  solve_speed(env, mesh, start_speed_mps);
  return take_with_channels(env, mesh);
}

Lap LapSolver::take_with_channels(const Envelope& env, const Mesh& mesh) {
  if (!speed_solved_ || lap_.speed_mps.size() != mesh.size() || forward_.gear.size() != mesh.size())
    throw std::logic_error("LapSolver::take_with_channels: no speed solve on this mesh");
  // The channels pass reads the forward sweep's gears alone: the lap takes them, and the rest
  // of the solver's state goes before the channels are made (README, "Memory").
  lap_.gear = std::move(forward_.gear);
  // Three channels take the storage of the sweeps' and the steady limits' speeds, already
  // touched: the first touch of a page costs more than the channels pass's writes to it
  // (docs/performance.md, "A lone lap on two threads"). The channels pass overwrites every value.
  for (auto [to, from] : {std::pair{&lap_.long_accel_mps2, &forward_.speed_mps},
                          std::pair{&lap_.lat_accel_mps2, &backward_.speed_mps},
                          std::pair{&lap_.engine_radps, &steady_.speed_mps}})
    if (to->capacity() < mesh.size()) *to = std::move(*from);
  forward_ = {};
  forward_part_ = {};
  backward_part_ = {};
  backward_ = {};
  steady_ = {};
  flying_ = {};
  channels_pass(env, mesh);
  return take();
}

void LapSolver::channels_pass(const Envelope& env, const Mesh& mesh, ChannelSet set,
                              double loads_above_mps, const RowLoads* row) {
  const std::size_t n = mesh.size();
  Lap& lap = lap_;
  const bool all = set == ChannelSet::all;
  assert(lap.speed_mps.size() == n && (!all || lap.gear.size() == n));
  lap.has_channels = all;
  lap.has_loads = true;
  lap.loads_above_mps = all ? 0.0 : loads_above_mps;
  lap.row_loads = !all && row;
  const double floor_mps = lap.loads_above_mps;
  // Channels along the lap.
  const Car& car = env.car();
  const double m = env.mass_kg(), wb = car.wheelbase_m;
  SecondThread* const second = second_thread(n);
  // A channel the pass writes takes its storage back from spare_channels_ (solve_speed) where
  // that holds the mesh's points: every value is overwritten below, with no fill before it at
  // the same mesh's size (resize_ready shortens it, or fills only the points it adds, for a
  // mesh of another size). Nothing stays aside beside the lap's own storage: a solver that
  // takes two meshes in turn (a sweep over two tracks) would hold both sizes' channels, more
  // than the memory estimate counts a solver (study/memory.hpp), and fill them every lap.
  {
    const auto channels = double_channels(lap);
    for (std::size_t c = 0; c < channels.size(); ++c) {
      std::vector<double>& spare = spare_channels_[c];
      if (channels[c]->empty() && spare.capacity() >= n) std::swap(*channels[c], spare);
      std::vector<double>().swap(spare);
    }
  }
  if (all)
    resize_ready({&lap.long_accel_mps2, &lap.lat_accel_mps2, &lap.drag_n, &lap.downforce_n,
                  &lap.front_load_n, &lap.rear_load_n, &lap.engine_radps, &lap.aero_balance_eff,
                  &lap.front_usage, &lap.rear_usage},
                 n, second);
  else
    resize_ready({&lap.long_accel_mps2, &lap.lat_accel_mps2, &lap.drag_n, &lap.downforce_n,
                  &lap.front_load_n, &lap.rear_load_n},
                 n, second);
  lap.trimmed.resize(n);
  if (!all)
    for (auto* v : {&lap.engine_radps, &lap.aero_balance_eff, &lap.front_usage, &lap.rear_usage})
      v->clear();
  if (!all) lap.gear.clear();
  // The acceleration at a point: d(v^2)/(2 ds) by the central difference
  // (v_{i+1}^2 - v_{i-1}^2) / (4 ds) (through the seam of a closed lap; one-sided at the ends of
  // an open track), held within what the model allows in the state at the point: no harder than
  // its braking, no more than its drive. The two differ only where the acceleration jumps: at an
  // apex between braking and drive, where a grade or the straight-line trim changes, where a
  // sweep meets the steady limit. There the difference mixes two states, and the loads and
  // usage worked from it would show an axle beyond its grip that the solver never used.
  const InverseMass inv{1.0 / m, 1.0 / env.effective_mass_kg()};
  const bool axle_model = car.model == VehicleModel::axle;
  const bool tables = axle_model && env.level_tables();
  // The points from lo to hi (not included). The axle model's hints go from point to point, as
  // in the sweeps, and start afresh at lo.
  // `every`: std::true_type for every channel, std::false_type for the loads alone, so that
  // each loop is compiled for its own set.
  // `level`: std::true_type on a level mesh (level_mesh: the Sweeper's `Level`), whose every
  // point's road is the level one in still air, known without reading the mesh.
  const auto points = [&](auto every, auto level, std::size_t lo_point, std::size_t hi_point) {
    constexpr bool All = decltype(every)::value;
    constexpr bool Level = decltype(level)::value;
    AxleHints drive_hints, brake_hints;
    // The axle loads at acceleration ax on the forces f (an axle at its lift limit rounded to
    // 0 N, below), and what each axle carries there (`usage`).
    const auto loads_at = [&](const Envelope::RoadForces& f, const Road& road, double ax) {
      AxleLoads loads =
          axle_loads(car, f.drag_n, f.downforce_n, f.balance, f.normal_share, road.sin_slope, ax);
      // An axle at its lift limit (a rear-driven car's front at front_bound with no lateral
      // force to hold: axle.cpp) carries 0 N, which the sum above rounds to some -1e-12 N: within
      // 1e-12 of the total load it is written 0. A larger negative load stays as it is (a
      // defect to see, not to hide).
      const double rounding = 1e-12 * std::abs(loads.front_n + loads.rear_n);
      for (double* axle_n : {&loads.front_n, &loads.rear_n})
        if (*axle_n < 0.0 && *axle_n >= -rounding) *axle_n = 0.0;
      return loads;
    };
    const auto usage = [&](const Envelope::RoadForces& f, const AxleLoads& loads, double ax) {
      return axle_usage(env, loads, m * ax + f.resistance_n, std::abs(f.lateral_n));
    };
    // The acceleration at point i (above) on forces f, read in the state the channels show
    // (`trimmed`), and, where it was worked on the way, what the axles carry there (`use`,
    // `used` true).
    const auto point_accel = [&](std::size_t i, const Road& road, const Envelope::RoadForces& f,
                                 bool trimmed, AxleUsage& use, bool& used) {
      std::size_t lo = i, hi = i;
      if (i > 0)
        lo = i - 1;
      else if (mesh.closed)
        lo = n - 2;
      if (i + 1 < n)
        hi = i + 1;
      else if (mesh.closed)
        hi = 1;
      const double span = mesh.step_m * static_cast<double>((lo != i) + (hi != i));
      const double u = lap.speed_mps[i] * lap.speed_mps[i];
      const double diff =
          (lap.speed_mps[hi] * lap.speed_mps[hi] - lap.speed_mps[lo] * lap.speed_mps[lo]) /
          (2.0 * span);
      // A point held on its steady limit with the same speed on either side (an arc taken at
      // its limit, a top speed held) does not accelerate: the model's answer there is 0 to
      // within its tolerance (the limit is where the tyres or the engine just hold the speed;
      // the axle model's fixed point to 1e-9 m/s^2), and asking it returns only that rounding.
      // Over half the curved points of a lap are such points (Brannock Park: 716 of 1268).
      if (diff == 0.0 && on_steady_limit(lap.phase[i])) return 0.0;
      const double k = std::abs(mesh.curvature_1pm[i]);
      const bool straight = tables && k == 0.0 && (Level || level_in_still_air(road));
      const bool trims = diff >= 0.0 && env.trims(k) && mesh.trim_zone[i];
      // The axle model off the straight-line tables: where both axles carry what the
      // difference asks (usage <= 1 on each, at the loads it sets) and, under drive, the engine
      // gives it, the model's limit is at or above it (its feasible accelerations are an
      // interval: axle.cpp), and the answer is the difference itself, without the model's
      // fixed point (two to five evaluations of the ellipse's powers where this test takes
      // two). It agrees with the model's answer to the model's tolerance (1e-9 m/s^2), where
      // the difference lies that close under the limit. Only where the channels read the
      // state the model would (the same trim).
      if (axle_model && !straight && trims == trimmed) {
        const AxleLoads loads = loads_at(f, road, diff);
        const bool engine =
            diff < 0.0 || diff <= (f.drive_n - f.resistance_n) / env.effective_mass_kg();
        // The loads alone keep no usage: where both axles surely carry the difference (inside
        // the ellipse by a margin, told without its powers), the test below would say so too.
        if (!All && engine &&
            axle_surely_within(env, loads, m * diff + f.resistance_n, std::abs(f.lateral_n))) {
          use = AxleUsage{loads, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
          used = true;
          return diff;
        }
        use = usage(f, loads, diff);
        // An axle lifted by the difference (its load below 0 beyond rounding: loads_at) reads
        // usage 0 where it is asked for nothing (a rear-driven car's front on a straight), though
        // the model bounds the acceleration there (axle_drive_accel's front_bound).
        used = engine && use.front_usage <= 1.0 && use.rear_usage <= 1.0 &&
               use.loads.front_n >= 0.0 && use.loads.rear_n >= 0.0;
        if (used) return diff;
      }
      if (diff >= 0.0) {
        // On a straight the forces at the point are those worked for its channels where the
        // trim is the same (the rows the drive reads); where the tables give no answer from
        // them, the model's (drive_accel, without trying the tables again).
        double a;
        const bool tried = straight && trims == trimmed;
        if (tried && straight_drive_on(env, f, u, trims, 1.0, a)) return std::min(diff, a);
        const Envelope::Rows rows = env.rows(trims);
        return std::min(diff, axle_model
                                  ? drive_accel<true>(env, rows, u, k, road, trims, 1.0, inv,
                                                      &drive_hints, straight && !tried)
                                  : drive_accel<false>(env, rows, u, k, road, trims, 1.0, inv));
      }
      const Envelope::Rows rows = env.rows(false);
      return std::max(
          diff, -(axle_model ? brake_accel<true>(env, rows, u, k, road, inv, &brake_hints, straight)
                             : brake_accel<false>(env, rows, u, k, road, inv)));
    };
    RoadReader road_at(mesh);
    for (std::size_t i = lo_point; i < hi_point; ++i) {
      const double v = lap.speed_mps[i];
      const double k = std::abs(mesh.curvature_1pm[i]);
      const bool trimmed = env.trims(k) && mesh.trim_zone[i] && under_drive(lap.phase[i]);
      lap.trimmed[i] = trimmed;
      if (v < floor_mps) {  // below the loads' floor (never with every channel): NaN
        const double nan = std::numeric_limits<double>::quiet_NaN();
        for (auto* c : {&lap.long_accel_mps2, &lap.lat_accel_mps2, &lap.drag_n, &lap.downforce_n,
                        &lap.front_load_n, &lap.rear_load_n})
          (*c)[i] = nan;
        continue;
      }
      const Road road = Level ? road_at.level(i) : road_at(i);
      // Lateral acceleration in the road's plane, signed as the curvature: F_y / m (v^2 kappa on
      // a flat road; less the weight's part down a bank). The body's loads alone (what
      // road_forces works it from, the same to the bit), without the aero tables' read.
      const double lat = (mesh.curvature_1pm[i] < 0.0 ? -1.0 : 1.0) *
                         body_loads(env.mass_kg(), v * v, k, road).lateral_n / m;
      lap.lat_accel_mps2[i] = lat;
      // A sweep's row reads the loads and the aero forces only under full drive at speed and in
      // the window's turns.
      if (!All && row &&
          !((v > row->drive_above_mps && full_drive(lap.phase[i])) ||
            (v > row->turning_above_mps && std::abs(lat) > row->turning_mps2))) {
        const double nan = std::numeric_limits<double>::quiet_NaN();
        lap.long_accel_mps2[i] = lap.front_load_n[i] = lap.rear_load_n[i] = nan;
        lap.drag_n[i] = lap.downforce_n[i] = nan;
        continue;
      }
      const Envelope::RoadForces f = env.road_forces(env.rows(trimmed), v * v, k, road);
      lap.drag_n[i] = f.drag_n;
      lap.downforce_n[i] = f.downforce_n;
      AxleUsage tested;
      bool used = false;
      const double ax = point_accel(i, road, f, trimmed, tested, used);
      lap.long_accel_mps2[i] = ax;
      // Axle loads and what each axle carries (axle.hpp): the tyre force along the path is what
      // accelerates the car's mass m plus the resistance (the rotating parts' spin-up is torque
      // inside the driveline, not road force).
      const AxleLoads loads = used ? tested.loads : loads_at(f, road, ax);
      lap.front_load_n[i] = loads.front_n;
      lap.rear_load_n[i] = loads.rear_n;
      // The rest for every channel alone (ChannelSet::all): gear and engine speed, the aero
      // balance with the drag moment, the axles' usage (the ellipse's powers).
      if constexpr (!All) continue;
      // Under drive the gear the forward sweep engaged (held through a shift's cut; lap.gear holds
      // it on entry); under braking the best gear for the speed.
      // The gear tables hold a row's gear up to the next row (Envelope::gear), so the point
      // where an upshift falls can read the old gear a little past its rev limit: the trace
      // takes the lowest gear from there up in which the speed is within the rev limit (to the
      // 1e-12 best_drive allows), so that gear, rpm and speed agree. The rpm is the speed's in
      // that gear, held only at the curve's first rpm below it, where the clutch slips
      // (README, "Physics and assumptions").
      const Powertrain& pt = car.powertrain;
      int gear = pt.ideal ? 0 : (lap.phase[i] == Phase::brake ? env.gear(v) : lap.gear[i]);
      const double wheel_radps = v / car.tyres.rolling_radius_m;
      const auto engine_in = [&](int g) {
        return wheel_radps * pt.gears[static_cast<std::size_t>(g - 1)] * pt.final_drive;
      };
      if (!pt.ideal)
        while (gear < static_cast<int>(pt.gears.size()) &&
               engine_in(gear) > pt.rev_limit_radps * (1.0 + 1e-12))
          ++gear;
      lap.gear[i] = gear;
      lap.engine_radps[i] = pt.ideal ? 0.0 : std::max(engine_in(gear), pt.engine_radps.front());
      // Front share of the aero load with the drag moment (axle.hpp; the coefficients' rho / 2
      // cancels); NaN, written as an empty field, where there is no downforce to share. The drag
      // pulls backwards only while the air flows past the car from the front: a tail wind faster
      // than the car turns it, and its moment loads the front (a helper's finding: the share
      // took the moment off the front there, where the axle loads beside it had it right).
      const double drag_sign = f.drag_n < 0.0 ? -1.0 : 1.0;
      lap.aero_balance_eff[i] = aero_balance_with_drag_moment(f.lift_coef, drag_sign * f.drag_coef,
                                                              f.balance, car.drag_height_m, wb)
                                    .value_or(std::numeric_limits<double>::quiet_NaN());
      const AxleUsage use = used ? tested : usage(f, loads, ax);
      lap.front_usage[i] = use.front_usage;
      lap.rear_usage[i] = use.rear_usage;
    }
  };
  // Always the same two halves, whatever the threads (the hints start afresh at the second), so
  // that the channels are the same bit for bit on one thread or two.
  const bool level = level_mesh(mesh);
  in_halves(n, second, [&](std::size_t lo, std::size_t hi) {
    if (all && level)
      points(std::true_type{}, std::true_type{}, lo, hi);
    else if (all)
      points(std::true_type{}, std::false_type{}, lo, hi);
    else if (level)
      points(std::false_type{}, std::true_type{}, lo, hi);
    else
      points(std::false_type{}, std::false_type{}, lo, hi);
  });
}

std::array<std::vector<double>*, 10> LapSolver::double_channels(Lap& lap) {
  return {&lap.long_accel_mps2, &lap.lat_accel_mps2, &lap.engine_radps, &lap.drag_n,
          &lap.downforce_n,     &lap.front_load_n,   &lap.rear_load_n,  &lap.aero_balance_eff,
          &lap.front_usage,     &lap.rear_usage};
}

Lap LapSolver::take() {
  return std::move(lap_);
}

}  // namespace lapwing
