#include "lapwing/study/check_summary.hpp"

#include <algorithm>
#include <cmath>
#include <tuple>
#include <utility>

#include "lapwing/base/units.hpp"
#include "lapwing/model/loads.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"

namespace lapwing {

namespace {
// The Envelopes check reads for their tables' top speed and aero points only: no lap is solved
// on them, so the axle model's level tables (most of an Envelope's build) are left out.
EnvelopeOptions without_level_tables() {
  EnvelopeOptions o;
  o.level_tables = false;
  return o;
}

// The level-road top speed of the car's model: the least of the engine's (drag, rev limit or
// the tables' ceiling), the tyres' (the speed beyond which the driven axle, or the point
// mass's four tyres, cannot carry the resistance: a low mu_long, or tyres loaded past their
// force's peak by downforce) and, on the axle model, the axles' (the speed at which the drag
// moment or the aero balance leaves an axle no load: level_lift_speed). A lap on a long enough
// straight reaches it, not the engine's.
std::pair<double, TopSpeedLimit> level_top_speed(const Envelope& env) {
  const double engine = env.top_speed_level_mps();
  const double tyres = level_traction_speed_mps(env);
  const LevelLift lift = level_lift_speed(env);
  std::pair<double, TopSpeedLimit> top{engine, env.top_speed_limit()};
  if (tyres < top.first) top = {tyres, TopSpeedLimit::traction};
  if (lift.axle != SteadyLimit::grip && lift.speed_mps < top.first)
    top = {lift.speed_mps, lift.axle == SteadyLimit::front_lift ? TopSpeedLimit::front_lift
                                                                : TopSpeedLimit::rear_lift};
  return top;
}
// Where the heaviest tyre on a level straight at steady speed (a_x = 0, no lateral force)
// reaches the load of its force's peak: scanned in steps of 0.5 m/s up to the tables' top, the
// crossing then bisected to 1e-6 m/s.
void tyre_peak(const Envelope& env, ConfigCheck& c) {
  const double peak = env.tyres().force_peak_load_n();
  if (!std::isfinite(peak)) return;
  c.tyre_peak_load_n = peak;
  const Car& car = env.car();
  const bool axle = car.model == VehicleModel::axle;
  auto heaviest = [&](double v) {
    const AxleLoads l =
        axle_loads(car, env.drag_n(v), env.downforce_n(v), env.aero_balance(v), 1.0, 0.0, 0.0);
    return axle ? 0.5 * std::max(l.front_n, l.rear_n) : 0.25 * (l.front_n + l.rear_n);
  };
  const double top = env.max_speed_mps();
  constexpr double scan_mps = 0.5;
  double lo = 0.0;
  if (heaviest(0.0) > peak) {
    c.tyre_peak_speed_mps = 0.0;
    return;
  }
  for (double v = scan_mps;; v = std::min(v + scan_mps, top)) {
    if (heaviest(v) > peak) {
      double hi = v;
      while (hi - lo > 1e-6) {
        const double mid = 0.5 * (lo + hi);
        (heaviest(mid) > peak ? hi : lo) = mid;
      }
      c.tyre_peak_speed_mps = hi;
      return;
    }
    lo = v;
    if (v >= top) return;
  }
}
}  // namespace

ConfigCheck check_config(const Car& car, std::size_t index, const Air& air) {
  const ConfiguredCar configured = car.configured(index);
  const Car& cc = configured.car();
  const AeroConfig& a = configured.aero();
  const Envelope env(configured, air, without_level_tables());
  const AeroPoint rest = env.aero_point(0.0);
  ConfigCheck c;
  c.name = a.name;
  c.form = a.form;
  c.cda_m2 = rest.cda_m2;
  c.cla_m2 = rest.cla_m2;
  c.aero_balance = rest.balance;
  // None without drag, nor where the drag is too small for the ratio to be a number (a
  // subnormal CdA: a robustness campaign's, whose infinite L/D stopped check --json with exit 1).
  if (rest.cda_m2 > 0 && std::isfinite(rest.cla_m2 / rest.cda_m2))
    c.lift_to_drag = rest.cla_m2 / rest.cda_m2;
  c.has_map = env.has_map();
  c.speed_table = !a.speed_mps.empty();
  c.drag_height_m = cc.drag_height_m;
  std::tie(c.top_speed_mps, c.top_speed_limit) = level_top_speed(env);
  tyre_peak(env, c);
  for (const double speed_kph : check_speeds_kph) {
    const double v = speed_kph * units::kph;
    const AeroPoint p = env.aero_point(v);
    const double q = 0.5 * air.density_kg_m3 * v * v;  // dynamic pressure, Pa
    AeroAtSpeed s;
    s.speed_kph = speed_kph;
    s.downforce_n = q * p.cla_m2;
    s.drag_n = q * p.cda_m2;
    // Front axle share of the aero load: the balance alone, then with the drag moment (drag x
    // drag height / wheelbase off the front axle); undefined without downforce. The aero load on
    // the front axle itself, DF bal - D z_D / L, is defined either way (model/loads.hpp).
    s.front_share_with_drag_moment = aero_balance_with_drag_moment(
        p.cla_m2, p.cda_m2, p.balance, cc.drag_height_m, cc.wheelbase_m);
    if (s.front_share_with_drag_moment)
      s.front_share = p.balance;
    else
      c.no_downforce = true;
    s.front_aero_load_n =
        aero_axle_loads(s.downforce_n, p.balance, s.drag_n, cc.drag_height_m, cc.wheelbase_m)
            .front_n;
    if (c.has_map)
      s.ride_heights = RideHeights{p.front_ride_m, p.rear_ride_m, p.off_map, p.grounded};
    c.at_speeds.push_back(s);
  }
  // What the data does outside its range: the same notes a lap that reaches them is warned of.
  for (const RangeNote& n : range_notes(env)) c.range_notes.push_back(n.text);
  c.trim = a.trim;
  return c;
}

TrackCheck check_track(const Car& car, const Circuit& t) {
  TrackCheck out;
  out.closure = closure(t.track);
  out.warnings = track_warnings(t.track);
  out.corner_count = t.corners.size();
  out.engine_power_ratio = engine_power_ratio(car.powertrain, t.air.pressure_pa,
                                              t.air.temperature_k, t.air.relative_humidity);
  // The wind's head component on the longest straight, and the trim zones' share.
  if (const std::optional<PointRun> straight = longest_straight(t.mesh)) {
    double head = 0.0;
    for (std::size_t i = straight->first; i <= straight->last; ++i) head += t.mesh.head_wind_at(i);
    out.head_wind_longest_straight_mps =
        head / static_cast<double>(straight->last - straight->first + 1);
    out.straight_start_m = t.mesh.s_m[straight->first];
    out.straight_end_m = t.mesh.s_m[straight->last];
  }
  if (!t.track.trim_zones.empty()) {
    std::size_t zoned = 0;
    for (std::size_t i = 0; i + 1 < t.mesh.size(); ++i) zoned += t.mesh.trim_zone[i];
    out.trim_zone_share = static_cast<double>(zoned) / static_cast<double>(t.mesh.intervals());
  }
  for (std::size_t c = 0; c < car.configs.size(); ++c) {
    const Envelope env(car.configured(c), t.air, without_level_tables());
    const auto [top, limit] = level_top_speed(env);
    out.configs.push_back({car.configs[c].name, top, limit});
  }
  // The data's verdict: per config, from the lap at half and double the smoothing strength
  // (track_quality.hpp). A config that cannot lap is a failure, not an error: check describes.
  const SmoothingVariants variants = smoothing_variants(t);
  LapSolver solver;  // the lap times alone: no channel is read here
  for (std::size_t c = 0; c < car.configs.size(); ++c) {
    const ConfiguredCar cc = car.configured(c);
    try {
      const double lap = lap_time(cc, t, solver);
      out.qualities.push_back(assess_track(t, variants, cc, car.configs[c].name, lap));
    } catch (const InvalidInput& e) {
      out.failures.push_back({car.configs[c].name, e, {}});
    } catch (const CannotMove& e) {
      out.failures.push_back({car.configs[c].name, std::nullopt, e.what()});
    }
  }
  if (t.track.profile && t.track.profile->source == PathProfile::Source::centerline) {
    const PathProfile& p = *t.track.profile;
    SmoothingStudy s;
    s.smoothing_m = p.smoothing_m;
    s.automatic = p.smoothing.automatic;
    s.half_length_m = variants.half_length_m;
    s.double_length_m = variants.double_length_m;
    s.notes = variants.notes;
    for (const auto& q : out.qualities)
      for (const auto& n : q.notes)
        if (std::find(s.notes.begin(), s.notes.end(), n) == s.notes.end()) s.notes.push_back(n);
    out.smoothing = std::move(s);
  }
  // One verdict per track: the worst config's (they differ only in the lap spread).
  for (std::size_t i = 0; i < out.qualities.size(); ++i) {
    const TrackQuality& q = out.qualities[i];
    if (!out.shown) {
      out.shown = i;
      continue;
    }
    const TrackQuality& s = out.qualities[*out.shown];
    if (q.verdict > s.verdict ||
        (q.verdict == s.verdict && q.spread.value_or(0) > s.spread.value_or(0)))
      out.shown = i;
  }
  return out;
}

CheckSummary check_summary(const Car& car, const std::vector<Circuit>& circuits,
                           const Air& reference_air) {
  CheckSummary s;
  s.reference_air = reference_air;
  if (car.roll) {
    const TransferPerNewton d = lateral_transfer_per_n(car);
    const double w = car.mass_kg * units::g0;  // the lateral force at 1 g
    s.transfer_at_1g_n = TransferPerNewton{d.front * w, d.rear * w};
  }
  s.rated_power_w = rated_power_w(car.powertrain);
  for (std::size_t c = 0; c < car.configs.size(); ++c)
    s.configs.push_back(check_config(car, c, reference_air));
  for (const Circuit& t : circuits) s.tracks.push_back(check_track(car, t));
  return s;
}

}  // namespace lapwing
