// Balance along the lap (the axle loads' formula is tested in model/loads_test.cpp), and the
// axle model against the point mass where they must agree and where they must not.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

#include "lapwing/base/units.hpp"
#include "lapwing/model/loads.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/solve/axle.hpp"
#include "lapwing/study/trade.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
Car formula(std::size_t config) {
  return load_car(test::source_path("cars/pellion-fr2.yaml")).configured(config).car();
}
// The larger axle usage (axle_usage) braking at `decel` (m/s^2) at u = v^2 on a point of
// curvature k and its road, at the loads that deceleration sets.
double braking_usage(const Envelope& env, double u, double k, const Road& road, double decel) {
  const Envelope::RoadForces f = env.road_forces(env.rows(false), u, k, road);
  const AxleLoads l = axle_loads(env.car(), f.drag_n, f.downforce_n, f.balance, f.normal_share,
                                 road.sin_slope, -decel);
  const AxleUsage a =
      axle_usage(env, l, -env.mass_kg() * decel + f.resistance_n, std::abs(f.lateral_n));
  return std::max(a.front_usage, a.rear_usage);
}
}  // namespace

TEST_CASE("with no aero, no drag height and no acceleration the shares are the static split") {
  Car car = test::plain_car(600.0, 1.5);
  car.front_weight = 0.45;
  const Circuit c = lay_out(test::circle_track(50.0, 0.5), make_air(AirSpec{}));
  const LapRun r = run_lap(test::configured(car), c);
  for (std::size_t i = 0; i < c.mesh.size(); i += 50) {
    CHECK(r.lap.long_accel_mps2[i] == doctest::Approx(0.0).epsilon(1e-9));
    CHECK(near(front_share(r.lap, i), 0.45, 1e-9));
  }
}

TEST_CASE("the axle model of a balanced all-wheel-drive car is the point mass (1e-6)") {
  // 50/50 weight and aero balance, no drag height, all-wheel drive, 50 % brake bias, and a
  // centre of gravity 1 um up (the file rule asks for > 0): both axles carry the same at every
  // point, so the first to saturate is either, and the limits are the point mass's.
  Car car = formula(1);
  car.front_weight = 0.5;
  car.configs.front().balance = {0.5};
  car.drag_height_m = 0.0;
  car.cg_height_m = 1e-6;
  car.powertrain.driven = DrivenAxle::all;
  car.brake_front_bias = 0.5;
  car.roll.reset();                      // both tyres of an axle alike, as the point mass's four
  car.model = VehicleModel::point_mass;  // the file's default is the axle model
  for (const char* track : {"tracks/brannock-park.yaml", "tracks/cairnholt.yaml"}) {
    const Circuit c = test::bundled_circuit(track);
    Car axle = car;
    axle.model = VehicleModel::axle;
    const double point = run_lap(test::configured(car), c).summary.lap_time_s;
    CHECK(near(run_lap(test::configured(axle), c).summary.lap_time_s, point, 1e-6));
  }
}

TEST_CASE(
    "axle model: more weight on a rear-driven car's rear axle shortens traction-limited exits") {
  Car forward = formula(1), rearward = formula(1);
  forward.model = rearward.model = VehicleModel::axle;
  rearward.front_weight = 0.38;
  // A standing start is traction-limited from the line.
  const Circuit accel = test::bundled_circuit("tracks/acceleration.yaml");
  CHECK(run_lap(test::configured(rearward), accel).summary.lap_time_s <
        run_lap(test::configured(forward), accel).summary.lap_time_s);
  // The exit of Brannock Park's first hairpin: from its apex to 150 m on.
  const Circuit tight = test::bundled_circuit("tracks/brannock-park.yaml");
  const LapRun a = run_lap(test::configured(forward), tight),
               b = run_lap(test::configured(rearward), tight);
  const CornerResult& hairpin = a.summary.corners.front();
  const std::size_t i0 = static_cast<std::size_t>(hairpin.apex_m / tight.mesh.step_m + 0.5);
  const std::size_t i1 = i0 + static_cast<std::size_t>(150.0 / tight.mesh.step_m);
  CHECK(b.lap.time_s[i1] - b.lap.time_s[i0] < a.lap.time_s[i1] - a.lap.time_s[i0]);
  // and the point mass, which shares grip over all four tyres, does not see it at all.
  forward.model = rearward.model = VehicleModel::point_mass;
  CHECK(run_lap(test::configured(rearward), accel).summary.lap_time_s ==
        run_lap(test::configured(forward), accel).summary.lap_time_s);
}

TEST_CASE("more drag height lowers the front share at top speed by exactly drag x dh / L") {
  Car low = formula(1);
  // The point mass: its speeds do not depend on the drag height (the axle model's do, the
  // default since issue 12), so the two laps share their states and only the loads differ.
  low.model = VehicleModel::point_mass;
  Car tall = low;
  tall.drag_height_m = low.drag_height_m + 0.2;
  const Circuit c = test::bundled_circuit("tracks/saltmere-flats.yaml");
  const LapRun a = run_lap(test::configured(low), c), b = run_lap(test::configured(tall), c);
  const auto top = static_cast<std::size_t>(
      std::max_element(a.lap.speed_mps.begin(), a.lap.speed_mps.end()) - a.lap.speed_mps.begin());
  // The point-mass speeds do not depend on the drag height: the same state, other loads.
  REQUIRE(a.lap.speed_mps[top] == b.lap.speed_mps[top]);
  const double drag = a.lap.drag_n[top];
  CHECK(
      near(a.lap.front_load_n[top] - b.lap.front_load_n[top], drag * 0.2 / low.wheelbase_m, 1e-9));
  const double total = a.lap.front_load_n[top] + a.lap.rear_load_n[top];
  CHECK(near(front_share(a.lap, top) - front_share(b.lap, top),
             drag * 0.2 / low.wheelbase_m / total, 1e-9));
}

TEST_CASE("usage: the car on its steady limit uses all of the limiting axle's ellipse") {
  Car car = formula(1);
  car.model = VehicleModel::axle;
  const Circuit c = lay_out(test::circle_track(80.0, 0.5), make_air(AirSpec{}));
  const LapRun r = run_lap(test::configured(car), c);
  const std::size_t i = c.mesh.size() / 2;
  CHECK(near(std::max(r.lap.front_usage[i], r.lap.rear_usage[i]), 1.0, 1e-6));
}

TEST_CASE(
    "the aero balance with the drag moment is (ClA bal - CdA z_D / L) / ClA; none without "
    "downforce") {
  // Hand-worked (moments about the rear contact patch, REFERENCES load transfer): ClA 3.6 m2 at
  // balance 0.42, CdA 1.2 m2 at 0.42 m, L = 2.9 m: 0.42 - (1.2 x 0.42 / 2.9) / 3.6 = 0.371724...
  const auto b = aero_balance_with_drag_moment(3.6, 1.2, 0.42, 0.42, 2.9);
  REQUIRE(b);
  CHECK(near(*b, 0.42 - 1.2 * 0.42 / 2.9 / 3.6, 1e-15));
  // The forces' ratio at any speed is the coefficients' ratio: the trace's channel agrees.
  const Car car = formula(1);
  const Circuit c = test::bundled_circuit("tracks/cairnholt.yaml");
  const LapRun r = run_lap(test::configured(car), c);
  const std::size_t i = r.lap.speed_mps.size() / 3;
  const double df = r.lap.downforce_n[i], d = r.lap.drag_n[i];
  const double bal = car.configs.front().balance.front();  // a constant config
  CHECK(near(r.lap.aero_balance_eff[i], (df * bal - d * car.drag_height_m / car.wheelbase_m) / df,
             1e-12));
  // No downforce: a share of no load is undefined, whatever the drag.
  CHECK_FALSE(aero_balance_with_drag_moment(0.0, 0.9, 0.45, 0.5, 2.6));
  // Nor where the downforce is zero to the user beside the drag moment (a robustness campaign's
  // ClA of 2.2e-308 m^2 printed -inf %, a subnormal one stopped the lap with a non-finite
  // channel): a share beyond a million in size is none. A small real ClA keeps its share
  // (0.001 m^2: 0.45 - 0.9 x 0.5 / 2.6 / 0.001 = -172.6).
  CHECK_FALSE(aero_balance_with_drag_moment(2.2250738585072014e-308, 0.9, 0.45, 0.5, 2.6));
  CHECK_FALSE(aero_balance_with_drag_moment(5e-324, 0.9, 0.45, 0.5, 2.6));
  CHECK_FALSE(aero_balance_with_drag_moment(1e-9, 0.9, 0.45, 0.5, 2.6));
  const auto small = aero_balance_with_drag_moment(0.001, 0.9, 0.45, 0.5, 2.6);
  REQUIRE(small);
  CHECK(near(*small, 0.45 - 0.9 * 0.5 / 2.6 / 0.001, 1e-12));
  const Car bare = load_car(test::source_path("tests/data/drag-only-car.yaml")).configured(0).car();
  const LapRun nr = run_lap(test::configured(bare), test::bundled_circuit("tracks/skidpad.yaml"));
  CHECK(std::isnan(nr.lap.aero_balance_eff[10]));
  CHECK_FALSE(nr.summary.balance.aero_balance_eff_150);
  CHECK_FALSE(nr.summary.balance.aero_balance_eff_250);
  // A subnormal ClA laps as none: no share anywhere (its channel was -inf at every point, and
  // the lap stopped at the output's check for non-finite numbers).
  Car faint = load_car(test::source_path("tests/data/drag-only-car.yaml"));
  for (double& cla : faint.configs[0].cla_m2) cla = 5e-324;
  const LapRun fr = run_lap(test::configured(faint.configured(0).car()),
                            test::bundled_circuit("tracks/skidpad.yaml"));
  CHECK(std::none_of(fr.lap.aero_balance_eff.begin(), fr.lap.aero_balance_eff.end(),
                     [](double x) { return std::isinf(x) || (x == x); }));
  CHECK_FALSE(fr.summary.balance.aero_balance_eff_150);
  // Nor the share alone (README, "Output files": null without downforce; it once read the config's
  // balance, 0.45, for a share of nothing), and the tables say "-" for both.
  CHECK_FALSE(nr.summary.balance.aero_balance_150);
  CHECK_FALSE(nr.summary.balance.aero_balance_250);
  CHECK(balance_cells(nr.summary.balance)[1] == "-");
  CHECK(balance_cells(nr.summary.balance)[2] == "-");
  // With downforce the share is the constant config's balance at both speeds.
  REQUIRE(r.summary.balance.aero_balance_150);
  CHECK(*r.summary.balance.aero_balance_150 == bal);
  REQUIRE(r.summary.balance.aero_balance_250);
  CHECK(*r.summary.balance.aero_balance_250 == bal);
  // The copies agree at zero downforce (issue 11 found three that did not): at every point the
  // trace's share is undefined, as the summary's above and check's ('-', null; cli_test), and
  // the front axle's load is the weight's part less the drag moment D z_D / L, the aero front
  // load the formula gives without downforce (model/loads.hpp; the skidpad is level).
  // Tolerance 1e-9 N: the same sums in another order.
  const double bare_balance = bare.configs.front().balance.front();
  for (std::size_t k = 0; k < nr.lap.speed_mps.size(); ++k) {
    CHECK(std::isnan(nr.lap.aero_balance_eff[k]));
    const AxleLoads weight_part =
        axle_loads(bare, 0.0, 0.0, bare_balance, 1.0, 0.0, nr.lap.long_accel_mps2[k]);
    const AxleLoads aero_part =
        aero_axle_loads(0.0, bare_balance, nr.lap.drag_n[k], bare.drag_height_m, bare.wheelbase_m);
    CHECK(std::abs(nr.lap.front_load_n[k] - weight_part.front_n - aero_part.front_n) < 1e-9);
    CHECK(aero_part.front_n <= 0.0);
  }
}

TEST_CASE("axle model: no point of any bundled lap uses more than either axle's ellipse") {
  // Issue 10, item 5: every phase (drive, braking, steady) checks both axles. The trace's usage
  // is worked from the speed profile (a_x by the central difference of v^2, held within what
  // the state at the point allows). One state is not exact: where braking meets the steady limit
  // that a rear axle sets, the rear cannot shed the drive that holds the speed without losing
  // the load that holds its lateral force, and the point between reads up to 1.015 (measured on
  // these laps). Before issue 10 the front axle read 1.11-1.26 on corner exits.
  constexpr double tol = 0.02;
  for (const char* car_file : {"cars/caldra-gt.yaml", "cars/pellion-fr2.yaml"}) {
    const Car file = load_car(test::source_path(car_file));
    for (const char* track_file :
         {"tracks/brannock-park.yaml", "tracks/saltmere-flats.yaml", "tracks/cairnholt.yaml",
          "tracks/brannock-park-survey.yaml", "tracks/skidpad.yaml", "tracks/acceleration.yaml"}) {
      const Circuit c = test::bundled_circuit(track_file);
      for (std::size_t config = 0; config < file.configs.size(); ++config) {
        Car car = file.configured(config).car();
        car.model = VehicleModel::axle;
        const LapRun r = run_lap(test::configured(car), c);
        const auto front = std::max_element(r.lap.front_usage.begin(), r.lap.front_usage.end());
        const auto rear = std::max_element(r.lap.rear_usage.begin(), r.lap.rear_usage.end());
        CAPTURE(std::string(car_file));
        CAPTURE(std::string(track_file));
        CAPTURE(car.configs.front().name);
        CAPTURE(c.mesh.s_m[static_cast<std::size_t>(front - r.lap.front_usage.begin())]);
        CAPTURE(c.mesh.s_m[static_cast<std::size_t>(rear - r.lap.rear_usage.begin())]);
        CHECK(*front <= 1.0 + tol);
        CHECK(*rear <= 1.0 + tol);
      }
    }
  }
}

TEST_CASE("axle model: front-, rear- and all-wheel drive keep both axles within their ellipse") {
  // The drive of an all-wheel-drive car is shared by load (axle.hpp): the largest total that
  // neither axle refuses. Tolerance as above.
  constexpr double tol = 0.02;
  for (const DrivenAxle driven : {DrivenAxle::front, DrivenAxle::rear, DrivenAxle::all})
    for (const char* track_file : {"tracks/brannock-park.yaml", "tracks/cairnholt.yaml"}) {
      Car car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(1).car();
      car.model = VehicleModel::axle;
      car.powertrain.driven = driven;
      const LapRun r = run_lap(test::configured(car), test::bundled_circuit(track_file));
      CAPTURE(static_cast<int>(driven));
      CAPTURE(std::string(track_file));
      CHECK(*std::max_element(r.lap.front_usage.begin(), r.lap.front_usage.end()) <= 1.0 + tol);
      CHECK(*std::max_element(r.lap.rear_usage.begin(), r.lap.rear_usage.end()) <= 1.0 + tol);
    }
}

TEST_CASE("a steady circle with lateral load transfer matches its derivation step by step") {
  // Milliken & Milliken, RCVD ch. 18 (REFERENCES, load transfer): no aero, no rolling
  // resistance, so at the steady limit each axle holds only its lateral force.
  const double m = 700.0, mu = 1.5, fn = 1500.0, s = 0.12, radius = 40.0;
  Car car = test::plain_car(m, mu);
  car.model = VehicleModel::axle;
  car.tyres.nominal_load_n = fn;
  car.tyres.load_sensitivity = s;
  car.cg_height_m = 0.35;
  car.front_weight = 0.45;
  car.roll = RollGeometry{1.60, 1.50, 0.55, 0.03, 0.06};
  // 1. Static axle loads: L_f = f m g, L_r = (1 - f) m g.
  const double w = m * units::g0, f = 0.45;
  const double load[2] = {f * w, (1 - f) * w};
  // 2. Transfer per newton of lateral force: h_ra = h - (f z_f + (1-f) z_r);
  //    c_f = (h_ra k_f + f z_f) / t_f, c_r = (h_ra (1 - k_f) + (1 - f) z_r) / t_r.
  const double h_ra = 0.35 - (f * 0.03 + (1 - f) * 0.06);
  const double c[2] = {(h_ra * 0.55 + f * 0.03) / 1.60, (h_ra * 0.45 + (1 - f) * 0.06) / 1.50};
  // 3. Axle i carries share_i m a (f front, 1 - f rear) and moves d_i = c_i m a to its outer
  //    tyre; each tyre's mu(Fz) = mu (1 - s (Fz - Fn) / Fn), so the axle holds
  //    mu [L (1 + s) - s (L^2 / 2 + 2 d^2) / Fn].
  // 4. share m a = that capacity is a quadratic in a: A a^2 + B a - C = 0 with
  //    A = 2 mu s c^2 m^2 / Fn, B = share m, C = mu (L (1 + s) - s L^2 / (2 Fn)).
  const double share[2] = {f, 1 - f};
  double a_max = 1e9;
  for (int i = 0; i < 2; ++i) {
    const double A = 2 * mu * s * c[i] * c[i] * m * m / fn, B = share[i] * m;
    const double C = mu * (load[i] * (1 + s) - s * load[i] * load[i] / (2 * fn));
    const double a = (-B + std::sqrt(B * B + 4 * A * C)) / (2 * A);
    // Both tyres still on the ground: d <= L / 2.
    REQUIRE(c[i] * m * a <= 0.5 * load[i]);
    a_max = std::min(a_max, a);
  }
  // 5. The circle's speed: v^2 = R a.
  const double v = std::sqrt(radius * a_max);
  const Circuit circle = lay_out(test::circle_track(radius, 0.5), make_air(AirSpec{}));
  const LapRun run = run_lap(test::configured(car), circle);
  const Lap& lap = run.lap;
  const auto [lo, hi] = std::minmax_element(lap.speed_mps.begin(), lap.speed_mps.end());
  // The solver's steady root (2^-36) on a polygon of 0.5 m chords: 1e-6.
  CHECK(near(*lo, v, 1e-6));
  CHECK(near(*hi, v, 1e-6));
  // The transfer costs speed: without it the same car is faster.
  Car even = car;
  even.roll.reset();
  CHECK(run_lap(test::configured(even), circle).lap.speed_mps[0] > v * 1.01);
}

TEST_CASE("with no load sensitivity lateral transfer changes nothing: the axle model as before") {
  // Each tyre's force is mu Fz: the axle holds mu L however L is shared (tyre.hpp), so the
  // lap is the axle model's without roll geometry (rounding of the split: 1e-9).
  Car car = formula(1);
  car.model = VehicleModel::axle;
  car.tyres.load_sensitivity = 0.0;
  car.roll.reset();  // the file's roll geometry goes to `rolling` below
  Car rolling = car;
  rolling.roll = RollGeometry{1.6, 1.55, 0.55, 0.03, 0.06};
  for (const char* track : {"tracks/brannock-park.yaml", "tracks/cairnholt.yaml"}) {
    const Circuit c = test::bundled_circuit(track);
    CHECK(near(run_lap(test::configured(rolling), c).summary.lap_time_s,
               run_lap(test::configured(car), c).summary.lap_time_s, 1e-9));
  }
  // With load sensitivity it does: the loaded outer tyre gains less than the inner loses.
  car.tyres.load_sensitivity = rolling.tyres.load_sensitivity = 0.08;
  const Circuit c = test::bundled_circuit("tracks/brannock-park.yaml");
  CHECK(run_lap(test::configured(rolling), c).summary.lap_time_s >
        run_lap(test::configured(car), c).summary.lap_time_s + 0.05);
}

TEST_CASE(
    "a rear-driven car that lifts its front on a graded straight: no axle reads a load below 0") {
  // An invented wheelie-limited car (rear drive, cg 1 m over a 1.8 m wheelbase, 30 % on the
  // front) up an 8 % straight from rest. Under drive the front axle is asked for no force, and
  // the acceleration is bounded where it would lift (a <= front load x L / (m h): axle.cpp's
  // front_bound). The channels pass takes the speed profile's own acceleration where both axles
  // carry it; an axle lifted by it (a negative load) reads usage 0 when asked for nothing, and
  // was taken so: front loads down to -0.4 N here, -58 N on Cairnholt (found in review). The
  // bound: every point's front load at or above -1e-9 of the total (the pass rounds 1e-12 of it
  // to 0; the model's fixed point is held to 1e-9 m/s^2, 1e-7 N of load transfer here).
  const std::string car_file = test::scratch_file("wheelie-car.yaml", R"(format: 1
name: "wheelie test car"
mass: 600
cg_height: 1.0
wheelbase: 1.8
front_weight: 0.3
tyres: {mu_long: 1.2, mu_lat: 1.8, nominal_load: 2000, rolling_radius: 0.3}
powertrain: {constant_power: 300 kW}
brakes: {front_bias: 0.6}
aero:
  drag_height: 1.0 m
  configs:
    bare: {cda: 0.9, cla: 0, balance: 0.45}
)");
  const std::string track_file = test::scratch_file("wheelie-hill.yaml", R"(format: 1
name: "hill"
closed: false
start_speed: 0 km/h
altitude: 0 m
mesh: 0.5 m
segments:
  - straight: {length: 300 m, grade: 8 %}
)");
  const Car car = load_car(car_file).configured(0).car();
  REQUIRE(car.model == VehicleModel::axle);
  const Track t = load_track(track_file);
  const LapRun r = run_lap(test::configured(car), lay_out(t, make_air(t.air)));
  std::size_t lifted = 0;
  for (std::size_t i = 0; i < r.lap.front_load_n.size(); ++i) {
    const double total = r.lap.front_load_n[i] + r.lap.rear_load_n[i];
    lifted += r.lap.front_load_n[i] < -1e-9 * total;
  }
  CHECK(lifted == 0);
}

TEST_CASE("a braking solve started next to its answer stays on the feasible side near saturation") {
  // Found in review: the Newton solve from a hint stopped a step early where its last two steps
  // looked quadratic (4.6e-6, then 3.5e-9 m/s^2) while the axle neared saturation (its force
  // left falls to 0 with an infinite slope: g' went from -7e4 to -4e8 in that step), and
  // answered 1.5e-6 m/s^2 beyond the root (the rear axle's usage 1 + 1.7e-7). The answer must
  // be the fixed point to the model's tolerance (1e-9 m/s^2) on its feasible side: usage at
  // most 1 + 1e-9, and within 1e-8 m/s^2 of the solve from no hint. An invented variant of the
  // bundled Pellion FR-2 (ellipse exponent 6, cg 0.3 m, no load sensitivity) braking at 8 m/s
  // on a 0.255 1/m curve down a 12 % slope.
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  car.tyres.ellipse_exponent = 6;
  car.cg_height_m = 0.3;
  car.brake_front_bias = 0.62;
  car.tyres.load_sensitivity = 0;
  const Envelope env(car.configured(0), make_air(AirSpec{}));
  Road road;
  road.sin_slope = 0.12;
  road.cos_slope = std::sqrt(1 - 0.12 * 0.12);
  const double u = 64.0, k = 0.25501002443187554;
  const auto usage = [&](double decel) { return braking_usage(env, u, k, road, decel); };
  const double cold = axle_brake_accel(env, u, k, road, nullptr);
  CHECK(usage(cold) <= 1.0 + 1e-9);
  AxleHints hints;
  hints.front = hints.rear = cold * (1.0 - 1e-6);
  const double warm = axle_brake_accel(env, u, k, road, &hints);
  CAPTURE(warm - cold);
  CHECK(usage(warm) <= 1.0 + 1e-9);
  CHECK(std::abs(warm - cold) <= 1e-8);
}

TEST_CASE("axles 'surely within' the ellipse only where their usage reads at most 1") {
  // axle_surely_within stands for axle_usage's "both at most 1" in the loads-only channels pass
  // (solver.cpp): it must never say true where either axle's usage (the ellipse with its
  // powers, the closed form of README, "Physics and assumptions") is above 1, and it must say
  // true on much of the inside, or it saves nothing. A grid of speeds, curvatures and
  // longitudinal forces, driving and braking, for the bundled cars (rear-driven and with
  // exponents 2 and 2.2, as the test car) and an all-wheel-drive variant.
  std::vector<Car> cars{load_car(test::source_path("cars/pellion-fr2.yaml")),
                        load_car(test::source_path("cars/caldra-gt.yaml")),
                        load_car(test::source_path("tests/data/caldra-gt-exponent-2.2.yaml"))};
  Car awd = cars[0];
  awd.powertrain.driven = DrivenAxle::all;
  cars.push_back(awd);
  for (const Car& car : cars) {
    const Envelope env(car.configured(0), make_air(AirSpec{}));
    int sure = 0, inside = 0;
    for (const double v : {15.0, 40.0, 70.0})
      for (const double k : {0.0, 0.002, 0.01, 0.05})
        for (int j = -30; j <= 30; ++j) {
          const Envelope::RoadForces f = env.road_forces(env.rows(false), v * v, k, Road{});
          const double ax = 0.5 * j;  // m/s^2, from -15 to 15
          const AxleLoads l =
              axle_loads(env.car(), f.drag_n, f.downforce_n, f.balance, f.normal_share, 0.0, ax);
          const double fx = env.mass_kg() * ax + f.resistance_n, fy = std::abs(f.lateral_n);
          const AxleUsage u = axle_usage(env, l, fx, fy);
          const bool within = u.front_usage <= 1.0 && u.rear_usage <= 1.0;
          if (axle_surely_within(env, l, fx, fy)) {
            CAPTURE(v);
            CAPTURE(k);
            CAPTURE(ax);
            CHECK(within);
            ++sure;
          }
          if (std::max(u.front_usage, u.rear_usage) <= 0.99) ++inside;
        }
    CAPTURE(car.name);
    CHECK(inside > 0);
    CHECK(sure > inside / 2);
  }
}

TEST_CASE(
    "braking where the front's capacity outgrows the load it gains: the rear is solved first") {
  // Found in review: with no load sensitivity the front axle's braking capacity grows with the
  // load the deceleration moves onto it, mu h / (L bias) per m/s^2 (here 1.5 x 0.8 / (2.7 x
  // 0.4) = 1.1 > 1), so the front's fixed point has no upper root and the Newton iteration on
  // it failed after sixty doublings on every call, the bracketing search deciding (three times
  // as long a point on Brannock Park). After one such call the hints must start at the rear,
  // and the fast path's answer must be the bracketing search's to the model's tolerance
  // (1e-9 m/s^2; 1e-8 allowed for the two searches' sides), on its feasible side (usage at most
  // 1 + 1e-9). An invented variant of the bundled Caldra GT: front drive, cg 0.8 m, brake bias
  // 0.4, no load sensitivity, braking at 40 m/s on a 0.005 1/m curve (0.8 g lateral).
  Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  car.powertrain.driven = DrivenAxle::front;
  car.cg_height_m = 0.8;
  car.brake_front_bias = 0.4;
  car.tyres.load_sensitivity = 0.0;
  const Envelope env(car.configured(0), make_air(AirSpec{}));
  const double u = 1600.0, k = 0.005;
  REQUIRE(axle_steady_excess(env, 40.0, k, Road{}) < 0.0);  // within the steady limit
  AxleHints hints;  // rear_binds false: the front is tried first
  const double first = axle_brake_accel(env, u, k, Road{}, &hints);
  CHECK(hints.rear_binds);
  const double second = axle_brake_accel(env, u, k, Road{}, &hints);
  CHECK(std::abs(second - first) <= 1e-8);
  const Envelope::RoadForces f = env.road_forces(env.rows(false), u, k, Road{});
  const AxleLoads l =
      axle_loads(env.car(), f.drag_n, f.downforce_n, f.balance, f.normal_share, 0.0, -second);
  const AxleUsage a =
      axle_usage(env, l, -env.mass_kg() * second + f.resistance_n, std::abs(f.lateral_n));
  CAPTURE(first);
  CAPTURE(second);
  CAPTURE(a.front_usage);
  CAPTURE(a.rear_usage);
  CHECK(std::max(a.front_usage, a.rear_usage) <= 1.0 + 1e-9);
  CHECK(a.rear_usage >= 1.0 - 1e-6);  // the rear sets it
}

TEST_CASE("a drive solve gives the same answer and hints whichever limit it tries first") {
  // axle_drive_accel tries a driven axle's own root before the engine's (or the front's) bound
  // where the last call on that axle found the root below it (AxleHints' front_below and
  // rear_below), and the bound first otherwise (axle.cpp, lower_to). The order is a matter of
  // speed only: the answer and the hints left for the next call must be the same to the bit
  // (==, no tolerance) as with the bound always tried first (the flags cleared before each
  // call), where the guess holds and where it fails. A sweep's sequences of calls (speed up
  // and down through traction-, engine- and front-limited ones) on a level road and on curves,
  // for the bundled cars (rear-driven, exponents 2 and 2.2) and front- and all-wheel-drive
  // variants; from the hints the calls leave, and from hints 30 % above the root with the
  // bound just above it.
  std::vector<Car> cars{load_car(test::source_path("cars/pellion-fr2.yaml")),
                        load_car(test::source_path("cars/caldra-gt.yaml")),
                        load_car(test::source_path("tests/data/caldra-gt-exponent-2.2.yaml"))};
  for (const DrivenAxle d : {DrivenAxle::front, DrivenAxle::all}) {
    Car c = cars[2];
    c.powertrain.driven = d;
    cars.push_back(c);
  }
  // Found in review: invented cars with a tall centre of gravity (1 m), where a warm start from
  // well above the root can settle where the driven axle has nothing left (phi flat at -R / m,
  // a = -R / m < 0) while the bound above is feasible: the bound-first order answers the bound.
  {
    Car tall = cars[0];  // the Pellion, cg 0.29 m
    tall.cg_height_m = 1.0;
    cars.push_back(tall);
    Car awd = cars[1];  // the Caldra GT
    awd.cg_height_m = 1.0;
    awd.powertrain.driven = DrivenAxle::all;
    awd.tyres.load_sensitivity = 0.35;
    awd.tyres.ellipse_exponent = 3.0;
    if (awd.roll) awd.roll->roll_centre_front_m = awd.roll->roll_centre_rear_m = 0.0;
    cars.push_back(awd);
  }
  for (const Car& car : cars) {
    const Envelope env(car.configured(0), make_air(AirSpec{}));
    AxleHints guessed, plain;
    int root_first = 0, bound = 0;
    for (const double k : {0.0, 0.002, 0.004, 0.012, 0.03})
      for (int j = 0; j <= 160; ++j) {
        // Up from 5 m/s to 85 m/s and back down, in steps of 1 m/s.
        const double v = 5.0 + (j <= 80 ? j : 160 - j);
        const double u = v * v;
        if (axle_steady_excess(env, v, k, Road{}) > 0.0) continue;  // beyond the steady limit
        const double drive_n = env.rows(false).at(u).drive_n;
        const bool guess = guessed.front_below || guessed.rear_below;
        plain.front_below = plain.rear_below = false;
        const double a = axle_drive_accel(env, u, k, Road{}, drive_n, false, &guessed);
        const double b = axle_drive_accel(env, u, k, Road{}, drive_n, false, &plain);
        CAPTURE(car.name);
        CAPTURE(v);
        CAPTURE(k);
        CHECK(a == b);
        CHECK(guessed.front == plain.front);
        CHECK(guessed.rear == plain.rear);
        root_first += guess;
        bound += !guess;
        // The same from hints 30 % above the traction limit's root, with the engine's bound
        // just under that root (1e-5 m/s^2) and just above it (1e-3), on the level and up an
        // 8 % grade: the root first against the bound first.
        for (const double grade : {0.0, 0.08}) {
          Road road;
          road.sin_slope = grade;
          road.cos_slope = std::sqrt(1.0 - grade * grade);
          const double root = axle_drive_accel(env, u, k, road, 1e9, false, nullptr);
          const double resistance = env.road_forces(env.rows(false), u, k, road).resistance_n;
          for (const double off : {-1e-5, 1e-3}) {
            const double near_root_n = resistance + (root + off) * env.effective_mass_kg();
            AxleHints far_guessed, far_plain;
            far_guessed.front = far_guessed.rear = far_plain.front = far_plain.rear = 1.3 * root;
            far_guessed.front_below = far_guessed.rear_below = true;
            const double c = axle_drive_accel(env, u, k, road, near_root_n, false, &far_guessed);
            const double d = axle_drive_accel(env, u, k, road, near_root_n, false, &far_plain);
            CAPTURE(grade);
            CAPTURE(off);
            CHECK(c == d);
            CHECK(far_guessed.front == far_plain.front);
            CHECK(far_guessed.rear == far_plain.rear);
          }
        }
      }
    CAPTURE(car.name);
    CHECK(root_first > 0);  // both orders were taken
    CHECK(bound > 0);
  }
}

TEST_CASE("a rear-driven car whose front outer tyre is on its floor laps faster with more grip") {
  // A monotonicity campaign's invented front-heavy, rear-driven car (load sensitivity 0.625:
  // the front's outer tyre past the floor's load on a 15 m arc) from rest round 180 degrees of
  // that arc. Its front bound read the parabolas' floor load (21 kN, above the axle's 7.3 kN):
  // -4.9 g at a point the front held, so under drive on the arc the speed fell by 5.3 km/h in
  // one 0.5 m step every 9 m, and the lap took 14.455 s at mu_lat 1.826 and 14.567 s at 1.85.
  // The bound now reads the least load of the stretch the front's load is in
  // (TyreModel::axle_load_holding_lateral): more grip, a faster lap (by more than the solver's
  // 1e-9), and under drive no step loses more than 0.5 km/h (the lap's largest is 0.26, on the
  // straight after the arc: drag beyond the drive in a shift's cut).
  const auto car_text = [](double mu_lat) {
    return std::string(R"(format: 1
name: "floor test car"
mass: 1196 kg
inertia_factor: 0.067
cg_height: 0.752 m
wheelbase: 3.098 m
front_weight: 0.619
track_width: {front: 1.60 m, rear: 1.55 m}
roll_stiffness_front: 0.55
roll_centre_height: {front: 0.03 m, rear: 0.06 m}
model: axle
tyres: {mu_long: 1.204, mu_lat: )") +
           std::to_string(mu_lat) + R"(, nominal_load: 1828 N, load_sensitivity: 0.625,
        ellipse_exponent: 1.43, rolling_radius: 0.33 m, rolling_resistance: 0.0121}
powertrain: {constant_power: 400 kW, efficiency: 0.715, driven_axle: rear}
brakes: {front_bias: 0.606}
aero:
  drag_height: 0.313 m
  configs:
    c: {cda: 1.696 m2, cla: 0 m2, balance: 0.495}
)";
  };
  const Track t = load_track(test::scratch_file("floor-arc.yaml", R"(format: 1
name: "arc after a straight"
closed: false
start_speed: 0 km/h
altitude: 0 m
mesh: 0.5 m
segments:
  - straight: 40 m
  - arc: {radius: 15 m, angle: 180 deg, turn: right}
  - straight: 60 m
)"));
  const Circuit c = lay_out(t, make_air(t.air));
  double last = 0.0;
  for (const double mu_lat : {1.826, 1.85}) {
    const Car car = load_car(test::scratch_file("floor-car.yaml", car_text(mu_lat)));
    const LapRun r = run_lap(test::configured(car.configured(0).car()), c);
    CAPTURE(mu_lat);
    if (last > 0.0) CHECK(r.summary.lap_time_s < last * (1.0 - 1e-9));
    last = r.summary.lap_time_s;
    double worst = 0.0;
    for (std::size_t i = 0; i + 1 < r.lap.speed_mps.size(); ++i)
      if (r.lap.phase[i] == Phase::accelerate && r.lap.phase[i + 1] == Phase::accelerate)
        worst = std::min(worst, r.lap.speed_mps[i + 1] - r.lap.speed_mps[i]);
    CHECK(worst > -0.5 / 3.6);
  }
}

TEST_CASE("a braking solve from a hint far above its answer does not settle below zero") {
  // A differential campaign's finding (a brute-force scan of the deceleration against the tyre
  // law, helper session): a warm start from a stale front hint (8 m/s^2, left by seven steps of
  // a sweep along an arc where the rear set the answers) took one Newton step past the answer
  // into the stretch where the front has nothing left for braking (its lateral force takes it
  // all: phi flat at R / m), and settled on that flat part's root, d = R / m = -0.30 m/s^2 down
  // a 5 % slope: the car "braking" by accelerating, its front axle's usage 1.0022 with no
  // braking force asked. From no hint the solve answers 1.89 m/s^2, the front on its limit.
  // Inside the steady limit the answer is the top of the feasible stretch that holds a
  // deceleration of 0 (README, "Physics and assumptions"), never below 0, whatever the hint;
  // hints only move where the solve starts. An invented car: tall (cg 0.88 m over a 3 m
  // wheelbase), front-heavy (65 %), load sensitivity 0.28, ellipse exponent 2.2, no roll
  // geometry, braking at 9.6 m/s on a 7.9 m radius down a 5 % slope.
  const Car car = load_car(test::scratch_file("downhill-braking.yaml", R"(format: 1
name: "invented downhill braking car"
mass: 775 kg
cg_height: 0.88 m
wheelbase: 3.0 m
front_weight: 0.65
tyres: {mu_long: 1.15, mu_lat: 1.56, nominal_load: 1311 N, load_sensitivity: 0.28,
        ellipse_exponent: 2.2, rolling_radius: 0.33 m, rolling_resistance: 0.012}
powertrain: {constant_power: 500 kW, driven_axle: rear}
brakes: {front_bias: 0.6}
aero:
  drag_height: 0.9 m
  configs:
    c: {cda: 0.94 m2, cla: 4.16 m2, balance: 0.357}
)"));
  const Envelope env(car.configured(0), make_air(AirSpec{}));
  Road road;
  road.sin_slope = -0.05;
  road.cos_slope = std::sqrt(1 - 0.05 * 0.05);
  const double u = 92.0, k = 0.126;
  REQUIRE(axle_steady_excess(env, std::sqrt(u), k, road) < 0.0);  // inside the steady limit
  const auto usage = [&](double decel) { return braking_usage(env, u, k, road, decel); };
  const double cold = axle_brake_accel(env, u, k, road, nullptr);
  CAPTURE(cold);
  CHECK(cold > 1.0);
  CHECK(usage(cold) <= 1.0 + 1e-9);
  CHECK(usage(cold) >= 1.0 - 1e-6);  // an axle on its limit
  for (const double front : {0.5, 1.0, 3.0, 5.0, 8.0, 12.0, 20.0})
    for (const bool rear_binds : {false, true}) {
      AxleHints hints;
      hints.front = front;
      hints.rear = 1.0;
      hints.rear_binds = rear_binds;
      const double warm = axle_brake_accel(env, u, k, road, &hints);
      CAPTURE(front);
      CAPTURE(rear_binds);
      CAPTURE(warm);
      CHECK(std::abs(warm - cold) <= 1e-8);  // the two searches' sides: 1e-8 (as above)
      CHECK(usage(warm) <= 1.0 + 1e-9);
    }
}
