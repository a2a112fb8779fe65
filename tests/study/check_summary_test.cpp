// check's figures as a library type: the aero at speed against the coefficients' definition and
// the moments about the axles, the top speed against the level-road power balance, in the
// reference air and in each track's own; the laps a config cannot do are failures, not errors.
#include <doctest/doctest.h>

#include <cmath>
#include <string>

#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/study/check_summary.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {

// A plain car (test_support: constant power, efficiency 1, no rolling resistance) with one
// constant aero config.
Car aero_car(double cda, double cla, double balance, double drag_height_m) {
  Car car = test::plain_car(640.0, 1.5, 400e3);
  car.drag_height_m = drag_height_m;
  AeroConfig& a = car.configs.front();
  a.name = "test";
  a.cda_m2 = {cda};
  a.cla_m2 = {cla};
  a.balance = {balance};
  return car;
}

// Top speed on the level with no rolling resistance: P = (rho CdA / 2) v^3 (REFERENCES.md,
// "Top speed on the level", with eta = 1 and Crr = 0).
double top_speed(double power_w, double density, double cda) {
  return std::cbrt(2.0 * power_w / (density * cda));
}

}  // namespace

TEST_CASE("check's aero at speed: DF and D are q C, the front load DF bal - D z_D / L") {
  // Closed forms: q = rho v^2 / 2 with DF = q ClA and D = q CdA (the definition of the
  // coefficients); the drag moment D z_D / L comes off the front axle (moments about the rear
  // contact patch, REFERENCES.md "Longitudinal load transfer"), so the front aero load is
  // DF bal - D z_D / L and its share of the downforce bal - CdA z_D / (ClA L).
  const double cda = 1.1, cla = 3.3, bal = 0.42, zd = 0.6;
  const Car car = aero_car(cda, cla, bal, zd);
  const Air air = make_air(AirSpec{});
  // ISO 2533 sea level: 1.2250 kg/m3 (REFERENCES.md); the figures use the reference air.
  REQUIRE(near(air.density_kg_m3, 1.2250, 5e-5));
  const CheckSummary s = check_summary(car, {}, air);
  REQUIRE(s.configs.size() == 1);
  const ConfigCheck& c = s.configs.front();
  CHECK(c.name == "test");
  CHECK(c.cda_m2 == cda);
  CHECK(c.cla_m2 == cla);
  CHECK(c.aero_balance == bal);
  REQUIRE(c.lift_to_drag);
  CHECK(near(*c.lift_to_drag, cla / cda, 1e-15));
  CHECK(c.drag_height_m == zd);
  CHECK_FALSE(c.has_map);
  CHECK_FALSE(c.no_downforce);
  REQUIRE(c.at_speeds.size() == check_speeds_kph.size());
  const double L = car.wheelbase_m;
  for (std::size_t i = 0; i < c.at_speeds.size(); ++i) {
    const AeroAtSpeed& p = c.at_speeds[i];
    CHECK(p.speed_kph == check_speeds_kph[i]);
    const double v = p.speed_kph / 3.6;  // km/h to m/s
    const double q = 0.5 * air.density_kg_m3 * v * v;
    // 1e-12: the same few flops in another order (km/h through units::kph).
    CHECK(near(p.downforce_n, q * cla, 1e-12));
    CHECK(near(p.drag_n, q * cda, 1e-12));
    CHECK(near(p.front_aero_load_n, q * cla * bal - q * cda * zd / L, 1e-12));
    REQUIRE(p.front_share);
    REQUIRE(p.front_share_with_drag_moment);
    CHECK(*p.front_share == bal);
    CHECK(near(*p.front_share_with_drag_moment, bal - cda * zd / (cla * L), 1e-12));
    CHECK_FALSE(p.ride_heights);
  }
  // 0.1 %: the envelope's top speed is a root on its speed table (as envelope_test states).
  CHECK(near(c.top_speed_mps, top_speed(400e3, air.density_kg_m3, cda), 1e-3));
  CHECK(c.top_speed_limit == TopSpeedLimit::drag);
}

TEST_CASE(
    "without downforce the shares are undefined and the drag moment alone unloads the front") {
  // DF = 0: the front aero load is - D z_D / L (moments about the rear contact patch).
  const double cda = 0.8, zd = 0.5;
  const Car car = aero_car(cda, 0.0, 0.45, zd);
  const Air air = make_air(AirSpec{});
  const ConfigCheck c = check_config(car, 0, air);
  CHECK(c.no_downforce);
  REQUIRE(c.lift_to_drag);  // CdA > 0: L/D is 0
  CHECK(*c.lift_to_drag == 0.0);
  for (const AeroAtSpeed& p : c.at_speeds) {
    CHECK_FALSE(p.front_share);
    CHECK_FALSE(p.front_share_with_drag_moment);
    CHECK(p.downforce_n == 0.0);
    CHECK(near(p.front_aero_load_n, -p.drag_n * zd / car.wheelbase_m, 1e-12));
    CHECK(p.front_aero_load_n < 0.0);
  }
  // No drag either (the plain car): L/D is undefined.
  CHECK_FALSE(check_config(test::plain_car(), 0, air).lift_to_drag);
  // Nor where the drag is too small for the ratio to be a number (a robustness campaign's
  // subnormal CdA, whose infinite L/D stopped check --json: "a non-finite number"), and a
  // downforce that small beside the drag moment has no share.
  const ConfigCheck faint = check_config(aero_car(5e-324, 2.0, 0.45, zd), 0, air);
  CHECK_FALSE(faint.lift_to_drag);
  const ConfigCheck no_df = check_config(aero_car(cda, 5e-324, 0.45, zd), 0, air);
  CHECK(no_df.no_downforce);
  for (const AeroAtSpeed& p : no_df.at_speeds) CHECK_FALSE(p.front_share_with_drag_moment);
}

TEST_CASE("a track's top speed is in its own air: thinner air, faster by the cube root") {
  // P = (rho CdA / 2) v^3, so v scales as rho^(-1/3) (REFERENCES.md, top speed on the level).
  const double cda = 1.0;
  const Car car = aero_car(cda, 2.0, 0.45, 0.4);
  const Air sea = make_air(AirSpec{});
  AirSpec high;
  high.altitude_m = 2000.0;
  const Air thin = make_air(high);
  // ISO 2533 at 2000 m: 1.0066 kg/m3 (REFERENCES.md table, from memory).
  REQUIRE(near(thin.density_kg_m3, 1.0066, 5e-4));
  const std::vector<Circuit> circuits{lay_out(test::circle_track(50.0, 0.5), thin)};
  const CheckSummary s = check_summary(car, circuits, sea);
  REQUIRE(s.tracks.size() == 1);
  const TrackCheck& t = s.tracks.front();
  REQUIRE(t.configs.size() == 1);
  CHECK(t.configs.front().config == "test");
  // 0.1 %: the envelope's root on its table, as above.
  CHECK(near(s.configs.front().top_speed_mps, top_speed(400e3, sea.density_kg_m3, cda), 1e-3));
  CHECK(near(t.configs.front().top_speed_mps, top_speed(400e3, thin.density_kg_m3, cda), 1e-3));
  // A circle closes by construction: no gap (1 mm and 1e-6 rad: the mesh's integration).
  CHECK(near(t.closure.position_gap_m, 0.0, 0.0, 1e-3));
  CHECK(near(t.closure.heading_gap_rad, 0.0, 0.0, 1e-6));
  CHECK(t.closure.elevation_gap_m == 0.0);
  // A segment track: exact geometry, no smoothing study; the one config laps it and is judged.
  CHECK_FALSE(t.smoothing);
  CHECK(t.failures.empty());
  REQUIRE(t.qualities.size() == 1);
  CHECK(t.qualities.front().verdict == Verdict::good);
  REQUIRE(t.shown);
  CHECK(*t.shown == 0);
}

TEST_CASE("a config that cannot lap a track is a failure of that track, not an exception") {
  // Bad input the lap finds: an open track that starts at 60 m/s into a 15 m arc, where a point
  // mass holds sqrt(mu g R) = sqrt(1.5 x 9.81 x 15) = 14.9 m/s (REFERENCES.md, steady circle).
  Track hairpin = test::straight_track(50.0, 0.5, 60.0);
  hairpin.file = "hairpin.yaml";
  hairpin.segments = {test::arc(15.0, units::pi / 2, true), test::straight(50.0)};
  // No move: a constant 300 N against the weight's component on a 10 % grade,
  // m g sin(atan 0.1) = 600 x 9.81 x 0.0995 = 586 N.
  Track hill = test::straight_track(100.0, 0.5, 0.0);
  hill.segments = {test::straight(100.0, 0.1)};
  const Air air = make_air(AirSpec{});
  const std::vector<Circuit> circuits{lay_out(hairpin, air), lay_out(hill, air)};

  const CheckSummary s = check_summary(test::plain_car(600.0, 1.5), {circuits[0]}, air);
  const TrackCheck& t = s.tracks.front();
  CHECK(t.qualities.empty());
  CHECK_FALSE(t.shown);
  REQUIRE(t.failures.size() == 1);
  CHECK(t.failures.front().config == "none");
  REQUIRE(t.failures.front().input);
  CHECK(t.failures.front().input->subject() == "hairpin.yaml");
  CHECK(t.failures.front().input->violation().field == "start_speed");
  CHECK(t.failures.front().cannot_move.empty());

  const CheckSummary weak =
      check_summary(test::constant_force_car(600.0, 300.0, 1.5), {circuits[1]}, air);
  REQUIRE(weak.tracks.front().failures.size() == 1);
  const LapFailure& f = weak.tracks.front().failures.front();
  CHECK_FALSE(f.input);
  CHECK_FALSE(f.cannot_move.empty());
  // The track's top speeds are still there: they need no lap.
  CHECK(weak.tracks.front().configs.size() == 1);
}

TEST_CASE(
    "a fitted centerline gets its smoothing study: every config's laps and the worst verdict") {
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  REQUIRE(car.configs.size() >= 2);
  const Circuit c = test::bundled_circuit("tracks/brannock-park-survey.yaml");
  const CheckSummary s = check_summary(car, {c}, make_air(AirSpec{}));
  const TrackCheck& t = s.tracks.front();
  REQUIRE(t.smoothing);
  CHECK(t.smoothing->smoothing_m == c.track.profile->smoothing_m);
  // Third differences: lambda ~ L^6, so half and double lambda are the length x 2^(-+1/6)
  // (track_quality.hpp); 1e-12 for the powers' rounding.
  CHECK(near(t.smoothing->half_length_m, c.track.profile->smoothing_m * std::pow(2.0, -1.0 / 6),
             1e-12));
  CHECK(near(t.smoothing->double_length_m, c.track.profile->smoothing_m * std::pow(2.0, 1.0 / 6),
             1e-12));
  REQUIRE(t.qualities.size() == car.configs.size());
  REQUIRE(t.shown);
  for (std::size_t k = 0; k < t.qualities.size(); ++k) {
    const TrackQuality& q = t.qualities[k];
    CHECK(q.config == car.configs[k].name);
    REQUIRE(q.spread);
    // The lap at the chosen smoothing is the config's own lap round the circuit.
    CHECK(*q.lap_s == run_lap(car.configured(k), c).summary.lap_time_s);
    // The shown verdict is the worst: none worse, none of the same verdict with a larger spread.
    const TrackQuality& shown = t.qualities[*t.shown];
    CHECK(q.verdict <= shown.verdict);
    if (q.verdict == shown.verdict) CHECK(*q.spread <= *shown.spread);
  }
}

TEST_CASE("check's top speed is the tyres' where they cannot carry the resistance (closed form)") {
  // Point mass, no load sensitivity: the four tyres carry at most mu_long N along the road,
  // N = m g + q ClA; the speed holds while that covers drag + rolling resistance, so the level
  // top speed the tyres allow solves mu_long (m g + q ClA) = q CdA + Crr (m g + q ClA),
  // q = rho v^2 / 2: v^2 = 2 (mu - Crr) m g / (rho (CdA - (mu - Crr) ClA)) (a force balance,
  // closed form; the tester's car: mu_long 0.3, the lap reached 204.5 km/h, check said 281.7
  // km/h (drag)). The engine here (400 kW) alone would go faster: check must name `traction`.
  const double m = 640.0, mu = 0.3, crr = 0.015, cda = 1.0, cla = 0.5;
  Car car = aero_car(cda, cla, 0.45, 0.0);
  car.tyres.mu_long = mu;
  car.tyres.rolling_resistance = crr;
  const Air air = make_air(AirSpec{});
  const double rho = air.density_kg_m3, g = units::g0;
  const double v = std::sqrt(2.0 * (mu - crr) * m * g / (rho * (cda - (mu - crr) * cla)));
  const ConfigCheck c = check_config(car, 0, air);
  CHECK(c.top_speed_limit == TopSpeedLimit::traction);
  // 1e-9: a bracketing root (TOMS 748 to 2^-36 relative) of the same force balance.
  CHECK(near(c.top_speed_mps, v, 1e-9));
  // Grip to spare (mu_long 1.5): the engine's limit stands, as before.
  car.tyres.mu_long = 1.5;
  CHECK(check_config(car, 0, air).top_speed_limit == TopSpeedLimit::drag);
  // The axle model puts the drive on the rear axle alone: less than the point mass's four tyres.
  car.tyres.mu_long = mu;
  car.model = VehicleModel::axle;
  const ConfigCheck axle = check_config(car, 0, air);
  CHECK(axle.top_speed_limit == TopSpeedLimit::traction);
  CHECK(axle.top_speed_mps < 0.9 * v);
}

TEST_CASE("check's top speed is the front lift's where the drag moment unloads the front axle") {
  // Moments about the rear contact patch (REFERENCES.md, "Longitudinal load transfer"; the
  // axle loads of README, "Physics and assumptions", at a_x = 0): front = W f + DF bal -
  // D z_D / L. Without downforce it is zero at v^2 = 2 W f L / (rho CdA z_D) (closed form):
  // faster, the car would pitch over. The tester's car lapped at that speed while check gave the
  // engine's, 3.2 x higher.
  const double cda = 3.0, zd = 2.5;
  Car car = aero_car(cda, 0.0, 0.45, zd);
  car.model = VehicleModel::axle;
  const Air air = make_air(AirSpec{});
  const double v = std::sqrt(2.0 * car.mass_kg * units::g0 * car.front_weight * car.wheelbase_m /
                             (air.density_kg_m3 * cda * zd));
  REQUIRE(v < 0.8 * top_speed(400e3, air.density_kg_m3, cda));
  const ConfigCheck c = check_config(car, 0, air);
  CHECK(c.top_speed_limit == TopSpeedLimit::front_lift);
  CHECK(std::string(top_speed_limit_name(c.top_speed_limit)) == "front lift");
  // 1e-9: a bracketing root (TOMS 748 to 2^-36 relative) of the same moment balance.
  CHECK(near(c.top_speed_mps, v, 1e-9));
  // The point mass does not share load between axles: the engine's top speed (0.1 %, its root
  // on the speed table).
  car.model = VehicleModel::point_mass;
  const ConfigCheck pm = check_config(car, 0, air);
  CHECK(pm.top_speed_limit == TopSpeedLimit::drag);
  CHECK(near(pm.top_speed_mps, top_speed(400e3, air.density_kg_m3, cda), 1e-3));
  // A drag height of 0.3 m leaves the front loaded to the top of the tables: the rear tyres'
  // traction sets the top speed (mu 1.5 x their load < the drag at 60 m/s), as before.
  car.model = VehicleModel::axle;
  car.drag_height_m = 0.3;
  CHECK(check_config(car, 0, air).top_speed_limit == TopSpeedLimit::traction);
}

TEST_CASE("check places the load where a tyre's force peaks: Fn (1 + s) / (2 s) (closed form)") {
  // mu(Fz) Fz = mu0 Fz (1 - s (Fz - Fn) / Fn) is a parabola in Fz with its vertex at
  // Fz* = Fn (1 + s) / (2 s) (calculus: the derivative mu0 (1 + s - 2 s Fz / Fn) is 0 there).
  // Point mass on the level at steady speed: each tyre carries (m g + q ClA) / 4, which reaches
  // Fz* at q = (4 Fz* - m g) / ClA, q = rho v^2 / 2.
  const double m = 640.0, cla = 8.0, fn = 1500.0, s = 0.2;
  Car car = aero_car(1.0, cla, 0.45, 0.0);
  car.tyres.nominal_load_n = fn;
  car.tyres.load_sensitivity = s;
  const Air air = make_air(AirSpec{});
  const double peak = fn * (1.0 + s) / (2.0 * s);  // 4500 N
  const double v = std::sqrt(2.0 * (4.0 * peak - m * units::g0) / (air.density_kg_m3 * cla));
  const ConfigCheck c = check_config(car, 0, air);
  REQUIRE(c.tyre_peak_load_n);
  CHECK(near(*c.tyre_peak_load_n, peak, 1e-15));
  REQUIRE(c.tyre_peak_speed_mps);
  // 1e-7: bisected to 1e-6 m/s.
  CHECK(near(*c.tyre_peak_speed_mps, v, 1e-7, 1e-6));
  // Below that speed at the tables' top (little downforce): not within the envelope.
  car.configs.front().cla_m2 = {0.5};
  const ConfigCheck low = check_config(car, 0, air);
  REQUIRE(low.tyre_peak_load_n);
  CHECK_FALSE(low.tyre_peak_speed_mps);
  // No load sensitivity: no peak at all.
  car.tyres.load_sensitivity = 0.0;
  CHECK_FALSE(check_config(car, 0, air).tyre_peak_load_n);
}
