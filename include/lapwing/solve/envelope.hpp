// What the car can do at each speed, precomputed once per car x config x air, so that the
// solver's per-point work is table look-ups and a few flops (STYLE, habit 12).
#pragma once

#include <algorithm>
#include <cstddef>
#include <functional>
#include <memory>
#include <optional>
#include <vector>

#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/loads.hpp"
#include "lapwing/model/tyre.hpp"

namespace lapwing {

struct EnvelopeOptions {
  // Table rows, evenly spaced in v^2 from 0 to the maximum speed squared: the solver works in
  // u = v^2 and reads the table without a square root. 8001 rows put them 0.03 m/s apart at
  // 200 km/h (and 0.25 m/s apart at 20 km/h) for a car topping out at 400 km/h.
  std::size_t speed_points = 8001;
  // Top of the tables of a gearless car: this factor times its level-road top speed. Above the
  // level top speed only a downhill drives the car faster. At 1.25 x the top speed the drag is
  // 1.56 x and the drive (eta P / v) 0.8 x their value there, so holding that speed takes a
  // downhill of sin(theta) ~ 0.76 eta P / (v_top m g): about 0.3 (a 30 % grade) for a car of
  // 400 W/kg topping out at 320 km/h. A lap that reaches the top is warned of all the same.
  double table_margin = 1.25;
  // The tables never go beyond this speed (900 km/h, about Mach 0.73 in sea-level air): a car
  // with no finite top speed below it (no drag and no rolling resistance, or a gearbox geared
  // beyond it) is tabulated up to here and a lap that reaches it is warned of. Coefficients
  // measured at circuit speeds say nothing this close to the speed of sound (compressibility,
  // common practice).
  double speed_ceiling_mps = 250.0;
  // The axle model's straight-line tables (solve/level_tables.hpp), built with the Envelope
  // and read by the solver on level straights in still air. Off: the solver asks the model at
  // every stage (tests compare the two).
  bool level_tables = true;

  /// 2 to 10 million rows, a margin above 1, a positive ceiling (key paths: member names).
  std::optional<Violation> validate() const;
};

/// What sets the top of an Envelope's tables, and so the level-road top speed check reports.
enum class TopSpeedLimit {
  drag,        // drive equals drag + rolling resistance below the tables' top
  rev_limit,   // the rev limit in top gear: the engine turns no faster (the tables' top)
  ceiling,     // EnvelopeOptions::speed_ceiling_mps: no finite top speed below it
  traction,    // check only (level_traction_speed_mps): the tyres cannot carry the resistance
               // beyond; never an Envelope's own limit
  front_lift,  // check only (level_lift_speed, axle model): the front axle's load at a_x = 0
  rear_lift    // (or the rear's) reaches zero beyond; never an Envelope's own limit
};
/// "drag", "rev limit", "table ceiling", "traction", "front lift", "rear lift".
const char* top_speed_limit_name(TopSpeedLimit l);

/// A car with one config applied (ConfiguredCar) in one air, tabulated over speed.
struct LevelTables;

class Envelope {
 public:
  /// A car that breaks a rule (Car::validate), air of no density or bad options are an
  /// InvalidInput: a library caller gets the words a file would, not a nonsense lap.
  Envelope(const ConfiguredCar& car, const Air& air, EnvelopeOptions options = {});
  /// For a study that moves a valid car past the files' ranges on purpose (a trade's finite
  /// differences: ClA +-0.02 m2 around a car without downforce, +15 % of a 30 m2 ClA): the car's
  /// rules are not checked, the air's and the options' are.
  struct Unchecked {};
  Envelope(Unchecked, const ConfiguredCar& car, const Air& air, EnvelopeOptions options = {});

  // Fixed parameters, SI.
  double mass_kg() const { return mass_; }
  double effective_mass_kg() const { return mass_eff_; }  // m (1 + inertia_factor)
  double air_density() const { return rho_; }
  /// Top of the tables: a geared car's rev limit in top gear; a gearless car's level-road top
  /// speed times EnvelopeOptions::table_margin; never above the ceiling. No speed of a lap
  /// exceeds it: a lap that reaches it is held there (and warned of, see summary.hpp).
  double max_speed_mps() const { return v_max_; }
  /// Drive = resistance on the level (with the straight-line trim, where the config has one);
  /// the tables' top where drive still exceeds resistance there (see top_speed_limit()).
  double top_speed_level_mps() const { return v_top_; }
  TopSpeedLimit top_speed_limit() const { return top_limit_; }
  bool rev_limited() const { return top_limit_ == TopSpeedLimit::rev_limit; }
  /// What the tables' top is: the rev limit, the margin over the level top speed, or the
  /// ceiling (TopSpeedLimit::drag here means the margin).
  TopSpeedLimit table_top_reason() const { return table_top_; }
  double table_margin() const { return table_margin_; }
  const TyreModel& tyres() const { return tyres_; }
  /// The car-level values (with the config's overrides) and the applied config.
  const Car& car() const { return car_.car(); }
  const AeroConfig& aero() const { return car_.aero(); }
  const ConfiguredCar& configured_car() const { return car_; }
  const std::string& config_name() const { return car_.aero().name; }
  /// The share of the rated engine curve the engine gives in this air (engine_power_ratio,
  /// model/powertrain.hpp): every drive force in the tables carries it.
  double power_ratio() const { return power_ratio_; }
  /// Lateral load transfer per newton of lateral force, front and rear (model/loads.hpp).
  const TransferPerNewton& transfer() const { return transfer_; }

  /// The speed-dependent quantities at one speed, read from the table with one index
  /// computation (linear between rows; rows at the table's ends outside it).
  struct Sample {
    double drive_n;    // at the wheels, best gear
    double drag_coef;  // 0.5 rho CdA(v): drag = drag_coef v^2
    double lift_coef;  // 0.5 rho ClA(v): downforce = lift_coef v^2
    double balance;    // front share of downforce
  };
  /// A view of one table (plain or trimmed) for the hot loop: its rows, last index and 1/du
  /// held in registers, no choice of table per read.
  struct Rows {
    const Sample* rows;
    std::size_t last;
    double inv_du;
    /// The row at speed squared u = v^2 (m^2/s^2), linear between rows, held at the ends.
    [[gnu::always_inline]] Sample at(double u) const {
      const double f = u * inv_du;
      if (!(f > 0.0)) return rows[0];
      if (f >= static_cast<double>(last)) return rows[last];
      const std::size_t i = static_cast<std::size_t>(f);
      const double w = f - static_cast<double>(i);
      const Sample& a = rows[i];
      const Sample& b = rows[i + 1];
      return {lerp(a.drive_n, b.drive_n, w), lerp(a.drag_coef, b.drag_coef, w),
              lerp(a.lift_coef, b.lift_coef, w), lerp(a.balance, b.balance, w)};
    }
  };
  /// `trimmed` reads the straight-line trim's rows (only where trims() says so).
  Rows rows(bool trimmed = false) const {
    const std::vector<Sample>& r = trimmed ? trim_rows_ : rows_;
    return {r.data(), r.size() - 1, inv_du_};
  }
  Sample sample_sq(double u, bool trimmed = false) const { return rows(trimmed).at(u); }
  Sample sample(double v, bool trimmed = false) const { return sample_sq(v * v, trimmed); }

  /// Straight-line trim (movable aero): applies under full drive where |curvature| is below the
  /// config's threshold.
  bool has_trim() const { return !trim_rows_.empty(); }
  bool trims(double abs_curvature_1pm) const {
    return !trim_rows_.empty() && abs_curvature_1pm < trim_below_curvature_;
  }

  /// Ride-height map: the operating point at speed v (interpolated between solved speeds).
  /// Without a map: the config's coefficients, heights 0.
  bool has_map() const { return !map_points_.empty(); }
  AeroPoint aero_point(double v) const;
  /// The speeds at which a ride height is off the map (or at or below zero), as spans [lo, hi)
  /// in m/s, their ends found by bisection between the map's solved speeds (to 1e-6 m/s): a
  /// span from 0 is "below hi", one to the tables' top has hi = infinity.
  struct SpeedSpan {
    double lo_mps, hi_mps;
  };
  const std::vector<SpeedSpan>& off_map_spans() const { return off_map_spans_; }
  const std::vector<SpeedSpan>& grounded_spans() const { return grounded_spans_; }

  double drive_n(double v) const { return sample(v).drive_n; }
  int gear(double v) const { return gear_[index(v)]; }
  /// Aero forces: 0.5 rho C(v) v^2 with C interpolated over speed.
  double drag_n(double v) const { return sample(v).drag_coef * v * v; }
  double downforce_n(double v) const { return sample(v).lift_coef * v * v; }
  double aero_balance(double v) const { return sample(v).balance; }
  double weight_n() const { return weight_; }
  /// The axle model's straight-line tables (level road, still air, curvature 0); null for the
  /// point mass or where EnvelopeOptions::level_tables is off.
  const LevelTables* level_tables() const { return level_.get(); }
  double rolling_resistance() const { return crr_; }
  /// A floor under the resistance's deceleration (m/s^2) on a level road in still air at any
  /// speed of the tables: rolling resistance on the weight, where drag and rolling resistance
  /// on the downforce add to it at every speed (they do unless a ride-height map's lift or
  /// drag turns negative); else 0. Braking on such a road decelerates by at least this much
  /// (the tyres' force left is never negative).
  double level_resistance_floor_mps2() const { return level_resistance_floor_mps2_; }
  /// Row by row (row k at u = k du), the least net drive h = drive - (drag_coef + crr lift_coef)
  /// u over the rows from the first to that one, on the plain or the trimmed rows: where the
  /// wind is still and the road has no bank the resistance less the drive is c - h(u), c = W
  /// (crr cos(slope) + sin(slope)) (road_forces), so the first row at which this falls below c
  /// is the first whose drive falls short from rest up (steady_points: the engine's limit from
  /// rest where a dip in the drive gives a road two top speeds). A car's net drive rises in
  /// each gear below its torque's peak and falls from gear to gear.
  const std::vector<double>& net_drive_floor(bool trimmed) const {
    return trimmed ? trim_net_floor_ : net_floor_;
  }

  /// The forces on the road at u = v^2 on a point of curvature |k| (model/loads.hpp): the
  /// aero forces at the airspeed (airspeed_squared), the share of the weight the road carries
  /// normal to itself and the lateral force the tyres must supply (body_loads, + towards the
  /// turn's centre), the normal load (normal_load_n), the resistance along the path
  /// (resistance_n), and the drive in the best gear. One table read.
  struct RoadForces {
    double drag_n, downforce_n, balance, normal_share, normal_n, lateral_n, resistance_n, drive_n;
    double drag_coef, lift_coef;  // the row's coefficients (Sample), for the channels
  };
  [[gnu::always_inline]] RoadForces road_forces(const Rows& rows, double u, double abs_curvature,
                                                const Road& road) const {
    const Sample s = rows.at(u);
    const AirspeedSquared q = airspeed_squared(u, road.head_wind_mps);
    const double drag = s.drag_coef * q.drag, down = s.lift_coef * q.lift;
    const BodyLoads b = body_loads(mass_, u, abs_curvature, road);
    const double normal = lapwing::normal_load_n(weight_, b.normal_share, down);
    return {drag,
            down,
            s.balance,
            b.normal_share,
            normal,
            b.lateral_n,
            lapwing::resistance_n(drag, crr_, normal, weight_, road.sin_slope),
            s.drive_n,
            s.drag_coef,
            s.lift_coef};
  }

  /// Vertical load on the tyres at speed v (lapwing::normal_load_n, model/loads.hpp).
  double normal_load_n(double v, double cos_grade, bool trimmed = false) const {
    return lapwing::normal_load_n(weight_, cos_grade, sample(v, trimmed).lift_coef * v * v);
  }
  /// Resistance to motion along the path at speed v (lapwing::resistance_n, model/loads.hpp).
  double resistance_n(double v, double cos_grade, double sin_grade, bool trimmed = false) const {
    const Sample s = sample(v, trimmed);
    return lapwing::resistance_n(s.drag_coef * v * v, crr_,
                                 lapwing::normal_load_n(weight_, cos_grade, s.lift_coef * v * v),
                                 weight_, sin_grade);
  }

 private:
  /// The net drive h at row k of the plain or the trimmed rows (net_drive_floor).
  double net_drive(bool trimmed, std::size_t k) const {
    const Sample& row = (trimmed ? trim_rows_ : rows_)[k];
    return row.drive_n - (row.drag_coef + crr_ * row.lift_coef) * (static_cast<double>(k) * du_);
  }
  /// The row at or below v: the gear in use up to the speed where the next one takes over.
  std::size_t index(double v) const {
    const double f = std::clamp(v * v * inv_du_, 0.0, static_cast<double>(rows_.size() - 1));
    return static_cast<std::size_t>(f);
  }
  Envelope(Unchecked, const ConfiguredCar& configured, const Car& car, const Air& air,
           EnvelopeOptions options);

  ConfiguredCar car_;
  TyreModel tyres_;
  double power_ratio_ = 1.0;
  TransferPerNewton transfer_;
  double mass_, mass_eff_, weight_, crr_, rho_;
  double level_resistance_floor_mps2_ = 0.0;
  double v_max_, v_top_, du_, inv_du_;
  TopSpeedLimit top_limit_ = TopSpeedLimit::drag, table_top_ = TopSpeedLimit::drag;
  double table_margin_;
  std::vector<Sample> rows_;       // one row per step du_ of v^2
  std::vector<Sample> trim_rows_;  // the same with the straight-line trim (empty: none)
  double trim_below_curvature_ = 0.0;
  std::vector<double> net_floor_, trim_net_floor_;  // net_drive_floor
  std::vector<AeroPoint> map_points_;  // ride-height solutions every map_dv_ (empty: no map)
  double map_dv_ = 0.0;
  std::vector<SpeedSpan> off_map_spans_, grounded_spans_;
  std::vector<int> gear_;
  std::shared_ptr<const LevelTables> level_;  // shared by copies: the same car and air
};

/// The engine's limit from rest up. Where a dip in the drive gives a road two top speeds (the
/// drive in the best gear falls short of the resistance, then exceeds it again higher up), a
/// search's answer `found` (the steady limits' from the top down, the Envelope's own level top
/// speed) can be the upper one (the engine holds the tables' top, or the last point's answer
/// brackets it), which a car accelerating from below never reaches: a differential campaign
/// against a scan of drive and resistance (2026-12-05) found a bend's limit read `grip` at 78.85
/// m/s where the drive fell 166 N short, the engine holding up to 77.97 and again from 89.41. Where
/// the road has no bank and the air is still (Envelope::net_drive_floor) and the car holds a
/// standstill, a row below `found` whose drive falls short moves the answer to the first crossing
/// from rest: the root in the cell of the first row whose net drive falls below the resistance at
/// rest, c = W (crr cos(slope) + sin(slope)). Elsewhere, and where no row below `found` falls short
/// (one crossing: every bundled car; Envelope::net_drive_floor tells it at once), `found` as it
/// was; so too where the two differ by no more than the rows' rounding. `short_n(v)`: the
/// resistance less the drive in the best gear at v on that road; `bits`: the root's tolerance
/// (Boost's eps_tolerance).
double engine_from_rest(const Envelope& env, bool trimmed, const Road& road,
                        const std::function<double(double)>& short_n, double found, int bits);

}  // namespace lapwing
