// The road under the car (issue 12): banking, wind, the engine in the track's air and trim
// zones, each against a closed form or a symmetry that does not use the solver's code.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

#include "lapwing/base/units.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/study/circuit.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;
using lapwing::test::sea_level;

namespace {

// The slowest and fastest speed of a lap.
std::pair<double, double> speed_range(const Lap& lap) {
  const auto [lo, hi] = std::minmax_element(lap.speed_mps.begin(), lap.speed_mps.end());
  return {*lo, *hi};
}

// Root of f on [lo, hi] by bisection (f(lo) < 0 < f(hi)): the test's own solver for a closed
// form's equation, to 1e-12 relative.
template <typename F>
double bisect(F f, double lo, double hi) {
  for (int k = 0; k < 200 && hi - lo > 1e-12 * hi; ++k) {
    const double mid = 0.5 * (lo + hi);
    (f(mid) < 0.0 ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}
}  // namespace

TEST_CASE("a banked circle without aero: v^2 = g R (sin b + mu cos b) / (cos b - mu sin b)") {
  // REFERENCES, banked road (derived there): N = m (g cos b + v^2 k sin b), the tyres hold
  // m (v^2 k cos b - g sin b) at mu N. No drag and no rolling resistance: no longitudinal force.
  const double radius = 60.0, mu = 1.2;
  for (const double bank_deg : {12.0, 25.0, -6.0}) {
    for (const VehicleModel model : {VehicleModel::point_mass, VehicleModel::axle}) {
      Car car = test::plain_car(700.0, mu);
      car.model = model;  // equal tyres on both axles, no load sensitivity: the same limit
      Track t = test::circle_track(radius, 0.5);
      t.segments.front().bank_rad = bank_deg * units::deg;
      const Circuit c = lay_out(t, sea_level);
      const Lap& lap = run_lap(test::configured(car), c).lap;
      const double b = bank_deg * units::deg;
      const double v = std::sqrt(units::g0 * radius * (std::sin(b) + mu * std::cos(b)) /
                                 (std::cos(b) - mu * std::sin(b)));
      // Steady speed by the root finder (2^-36) on a circle laid out as a polygon of 0.5 m
      // chords: 1e-6.
      const auto [lo, hi] = speed_range(lap);
      CHECK(near(lo, v, 1e-6));
      CHECK(near(hi, v, 1e-6));
    }
  }
}

TEST_CASE("a right turn on a left-helping bank is off-camber (the CSV's sign convention)") {
  // A segment's bank is relative to its turn; the mesh keeps it in the curvature's sign: a
  // right-hand arc banked +10 deg (its outside raised) holds the speed of a left-hand one.
  Car car = test::plain_car(700.0, 1.2);
  Track left = test::circle_track(60.0, 0.5), right = left;
  left.segments.front().bank_rad = 10 * units::deg;
  right.segments.front() = test::arc(60.0, 2 * units::pi, false);
  right.segments.front().bank_rad = 10 * units::deg;
  const Circuit cl = lay_out(left, sea_level), cr = lay_out(right, sea_level);
  CHECK(cl.mesh.bank_rad[10] == doctest::Approx(10 * units::deg));
  CHECK(cr.mesh.bank_rad[10] == doctest::Approx(-10 * units::deg));
  CHECK(near(run_lap(test::configured(car), cl).lap.lap_time_s,
             run_lap(test::configured(car), cr).lap.lap_time_s, 1e-9));
}

TEST_CASE("a straight into a head wind tops out where P = k (v + w)^2 v (REFERENCES, wind)") {
  const double power = 300e3, cda = 1.0, w = 6.0;
  Car car = test::plain_car(700.0, 1.6, power);
  car.configs.front().cda_m2 = {cda};
  const double k = 0.5 * sea_level.density_kg_m3 * cda;
  for (const double from_deg : {90.0, 270.0}) {  // from +x (head wind), from -x (tail wind)
    Track t = test::straight_track(6000.0, 0.5, 0.0);
    t.wind = Wind{w, from_deg * units::deg};
    const Circuit c = lay_out(t, sea_level);
    const double head = from_deg == 90.0 ? w : -w;
    CHECK(near(c.mesh.head_wind_mps[100], head, 1e-12));  // heading +x: w sin(from + 0)
    const double v =
        bisect([&](double x) { return k * (x + head) * (x + head) * x - power; }, 0.0, 200.0);
    const Envelope env(test::configured(car), sea_level);
    const SteadyProfile p = steady_profile(env, c.mesh);
    // The engine's steady limit on the level: drive P / v read from tables in v^2 (0.01 %).
    CHECK(p.limit[100] == SteadyLimit::engine);
    CHECK(near(p.speed_mps[100], v, 1e-4));
    // And the lap approaches it without passing it.
    const auto [lo, hi] = speed_range(run_lap(test::configured(car), c).lap);
    CHECK(hi <= p.speed_mps[100] * (1 + 1e-12));
    CHECK(near(hi, v, 2e-3));
  }
}

TEST_CASE("a tail wind faster than the car turns its drag, and the drag moment loads the front") {
  // A standing start with a 20 m/s tail wind: at the start the air flows from behind, drag =
  // -q CdA (q = rho w^2 / 2) pushes the car on, and its moment about the ground, D z_D / L, moves
  // load to the front: the front share of the aero load is (L bal - D z_D / L) / L, above bal
  // (the axle loads' moment balance: README, "Physics and assumptions"). It read bal - |D|
  // z_D / (L L) whatever the drag's sign (a helper's finding), where the trace's own axle loads
  // had it right.
  Car car = test::plain_car(700.0, 1.6, 300e3);
  AeroConfig& a = car.configs.front();
  a.cda_m2 = {1.2};
  a.cla_m2 = {3.6};
  a.balance = {0.42};
  car.drag_height_m = 0.42;
  Track t = test::straight_track(75.0, 0.1, 0.0);
  t.wind = Wind{20.0, 270.0 * units::deg};  // from -x: a tail wind on a heading of +x
  const Circuit c = lay_out(t, sea_level);
  const LapRun run = run_lap(test::configured(car), c);
  const Lap& lap = run.lap;
  const double q = 0.5 * sea_level.density_kg_m3 * 20.0 * 20.0;
  REQUIRE(near(lap.drag_n[0], -q * 1.2, 1e-12));
  REQUIRE(near(lap.downforce_n[0], q * 3.6, 1e-12));
  const double wb = car.wheelbase_m;
  const double lift = lap.downforce_n[0], drag = lap.drag_n[0];
  CHECK(near(lap.aero_balance_eff[0], (lift * 0.42 - drag * 0.42 / wb) / lift, 1e-12));
  CHECK(lap.aero_balance_eff[0] > 0.42);
  // Once the car outruns the wind the drag pulls back again and the moment unloads the front.
  const std::size_t fast = lap.speed_mps.size() - 1;
  REQUIRE(lap.speed_mps[fast] > 20.0);
  CHECK(lap.drag_n[fast] > 0.0);
  CHECK(lap.aero_balance_eff[fast] < 0.42);
}

TEST_CASE("a natural engine at 2000 m tops out at its J1349 power: v^3 = P / (CF k)") {
  // SAE J1349 (June 1990): P_site = P_ref / CF, CF = 1.18 (99 kPa / p_dry) sqrt(T / 298) - 0.18,
  // in the ISO 2533 air at 2000 m (dry); drag only, so P_site = k v^3 with k = rho CdA / 2.
  const double power = 300e3, cda = 0.9;
  Car car = test::plain_car(700.0, 1.6, power);
  car.configs.front().cda_m2 = {cda};
  car.powertrain.aspiration = Aspiration::natural;
  const Air air = make_air(AirSpec{2000.0, {}, {}, 0.0});
  const double cf = 1.18 * (99e3 / air.pressure_pa) * std::sqrt(air.temperature_k / 298.0) - 0.18;
  const double v = std::cbrt(power / cf / (0.5 * air.density_kg_m3 * cda));
  const Envelope env(test::configured(car), air);
  CHECK(near(env.power_ratio(), 1.0 / cf, 1e-14));
  // Root of the envelope's tabulated drive (0.01 %).
  CHECK(near(env.top_speed_level_mps(), v, 1e-4));
  // The same car with the curve held (fixed, the default) is faster by (CF)^(1/3).
  car.powertrain.aspiration = Aspiration::fixed;
  CHECK(near(Envelope(test::configured(car), air).top_speed_level_mps(), v * std::cbrt(cf), 1e-4));
}

TEST_CASE("trim zones: a zone over one of two equal straights halves the trim's gain") {
  // A stadium: two equal straights joined by equal half circles. The trim (less drag) pays on
  // each straight alike, so a zone over the first straight alone gains half of what the trim
  // gains without zones (symmetry; the mesh's points split the two halves alike to 1e-3).
  Car car = test::plain_car(700.0, 1.6, 250e3);
  AeroConfig& a = car.configs.front();
  a.cda_m2 = {1.1};
  a.cla_m2 = {3.0};
  Car trimmed = car;
  trimmed.configs.front().trim = StraightTrim{-0.35, -1.0, 0.0, 1e-3};
  Track t;
  t.name = "stadium";
  t.file = "stadium.yaml";
  t.closed = true;
  t.mesh_m = 0.5;
  t.segments = {test::straight(500.0), test::arc(50.0, units::pi, true), test::straight(500.0),
                test::arc(50.0, units::pi, true)};
  const double none = run_lap(test::configured(car), lay_out(t, sea_level)).lap.lap_time_s;
  const double everywhere =
      run_lap(test::configured(trimmed), lay_out(t, sea_level)).lap.lap_time_s;
  t.trim_zones = {TrimZone{0.0, 500.0}};
  const Circuit zoned = lay_out(t, sea_level);
  CHECK(zoned.mesh.trim_zone[10] == 1);
  CHECK(zoned.mesh.trim_zone[1200] == 0);  // 600 m: the first half circle
  const double in_zone = run_lap(test::configured(trimmed), zoned).lap.lap_time_s;
  CHECK(everywhere < none);
  CHECK(near(none - in_zone, 0.5 * (none - everywhere), 1e-3));
}

TEST_CASE("above its top speed at a trim zone's end or a downhill's foot the car slows, unbraked") {
  // Constant power P against drag k v^2 (plain_car: no rolling resistance, efficiency 1, no
  // rotating inertia), as the flying start above: past a trim zone's end, where the drag area
  // goes from the trim's back to the config's, or at the foot of a 12 % downhill, the car is
  // above its top speed on the level and slows by m v dv/ds = P / v - k v^2, so
  // k v^3 = P + (k v0^3 - P) exp(-3 k (s - s0) / m) (closed form) from the speed v0 it has at
  // the first point past the zone or the hill, s0. The engine's steady limit there is where
  // P = k v^3: a speed the car slows towards, not one to brake to (the sweeps once held the car
  // to it: 4 to 5 g of braking over the last metres before s0; README, "Physics and
  // assumptions").
  const double m = 700.0, power = 300e3, cda = 1.0;
  Car car = test::plain_car(m, 1.5, power);
  car.configs.front().cda_m2 = {cda};
  car.configs.front().trim = StraightTrim{-0.35, 0.0, 0.0, 1e-3};
  const double k = 0.5 * sea_level.density_kg_m3 * cda;
  const double v_trim = std::cbrt(power / (0.5 * sea_level.density_kg_m3 * (cda - 0.35)));
  const double v_top = std::cbrt(power / k);
  // A flying start just under the trim's top speed, a zone over the first 1 000 m of 3 000.
  Track zone = test::straight_track(3000.0, 0.5, 0.999 * v_trim);
  zone.trim_zones = {TrimZone{0.0, 1000.0}};
  // 2 500 m down at 12 % (some 6.5 times the distance m / (3 k) over which the speed settles),
  // then 2 000 m level; the car without its trim.
  Track hill = test::straight_track(4500.0, 0.5, 0.999 * v_top);
  hill.segments = {test::straight(2500.0, -0.12), test::straight(2000.0, 0.0)};
  for (const Track* t : {&zone, &hill}) {
    const Circuit c = lay_out(*t, sea_level);
    const bool by_zone = t == &zone;
    if (!by_zone) car.configs.front().trim.reset();
    for (const VehicleModel model : {VehicleModel::point_mass, VehicleModel::axle}) {
      car.model = model;
      INFO((by_zone ? "the zone's end" : "the hill's foot")
           << ", model " << static_cast<int>(model));
      const LapRun r = run_lap(test::configured(car), c);
      const Lap& lap = r.lap;
      std::size_t s0 = 1;
      while (by_zone ? c.mesh.trim_zone[s0] != 0 : c.mesh.grade_at(s0 - 1) != 0.0) ++s0;
      CAPTURE(c.mesh.s_m[s0]);
      REQUIRE(c.mesh.s_m[s0] > (by_zone ? 999.0 : 2499.0));
      const double v0 = lap.speed_mps[s0];
      // Near the trim's or the hill's top speed there, well above the level one's.
      if (by_zone) CHECK(v0 > 0.999 * v_trim);
      CHECK(v0 > 1.05 * v_top);
      // No braking anywhere; the step into s0 is the zone's or the hill's last: from s0 on,
      // each step slows (at full drive: `top_speed`, README, "Physics and assumptions").
      CHECK(std::find(lap.phase.begin(), lap.phase.end(), Phase::brake) == lap.phase.end());
      bool slowing = true;
      for (std::size_t i = s0 + 1; i < lap.speed_mps.size(); ++i) {
        slowing = slowing && lap.speed_mps[i] <= lap.speed_mps[i - 1];
        if (i < s0 + 200) CHECK(lap.phase[i] == Phase::top_speed);
      }
      CHECK(slowing);
      for (const double ds : {20.0, 200.0, 1000.0, 1900.0}) {
        const auto i = s0 + static_cast<std::size_t>(std::lround(ds / c.mesh.step_m));
        const double x = c.mesh.s_m[i] - c.mesh.s_m[s0];
        const double v =
            std::cbrt((power + (k * v0 * v0 * v0 - power) * std::exp(-3 * k * x / m)) / k);
        CAPTURE(x);
        // As the flying start's: the exponential step's second-order error where P / v is not
        // affine in v^2, 1e-6 at a 0.5 m mesh.
        CHECK(near(lap.speed_mps[i], v, 1e-6));
      }
    }
  }
}

TEST_CASE("a closed lap the engine limits everywhere: no braking at a climb's foot, any start") {
  // A loop of fast arcs (radius 800 m: the tyres never bind) with a 15 % climb and a 15 %
  // descent (a second reader's case): at the climb's foot the car comes to the engine's limit
  // on the climb faster than it, and slows at full drive. The lap once started at its slowest
  // steady point, on the climb, as if the car were on its limit there, and braked at 4 to 5 g
  // before it; and the lap time depended on where the loop starts. Both starts of the same loop
  // (the segments rotated: the line halfway up the climb) lap alike to the mesh's resolution
  // (the start moves the points by up to a step: 1e-5), with no braking anywhere.
  Car car = test::plain_car(700.0, 1.5, 300e3);
  car.configs.front().cda_m2 = {1.0};
  const double quarter = units::pi / 2.0;
  Track loop;
  loop.name = "climb loop";
  loop.file = "loop.yaml";
  loop.closed = true;
  loop.mesh_m = 0.5;
  loop.sectors_m = {0.0};
  loop.segments = {test::straight(1000.0, 0.0),  test::arc(800.0, quarter, true),
                   test::straight(400.0, 0.15),  test::arc(800.0, quarter, true),
                   test::straight(1000.0, 0.0),  test::arc(800.0, quarter, true),
                   test::straight(400.0, -0.15), test::arc(800.0, quarter, true)};
  Track mid = loop;
  mid.segments = {test::straight(200.0, 0.15),  test::arc(800.0, quarter, true),
                  test::straight(1000.0, 0.0),  test::arc(800.0, quarter, true),
                  test::straight(400.0, -0.15), test::arc(800.0, quarter, true),
                  test::straight(1000.0, 0.0),  test::arc(800.0, quarter, true),
                  test::straight(200.0, 0.15)};
  double laps[2] = {0.0, 0.0};
  int k = 0;
  for (const Track* t : {&loop, &mid}) {
    for (const VehicleModel model : {VehicleModel::point_mass, VehicleModel::axle}) {
      car.model = model;
      INFO((t == &loop ? "from the level straight" : "from halfway up the climb")
           << ", model " << static_cast<int>(model));
      const LapRun r = run_lap(test::configured(car), lay_out(*t, sea_level));
      CHECK(std::find(r.lap.phase.begin(), r.lap.phase.end(), Phase::brake) == r.lap.phase.end());
      CHECK(std::find(r.lap.phase.begin(), r.lap.phase.end(), Phase::corner) == r.lap.phase.end());
      if (model == VehicleModel::axle) laps[k++] = r.lap.lap_time_s;
    }
  }
  CHECK(near(laps[0], laps[1], 1e-5));
}

TEST_CASE("off camber past -atan(1/mu): the banked circle's speed, not the top of the tables") {
  // REFERENCES, banked road, with the downforce q ClA added to the normal load (no drag, so no
  // longitudinal force): m (v^2 k cos b - g sin b) = mu (m g cos b + m v^2 k sin b + c v^2),
  // c = rho ClA / 2, so v^2 = m g (sin b + mu cos b) / (m k (cos b - mu sin b) - mu c); c = 0 is
  // the Banking formula of README, "Physics and assumptions". Off camber (b < 0) the normal
  // load falls with the speed and reaches zero: the tyres hold nothing beyond, and the limit above
  // is the only one. The point mass took a bank steeper than -atan(1/mu) (-39.8 deg at mu 1.2) at
  // the top of its tables: its search read the ratios of a negative load squared. Banks either side
  // of that angle, a left and a right turn (a segment's bank is relative to its turn: -b is off
  // camber both ways), without and with downforce (balance = front weight share: both axles alike,
  // so the axle model has the point mass's limit).
  const double radius = 30.0, mu = 1.2, m = 700.0;
  for (const double cla : {0.0, 1.5}) {
    for (const double bank_deg : {-30.0, -39.0, -41.0, -45.0}) {
      for (const bool left : {true, false}) {
        for (const VehicleModel model : {VehicleModel::point_mass, VehicleModel::axle}) {
          CAPTURE(cla);
          CAPTURE(bank_deg);
          CAPTURE(left);
          Car car = test::plain_car(m, mu);
          car.model = model;
          car.configs.front().cla_m2 = {cla};
          Track t = test::circle_track(radius, 0.5);
          t.segments.front() = test::arc(radius, 2 * units::pi, left);
          t.segments.front().bank_rad = bank_deg * units::deg;
          const Circuit c = lay_out(t, sea_level);
          const Lap& lap = run_lap(test::configured(car), c).lap;
          const double b = bank_deg * units::deg, k = 1.0 / radius;
          const double q = 0.5 * sea_level.density_kg_m3 * cla;
          const double v = std::sqrt(m * units::g0 * (std::sin(b) + mu * std::cos(b)) /
                                     (m * k * (std::cos(b) - mu * std::sin(b)) - mu * q));
          // As the banked circle above: the root finder's 2^-36 on a polygon of 0.5 m chords.
          const auto [lo, hi] = speed_range(lap);
          CHECK(near(lo, v, 1e-6));
          CHECK(near(hi, v, 1e-6));
        }
      }
    }
  }
}

TEST_CASE("a drag moment that unloads the front axle holds the axle model at the lift speed") {
  // Moments about the rear contact patch (README, "Physics and assumptions", axle loads, a_x = 0,
  // no downforce): front = W f - D z_D / L, zero at q CdA = W f L / z_D, v^2 = 2 W f L / (rho CdA
  // z_D). Faster, the car would pitch over on its rear axle: the axle model's steady limit, phase
  // top_speed, and a warning in the lap's summary. The engine alone would go faster (P = q CdA v:
  // 60 m/s at 400 kW), the rear tyres carry the drag to spare.
  const double m = 640.0, cda = 3.0, zd = 2.5;
  Car car = test::plain_car(m, 1.5, 400e3);
  car.model = VehicleModel::axle;
  car.drag_height_m = zd;
  car.configs.front().cda_m2 = {cda};
  const double rho = sea_level.density_kg_m3;
  const double v =
      std::sqrt(2.0 * m * units::g0 * car.front_weight * car.wheelbase_m / (rho * cda * zd));
  REQUIRE(v < 0.8 * std::cbrt(2.0 * 400e3 / (rho * cda)));
  const Circuit c = lay_out(test::straight_track(3000.0, 0.5, 0.0), sea_level);
  const Envelope env(test::configured(car), sea_level);
  const SteadyProfile p = steady_profile(env, c.mesh);
  CHECK(p.limit[100] == SteadyLimit::front_lift);
  // A bracketing root (TOMS 748 to 2^-36) of the same moment balance on the envelope's rows:
  // 1e-9.
  CHECK(near(p.speed_mps[100], v, 1e-9));
  const LevelLift lift = level_lift_speed(env);
  CHECK(lift.axle == SteadyLimit::front_lift);
  CHECK(near(lift.speed_mps, v, 1e-9));

  const LapRun r = run_lap(test::configured(car), c);
  // The approach to the limit is exponential (the front's bound on a_x falls linearly in v^2,
  // some 60 m per e-fold here): reached within 1e-9 and clipped to it long before 3 km.
  CHECK(near(*std::max_element(r.lap.speed_mps.begin(), r.lap.speed_mps.end()), v, 1e-9));
  CHECK(r.lap.phase.back() == Phase::top_speed);
  CHECK(r.lap.lift_hold.held);
  CHECK(r.lap.lift_hold.front);
  int warned = 0;
  for (const std::string& w : r.summary.warnings)
    warned += w.rfind("the front axle has no load left at ", 0) == 0;
  CHECK(warned == 1);

  // The point mass shares the load over four tyres: no lift limit, the engine's top speed.
  car.model = VehicleModel::point_mass;
  const LapRun pm = run_lap(test::configured(car), c);
  CHECK_FALSE(pm.lap.lift_hold.held);
  CHECK(*std::max_element(pm.lap.speed_mps.begin(), pm.lap.speed_mps.end()) > 1.2 * v);
  // Nor does an ordinary car (drag height 0.3 m): no hold, no warning.
  car.model = VehicleModel::axle;
  car.drag_height_m = 0.3;
  const LapRun plain = run_lap(test::configured(car), c);
  CHECK_FALSE(plain.lap.lift_hold.held);
  for (const std::string& w : plain.summary.warnings) CHECK(w.find("no load left") == w.npos);
}

TEST_CASE("a flying start above the top speed slows by drag: m v dv/ds = P / v - k v^2") {
  // Constant power P against drag k v^2 (k = rho CdA / 2, no rolling resistance, efficiency 1,
  // no rotating inertia): m v^2 dv / (P - k v^3) = ds integrates to
  // k v^3 = P + (k v0^3 - P) exp(-3 k s / m) (closed form). A start 10 % above the top speed
  // v_top = (P / k)^(1/3) on a straight is no error: the car slows towards v_top.
  const double m = 700.0, power = 300e3, cda = 1.0;
  Car car = test::plain_car(m, 1.5, power);
  car.configs.front().cda_m2 = {cda};
  const double k = 0.5 * sea_level.density_kg_m3 * cda;
  const double v_top = std::cbrt(power / k), v0 = 1.1 * v_top;
  const Circuit c = lay_out(test::straight_track(3000.0, 0.5, v0), sea_level);
  const LapRun r = run_lap(test::configured(car), c);
  CHECK(r.lap.speed_mps.front() == v0);
  // Above the engine's steady limit at full drive: `top_speed` (README, "Physics and assumptions",
  // Phases).
  CHECK(r.lap.phase[10] == Phase::top_speed);
  for (const double s : {50.0, 200.0, 600.0}) {
    const auto i = static_cast<std::size_t>(std::lround(s / c.mesh.step_m));
    const double x = c.mesh.s_m[i];
    const double v = std::cbrt((power + (k * v0 * v0 * v0 - power) * std::exp(-3 * k * x / m)) / k);
    CAPTURE(x);
    // The exponential step is second order where the drive P / v is not affine in v^2:
    // 1e-6 at a 0.5 m mesh (the lap's own mesh error, README, "Performance").
    CHECK(near(r.lap.speed_mps[i], v, 1e-6));
  }
  // Slowing all the way, never below the top speed (the engine's steady limit, 0.01 %: its
  // root on the envelope's tables).
  bool slowing = true;
  for (std::size_t i = 1; i < r.lap.speed_mps.size(); ++i)
    slowing = slowing && r.lap.speed_mps[i] <= r.lap.speed_mps[i - 1];
  CHECK(slowing);
  CHECK(near(r.lap.speed_mps.back(), v_top, 1e-3));
}
