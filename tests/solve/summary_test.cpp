// The lap summary: sectors, corners, time shares, all consistent with the traces.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numeric>
#include <string>
#include <vector>

#include "lapwing/base/units.hpp"
#include "lapwing/solve/axle.hpp"
#include "lapwing/solve/summary.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
// A lap of a bundled car's first config on the axle model, and its summary.
struct AxleLap {
  Track track;
  Mesh mesh;
  Lap lap;
  std::vector<CornerSpan> spans;
  LapSummary summary;
};
AxleLap axle_lap(const std::string& car_file, const std::string& track_file) {
  Car car = load_car(test::source_path(car_file)).configured(0).car();
  car.model = VehicleModel::axle;
  AxleLap a;
  a.track = load_track(test::source_path(track_file));
  const Envelope env(test::configured(car), make_air(a.track.air));
  a.mesh = build_mesh(a.track, a.track.mesh_m);
  a.lap = solve_lap(env, a.mesh);
  a.spans = find_corners(a.mesh);
  a.summary = summarize(a.lap, a.mesh, a.track, a.spans, env);
  return a;
}
}  // namespace

TEST_CASE("sector times add up to the lap; corners hold their apex; shares are fractions") {
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(1).car();
  const Track track = load_track(test::source_path("tracks/saltmere-flats.yaml"));
  const Envelope env(test::configured(car), make_air(track.air));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const Lap lap = solve_lap(env, mesh);
  const auto spans = find_corners(mesh);
  const LapSummary s = summarize(lap, mesh, track, spans, env);
  REQUIRE(s.sectors_s.size() == 3);
  CHECK(near(std::accumulate(s.sectors_s.begin(), s.sectors_s.end(), 0.0), s.lap_time_s, 1e-12));
  CHECK(s.corners.size() == spans.size());
  for (const auto& c : s.corners) {
    CHECK(c.start_m <= c.apex_m);
    CHECK(c.apex_m <= c.end_m);
    CHECK(c.apex_mps <= c.entry_mps);
    CHECK(c.apex_mps <= c.exit_mps);
    CHECK(c.time_s > 0.0);
  }
  CHECK(s.full_throttle_fraction > 0.0);
  CHECK(s.braking_fraction > 0.0);
  CHECK(s.full_throttle_fraction + s.braking_fraction <= 1.0);
  CHECK(s.top_speed_mps >= s.min_speed_mps);
  // Time at a distance interpolates the trace.
  CHECK(near(time_at(lap, mesh, mesh.s_m[100]), lap.time_s[100], 1e-12));
}

TEST_CASE("the limiting axle is front, rear or both within the neutral band, beside its value") {
  // The band is +-0.02 of usage (summary.hpp): its edges are both, just past them an axle.
  CHECK(limiting_axle(0.0) == Axle::both);
  CHECK(limiting_axle(axle_neutral_band) == Axle::both);
  CHECK(limiting_axle(-axle_neutral_band) == Axle::both);
  CHECK(limiting_axle(0.0201) == Axle::front);
  CHECK(limiting_axle(-0.0201) == Axle::rear);
  // On a lap each corner's labels are read from the trace's balance_index at the same points.
  // The axle model, where each axle's usage sets the limits and the labels matter most.
  const AxleLap a = axle_lap("cars/pellion-fr2.yaml", "tracks/brannock-park.yaml");
  const Mesh& mesh = a.mesh;
  const Lap& lap = a.lap;
  const LapSummary& s = a.summary;
  REQUIRE(!s.corners.empty());
  int both = 0;
  for (const auto& c : s.corners) {
    const auto at = [&](double s_m) {
      return static_cast<std::size_t>(std::llround(s_m / mesh.step_m));
    };
    CHECK(c.apex_balance_index == lap.front_usage[at(c.apex_m)] - lap.rear_usage[at(c.apex_m)]);
    CHECK(c.entry_balance_index == lap.front_usage[at(c.start_m)] - lap.rear_usage[at(c.start_m)]);
    CHECK(c.entry_axle == limiting_axle(c.entry_balance_index));
    CHECK(c.apex_axle == limiting_axle(c.apex_balance_index));
    CHECK(c.exit_axle == limiting_axle(c.exit_balance_index));
    both += c.apex_axle == Axle::both;
  }
  // The single-seater's apexes on this track sit near neutral in two corners: they fall inside
  // the band (what the old two-way label called "front" or "rear" on a coin toss of 0.001).
  CHECK(both > 0);
  // Front-limited corners are those whose apex the front axle limits beyond the band.
  for (const auto& c : s.corners) {
    const auto& ids = s.balance.front_limited_corners;
    const bool listed = std::find(ids.begin(), ids.end(), c.id) != ids.end();
    CHECK(listed == (c.apex_axle == Axle::front));
  }
}

namespace {
// An open straight of `length_m` from a standing start: lap, mesh, summary of `car`.
struct StraightRun {
  Envelope env;
  Mesh mesh;
  Lap lap;
  LapSummary summary;
};
StraightRun run_straight(const Car& car, double length_m, double mesh_m) {
  const Track track = test::straight_track(length_m, mesh_m, 0.0);
  Envelope env(test::configured(car), make_air(AirSpec{}));
  Mesh mesh = build_mesh(track, track.mesh_m);
  Lap lap = solve_lap(env, mesh);
  LapSummary s = summarize(lap, mesh, track, find_corners(mesh), env);
  return {std::move(env), std::move(mesh), std::move(lap), std::move(s)};
}

bool has_warning(const LapSummary& s, const std::string& text) {
  for (const auto& w : s.warnings)
    if (w.find(text) != std::string::npos) return true;
  return false;
}
}  // namespace

TEST_CASE("a speed table that ends below the lap's speeds is a warning with its distance share") {
  // Constant force F on mass m, no resistance: v^2 = 2 (F / m) s exactly (REFERENCES,
  // constant force; the sweep's step is exact for a constant right-hand side). A table row at
  // v_r is passed at s_r = v_r^2 m / (2 F): here the first row (9 m/s) at 8.1 m and the last
  // (48 m/s) at 230.4 m of L = 400 m, so 2.025 % of the distance is below the table and
  // 42.4 % above it.
  const double m = 600.0, force = 3000.0, v_first = 9.0, v_last = 48.0, length = 400.0;
  Car car = test::constant_force_car(m, force, 3.0);
  AeroConfig& a = car.configs.front();
  a.form = AeroConfig::Form::speed_table;
  a.speed_mps = {v_first, v_last};  // 32.4 and 172.8 km/h
  a.cda_m2 = {0.0, 0.0};
  a.cla_m2 = {0.0, 0.0};
  a.balance = {0.45, 0.45};
  const StraightRun r = run_straight(car, length, 0.5);
  auto passed_at = [&](double v) { return v * v * m / (2.0 * force); };
  const double share_below = passed_at(v_first) / length;
  const double share_above = 1.0 - passed_at(v_last) / length;
  // Tolerance: the half-interval rule counts a crossing from the middle of the step it falls
  // in, within half a step (0.25 m of 400 m, 6.3e-4 of the distance): 1e-3.
  const std::vector<RangeNote> notes = range_notes(r.env);
  REQUIRE(notes.size() == 3);  // below, above, the tables' top
  CHECK(near(range_note_share(r.env, notes[0], r.lap, r.mesh), share_below, 0.0, 1e-3));
  CHECK(near(range_note_share(r.env, notes[1], r.lap, r.mesh), share_above, 0.0, 1e-3));
  CHECK(range_note_share(r.env, notes[2], r.lap, r.mesh) == 0.0);
  // The lap's warnings (printed by run, written to summary.json) say the same, rounded.
  CHECK(r.summary.warnings.size() == 2);
  CHECK(has_warning(r.summary,
                    "below the speed table's first row (32.4 km/h) its values are "
                    "held: "));
  CHECK(has_warning(r.summary,
                    "above the speed table's last row (172.8 km/h) its values are "
                    "held: 42.4 % of the lap distance"));
}

TEST_CASE("a gearless car with no top speed is held at the stated ceiling and warned of") {
  // 1 MW, 500 kg, no drag, no rolling resistance: drive never falls to the resistance, so the
  // tables stop at the ceiling and the lap is held there. Closed forms (REFERENCES, constant
  // power): traction-limited at a = mu g up to v* = P / (m mu g), s* = v*^2 / (2 mu g); then
  // v^3 = v*^3 + 3 P (s - s*) / m, which reaches the ceiling v_c at
  // s_c = s* + m (v_c^3 - v*^3) / (3 P) = 2813.6 m of 4000 m.
  const double m = 500.0, mu = 1.5, power = 1e6, length = 4000.0;
  const StraightRun r = run_straight(test::plain_car(m, mu, power), length, 1.0);
  const double v_c = EnvelopeOptions{}.speed_ceiling_mps;
  CHECK(r.env.top_speed_limit() == TopSpeedLimit::ceiling);
  CHECK(r.env.max_speed_mps() == v_c);
  CHECK(r.summary.top_speed_mps == v_c);
  const double g = units::g0, v_star = power / (m * mu * g);
  const double s_c = v_star * v_star / (2 * mu * g) +
                     m * (v_c * v_c * v_c - v_star * v_star * v_star) / (3 * power);
  const std::vector<RangeNote> notes = range_notes(r.env);
  REQUIRE(notes.size() == 1);
  CHECK(notes[0].kind == RangeNote::Kind::table_top);
  // Tolerance: half a step of the mesh (1 m of 4000 m) plus the sweep's fourth-order error on
  // the v^3 law (far below that at a 1 m step): 5e-4 of the distance.
  CHECK(near(range_note_share(r.env, notes[0], r.lap, r.mesh), 1.0 - s_c / length, 0.0, 5e-4));
  CHECK(has_warning(r.summary, "the car's tables end at 900.0 km/h (the ceiling of the tables)"));
}

TEST_CASE(
    "a lone point on the steady limit between braking and drive takes no time in the shares") {
  // The car only touches its limit there (the apex of a corner without an arc): counted as its
  // own phase it took a whole step's time, whatever the step (issue 10, item 3).
  const Car car = test::plain_car();
  const Track track = test::straight_track(10.0, 1.0, 10.0);
  const Envelope env(test::configured(car), make_air(track.air));
  const Mesh mesh = build_mesh(track, 1.0);
  REQUIRE(mesh.size() == 11);
  Lap lap = solve_lap(env, mesh, track.start_speed_mps);
  for (std::size_t i = 0; i < 11; ++i) {
    lap.time_s[i] = static_cast<double>(i);  // 1 s per interval
    lap.phase[i] = i < 5 ? Phase::brake : (i == 5 ? Phase::corner : Phase::accelerate);
  }
  lap.lap_time_s = 10.0;
  const LapSummary s = summarize(lap, mesh, track, {}, env);
  CHECK(s.braking_fraction == doctest::Approx(0.5).epsilon(1e-12));
  CHECK(s.full_throttle_fraction == doctest::Approx(0.5).epsilon(1e-12));
  // Two points on the limit are a stretch of it: the interval between them counts as corner,
  // and the intervals on either side half: braking 4.5 s, drive 3.5 s.
  lap.phase[6] = Phase::corner;
  const LapSummary t = summarize(lap, mesh, track, {}, env);
  CHECK(t.braking_fraction == doctest::Approx(0.45).epsilon(1e-12));
  CHECK(t.full_throttle_fraction == doctest::Approx(0.35).epsilon(1e-12));
}

TEST_CASE(
    "the balance window finds the worst excursion, the time outside and the braking-drive "
    "shift, worked by hand") {
  // A hand-made lap of 11 points, 1 s per interval (each inner point holds 1 s, the ends 0.5 s),
  // so that every figure below is simple arithmetic on the values set here.
  Mesh mesh;
  mesh.closed = false;
  mesh.step_m = 10.0;
  for (int i = 0; i <= 10; ++i) mesh.s_m.push_back(10.0 * i);
  mesh.length_m = 100.0;
  Lap lap;
  const double fast = 200.0 * units::kph, slow = 100.0 * units::kph, g = units::g0;
  //              0     1     2     3     4     5     6     7     8     9     10
  const double share[] = {0.40, 0.50, 0.55, 0.47, 0.42, 0.36, 0.30, 0.38, 0.40, 0.44, 0.45};
  const double lat_g[] = {0.0, 1.0, 1.0, 1.0, 1.0, 1.0, 0.3, 1.0, 1.0, 1.0, 1.0};
  const Phase phase[] = {Phase::brake,      Phase::brake,      Phase::brake,      Phase::corner,
                         Phase::accelerate, Phase::accelerate, Phase::accelerate, Phase::accelerate,
                         Phase::shift,      Phase::accelerate, Phase::accelerate};
  for (int i = 0; i <= 10; ++i) {
    lap.speed_mps.push_back(i == 10 ? slow : fast);  // the last point is below the window's speed
    lap.time_s.push_back(i);
    lap.lat_accel_mps2.push_back(lat_g[i] * g * (i % 2 ? 1.0 : -1.0));  // either direction
    lap.front_load_n.push_back(share[i]);  // the share is the front load over both (N)
    lap.rear_load_n.push_back(1.0 - share[i]);
    lap.phase.push_back(phase[i]);
  }
  // Sets point i's share, and checks that it reads back as set (these values do, exactly).
  auto set_share = [&](std::size_t i, double s) {
    lap.front_load_n[i] = s;
    lap.rear_load_n[i] = 1.0 - s;
    REQUIRE(front_share(lap, i) == s);
  };
  for (std::size_t i = 0; i <= 10; ++i) set_share(i, share[i]);
  // Corner 1 spans points 1..3, corner 2 points 7..9.
  const std::vector<CornerSpan> corners{{1, 1, 3, 1}, {2, 7, 9, -1}};
  const BalanceWindow w{0.38, 0.46, 150.0 * units::kph};
  const BalanceWindowResult r = check_balance_window(w, lap, mesh, corners);
  // In the window: points 1-5 and 7-9 (0: under 0.5 g; 6: 0.3 g; 10: too slow): 8 s.
  CHECK(r.time_s == doctest::Approx(8.0).epsilon(1e-12));
  CHECK_FALSE(r.pass);
  // Outside: 1 (0.50), 2 (0.55), 3 (0.47), 5 (0.36): 4 s of 8.
  CHECK(r.outside_fraction == doctest::Approx(0.5).epsilon(1e-12));
  // Worst: point 2, 0.55 - 0.46 = +0.09 (point 5 is 0.02 below; point 6's 0.30 is not cornering).
  CHECK(r.worst_excursion == doctest::Approx(0.09).epsilon(1e-12));
  CHECK(r.worst_at_m == 20.0);
  CHECK(r.worst_corner == 1);
  CHECK(r.worst_phase == Phase::brake);
  CHECK(r.lowest_share == 0.36);
  CHECK(r.highest_share == 0.55);
  // Above 150 km/h, whether cornering or not: braking at 0 (0.5 s), 1 and 2 (1 s each):
  // (0.5 x 0.40 + 0.50 + 0.55) / 2.5 = 0.50; drive at 4, 5, 6, 7, 9 (1 s each; 8 is a shift,
  // 10 too slow): (0.42 + 0.36 + 0.30 + 0.38 + 0.44) / 5 = 0.38.
  REQUIRE(r.braking_share.has_value());
  REQUIRE(r.accelerating_share.has_value());
  CHECK(*r.braking_share == doctest::Approx(0.50).epsilon(1e-12));
  CHECK(*r.accelerating_share == doctest::Approx(0.38).epsilon(1e-12));

  // Inside everywhere: a pass, with the margin to the nearest edge at the closest point.
  for (std::size_t i = 0; i <= 10; ++i) set_share(i, std::clamp(share[i], 0.39, 0.45));
  set_share(8, 0.445);  // 0.015 from the max: the closest of the window's points
  const BalanceWindowResult p = check_balance_window(w, lap, mesh, corners);
  CHECK(p.pass);
  CHECK(p.outside_fraction == 0.0);
  CHECK(p.worst_excursion == 0.0);
  // Points 1, 2 and 3 (clamped to 0.45) lie 0.01 from the max, closer than 0.445: the first.
  CHECK(p.margin == doctest::Approx(0.01).epsilon(1e-9));
  CHECK(p.worst_at_m == 10.0);

  // A point between corners is placed on the straight to the next one.
  set_share(5, 0.30);
  const BalanceWindowResult q = check_balance_window(w, lap, mesh, corners);
  CHECK(q.worst_at_m == 50.0);
  CHECK(q.worst_corner == 0);
  CHECK(q.next_corner == 2);

  // Never fast and cornering at once: not reached (no time), which is not a failure.
  for (double& a : lap.lat_accel_mps2) a = 0.1 * g;
  const BalanceWindowResult n = check_balance_window(w, lap, mesh, corners);
  CHECK(n.time_s == 0.0);
  CHECK(n.pass);
}

TEST_CASE("an arc held on its limit has its apex where the plateau starts, whatever its rounding") {
  // The speeds of an arc taken on its steady limit are one plateau; the ulp or two by which a
  // limit worked again can differ (the steady limits' two halves, LapSolver) must not move the
  // apex along the arc (the apex's axle reading moves with it). A real dip, 1e-6 of the speed
  // (0.1 mm/s at 100 km/h: beyond rounding and the root searches' 1.5e-11), still does.
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(1).car();
  const Track track = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Envelope env(test::configured(car), make_air(track.air));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const Lap lap = solve_lap(env, mesh);
  const auto spans = find_corners(mesh);
  const LapSummary s = summarize(lap, mesh, track, spans, env);
  int plateaus = 0;
  for (std::size_t k = 0; k < spans.size(); ++k) {
    const CornerSpan& c = spans[k];
    const auto apex = static_cast<std::size_t>(std::lround(s.corners[k].apex_m / mesh.step_m));
    // The plateau's points after the apex: the same speed as the apex's, to the bit.
    std::size_t last = apex;
    while (last + 1 <= c.end && lap.speed_mps[last + 1] == lap.speed_mps[apex]) ++last;
    if (last < apex + 10) continue;  // not an arc held on its limit
    ++plateaus;
    const std::size_t later = (apex + last) / 2;
    Lap moved = lap;
    moved.speed_mps[later] = std::nextafter(moved.speed_mps[later], 0.0);
    CHECK(summarize(moved, mesh, track, spans, env).corners[k].apex_m == s.corners[k].apex_m);
    moved.speed_mps[later] = lap.speed_mps[later] * (1.0 - 1e-6);
    CHECK(summarize(moved, mesh, track, spans, env).corners[k].apex_m == mesh.s_m[later]);
  }
  CHECK(plateaus >= 3);
}

TEST_CASE("an arc's apex readings are its steady cornering's, not the braking's that ends there") {
  // The braking before an arc taken on its limit ends at the plateau's first point, whose
  // longitudinal acceleration (the speeds' central difference) is half the braking's: the axle
  // reading there is neither the braking's nor the arc's. The apex is the first point of the
  // plateau at steady cornering, and its readings are those of the arc's other points (the same
  // speed, curvature and acceleration: the same usage, to rounding).
  const AxleLap a = axle_lap("cars/caldra-gt.yaml", "tracks/brannock-park.yaml");
  const Mesh& mesh = a.mesh;
  const Lap& lap = a.lap;
  const auto& spans = a.spans;
  const LapSummary& s = a.summary;
  const double g = units::g0;
  int braked_into = 0;
  for (std::size_t k = 0; k < spans.size(); ++k) {
    const CornerSpan& c = spans[k];
    std::size_t first = c.start;
    for (std::size_t i = c.start; i <= c.end; ++i)
      if (lap.speed_mps[i] < lap.speed_mps[first]) first = i;
    std::size_t last = first;
    while (last + 1 <= c.end && lap.speed_mps[last + 1] == lap.speed_mps[first]) ++last;
    if (last < first + 10) continue;  // not an arc held on its limit
    const std::size_t middle = (first + last) / 2;
    const double steady = lap.front_usage[middle] - lap.rear_usage[middle];
    CHECK(std::abs(lap.long_accel_mps2[middle]) < 1e-9);
    CHECK(s.corners[k].apex_m > mesh.s_m[first]);
    CHECK(s.corners[k].apex_m < mesh.s_m[middle]);
    CHECK(near(s.corners[k].apex_balance_index, steady, 1e-9));
    CHECK(s.corners[k].apex_axle == limiting_axle(steady));
    // The first point's reading, braking, is off the arc's by more than the labels' band.
    braked_into += lap.long_accel_mps2[first] < -0.02 * g &&
                   std::abs(lap.front_usage[first] - lap.rear_usage[first] - steady) > 0.02;
  }
  // The case the rule is for (this lap: eight arcs whose first point reads -0.04 to -0.09 g,
  // its balance index 0.05 to 0.10 off the arc's).
  CHECK(braked_into >= 3);
}

TEST_CASE(
    "an axle asked beyond its grip is a warning: the point mass's readings, never the axle's") {
  // Usage 1 is an axle's friction ellipse filled (its definition, common practice). The point
  // mass limits the car as one body on four equally loaded tyres: a rear-driven car's drive is
  // put down as if all four carried it, so its rear axle reads far above 1 under power. The
  // axle model limits each axle, and no warning may appear there.
  const Track track = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const auto spans = find_corners(mesh);
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml")).configured(0).car();
  REQUIRE(car.powertrain.driven == DrivenAxle::rear);
  auto over_warnings = [&](const LapSummary& s) {
    std::vector<std::string> out;
    for (const auto& w : s.warnings)
      if (w.find("usage reaches") != std::string::npos) out.push_back(w);
    return out;
  };
  car.model = VehicleModel::axle;
  const Envelope axle_env(test::configured(car), make_air(track.air));
  const Lap axle_lap = solve_lap(axle_env, mesh);
  CHECK(over_warnings(summarize(axle_lap, mesh, track, spans, axle_env)).empty());

  car.model = VehicleModel::point_mass;
  const Envelope env(test::configured(car), make_air(track.air));
  const Lap lap = solve_lap(env, mesh);
  const std::vector<std::string> w = over_warnings(summarize(lap, mesh, track, spans, env));
  REQUIRE(w.size() == 1);
  // The highest reading, its axle and place, worked out again from the trace.
  std::size_t worst = 0;
  for (std::size_t i = 0; i < mesh.size(); ++i)
    if (std::max(lap.front_usage[i], lap.rear_usage[i]) >
        std::max(lap.front_usage[worst], lap.rear_usage[worst]))
      worst = i;
  const double highest = std::max(lap.front_usage[worst], lap.rear_usage[worst]);
  CHECK(highest > 1.5);
  CHECK(lap.rear_usage[worst] > lap.front_usage[worst]);
  char expect[96];
  std::snprintf(expect, sizeof expect, "the rear axle's usage reaches %.2f at %.0f m", highest,
                mesh.s_m[worst]);
  CHECK(w[0].rfind(expect, 0) == 0);
  CHECK(w[0].find("--model axle") != std::string::npos);
  // The share of the distance above 1.02, each interval half for each end above it.
  double above = 0.0;
  for (std::size_t i = 0; i + 1 < mesh.size(); ++i) {
    auto over = [&](std::size_t k) {
      return std::max(lap.front_usage[k], lap.rear_usage[k]) > 1.02;
    };
    above += 0.5 * mesh.step_m * (over(i) + over(i + 1));
  }
  char share[64];
  std::snprintf(share, sizeof share, "above 1.02 on %.1f %% of the lap distance",
                100.0 * above / mesh.length_m);
  CHECK(w[0].find(share) != std::string::npos);
}

TEST_CASE("an axle with no load is asked for nothing or warned of: never a number in its place") {
  // A rear-driven car with a tenth of its weight on the front: under full drive the front
  // unloads (load transfer m a h / L, Milliken & Milliken, RCVD ch. 18). The axle model holds
  // the front at the load its lateral force needs (0 on a straight, reached to rounding), where
  // it carries nothing and uses nothing; the point mass does not know the front lifts, asks it
  // for force with no load, and the lap says so.
  const Track track = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const auto spans = find_corners(mesh);
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml")).configured(0).car();
  car.front_weight = 0.1;
  for (const VehicleModel model : {VehicleModel::axle, VehicleModel::point_mass}) {
    car.model = model;
    const Envelope env(test::configured(car), make_air(track.air));
    const Lap lap = solve_lap(env, mesh);
    const LapSummary s = summarize(lap, mesh, track, spans, env);
    double highest = 0.0;
    std::size_t unloaded = 0;
    for (std::size_t i = 0; i < mesh.size(); ++i) {
      highest = std::max({highest, lap.front_usage[i], lap.rear_usage[i]});
      unloaded += !(lap.front_load_n[i] > 0.0);
    }
    bool lifted_warning = false;
    for (const auto& w : s.warnings)
      lifted_warning |= w.rfind("the front axle is asked for force with no load on it", 0) == 0;
    CAPTURE(static_cast<int>(model));
    CHECK(unloaded > 0);  // the front reaches no load somewhere in both models
    if (model == VehicleModel::axle) {
      CHECK(highest <= 1.02);  // README, "Physics and assumptions": within 1 + 0.02
      CHECK_FALSE(lifted_warning);
    } else {
      CHECK(highest == lifted_axle_usage);
      CHECK(lifted_warning);
    }
  }
}

TEST_CASE("a lap whose tyre load passes the force's peak Fn (1 + s) / (2 s) carries a warning") {
  // mu(Fz) Fz = mu0 Fz (1 - s (Fz - Fn) / Fn) peaks at Fz* = Fn (1 + s) / (2 s) (calculus: the
  // vertex of the parabola). A point mass (four tyres at N / 4 each, N = m g + q ClA on the
  // level) with s = 0.2 and Fn = 1500 N: Fz* = 4500 N, reached at q = (4 Fz* - m g) / ClA. On a
  // straight long enough to pass that speed the lap must say so, naming the heaviest tyre load
  // (worked out again from the trace); on a short one, below it, it must not.
  const double m = 640.0, cla = 8.0, fn = 1500.0, s = 0.2;
  Car car = test::plain_car(m, 1.5, 600e3);
  car.configs.front().cda_m2 = {1.0};
  car.configs.front().cla_m2 = {cla};
  car.tyres.nominal_load_n = fn;
  car.tyres.load_sensitivity = s;
  const double peak = fn * (1.0 + s) / (2.0 * s);
  auto peak_warnings = [&](double length_m, double& heaviest) {
    const Track track = test::straight_track(length_m, 0.5, 0.0);
    const Mesh mesh = build_mesh(track, track.mesh_m);
    const Envelope env(test::configured(car), make_air(track.air));
    const Lap lap = solve_lap(env, mesh);
    heaviest = 0.0;
    for (std::size_t i = 0; i < mesh.size(); ++i)
      heaviest = std::max(heaviest, 0.25 * (lap.front_load_n[i] + lap.rear_load_n[i]));
    std::vector<std::string> out;
    for (const auto& w : summarize(lap, mesh, track, find_corners(mesh), env).warnings)
      if (w.find("peaks under the load sensitivity") != std::string::npos) out.push_back(w);
    return out;
  };
  double heaviest = 0.0;
  const std::vector<std::string> w = peak_warnings(2000.0, heaviest);
  REQUIRE(heaviest > peak);
  REQUIRE(w.size() == 1);
  char expect[64];
  std::snprintf(expect, sizeof expect, "a tyre's load reaches %.0f N", heaviest);
  CHECK(w.front().find(expect) != std::string::npos);
  std::snprintf(expect, sizeof expect, "past %.0f N", peak);
  CHECK(w.front().find(expect) != std::string::npos);
  CHECK(peak_warnings(40.0, heaviest).empty());
  CHECK(heaviest < peak);
}
