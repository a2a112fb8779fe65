// The envelope: aero forces, drive, and the top speed against closed forms.
#include <doctest/doctest.h>

#include <Eigen/Eigenvalues>
#include <cmath>
#include <utility>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
// The one real positive root of a v^3 + b v^2 + c v + d, from the eigenvalues of the companion
// matrix (Eigen, a general-purpose reference library).
double positive_real_root(double a, double b, double c, double d) {
  Eigen::Matrix3d comp;
  comp << -b / a, -c / a, -d / a, 1, 0, 0, 0, 1, 0;
  const Eigen::Vector3cd roots = comp.eigenvalues();
  double best = -1.0;
  for (int i = 0; i < 3; ++i)
    if (std::abs(roots[i].imag()) < 1e-9 && roots[i].real() > 0) best = roots[i].real();
  return best;
}
}  // namespace

TEST_CASE("top speed on the level solves eta P = (k v^2 + Crr m g) v (REFERENCES; 0.1 %)") {
  for (double cda : {0.6, 1.2, 1.5}) {
    Car car = test::plain_car(640.0, 1.5, 400e3);
    car.configs.front().cda_m2 = {cda};
    car.tyres.rolling_resistance = 0.012;
    car.powertrain.efficiency = 0.92;
    const Air air = make_air(AirSpec{});
    const Envelope env(test::configured(car), air);
    const double k = 0.5 * air.density_kg_m3 * cda;
    // k v^3 + 0 v^2 + Crr m g v - eta P = 0
    const double v = positive_real_root(k, 0.0, 0.012 * 640.0 * units::g0, -0.92 * 400e3);
    CHECK(near(env.top_speed_level_mps(), v, 1e-3));
    CHECK_FALSE(env.rev_limited());
  }
}

TEST_CASE("aero forces are 0.5 rho C v^2 (definition of the coefficients)") {
  Car car = test::plain_car();
  car.configs.front().cda_m2 = {1.2};
  car.configs.front().cla_m2 = {3.6};
  const Air air = make_air(AirSpec{});
  const Envelope env(test::configured(car), air);
  for (double v : {10.0, 55.5, 80.0}) {
    CHECK(near(env.drag_n(v), 0.5 * air.density_kg_m3 * 1.2 * v * v, 1e-12));
    CHECK(near(env.downforce_n(v), 0.5 * air.density_kg_m3 * 3.6 * v * v, 1e-12));
  }
  // N = m g cos(theta) + downforce; resistance = drag + Crr N + m g sin(theta).
  CHECK(near(env.normal_load_n(30.0, 1.0), 600.0 * units::g0 + env.downforce_n(30.0), 1e-12));
}

TEST_CASE("a geared car is capped at the rev limit in top gear when drag allows more") {
  Car car = test::constant_force_car(600.0, 3000.0, 1.5);
  car.powertrain.rev_limit_radps = 8000 * units::rpm;
  const Envelope env(test::configured(car), make_air(AirSpec{}));
  const double v_limit = 8000 * units::rpm * car.tyres.rolling_radius_m / 3.0;
  CHECK(env.rev_limited());
  CHECK(near(env.max_speed_mps(), v_limit, 1e-12));
  CHECK(near(env.top_speed_level_mps(), v_limit, 1e-12));
  // The table reads the drive of best_drive at its rows.
  CHECK(near(env.drive_n(v_limit * 0.5), 3000.0, 1e-9));
}

TEST_CASE("a car built in code with a negative mass is a typed error, not a nonsense lap") {
  // Issue 11: a program that built the formula car with mass -5 kg got "the car stops at ...".
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml")).configured(1).car();
  car.file.clear();  // built in code: named by its name
  car.mass_kg = -5.0;
  const Circuit c = test::bundled_circuit("tracks/brannock-park.yaml");
  // What the check prevents: the same car taken unchecked is solved into nonsense.
  {
    const Envelope unchecked(Envelope::Unchecked{}, test::configured(car), c.air);
    CHECK_THROWS_AS(solve_lap(unchecked, c.mesh), CannotMove);
  }
  try {
    const Envelope env(test::configured(car), c.air);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.subject() == "car 'Pellion FR-2'");
    CHECK(e.violation().field == "mass");
    CHECK(e.message() == "value -5 is out of range: must be [1, 100000] in SI units");
    CHECK(std::string(e.what()) ==
          "car 'Pellion FR-2': error: value -5 is out of range: must be [1, 100000] in SI units "
          "(mass)");
  }
}

TEST_CASE("envelope options and the air are checked too") {
  const Car car = test::plain_car();
  const Air air = make_air(AirSpec{});
  CHECK(test::describe(EnvelopeOptions{}.validate()) == "none");
  EnvelopeOptions o;
  o.speed_points = 1;
  CHECK(test::describe(o.validate()) ==
        "speed_points: value 1 is out of range: must be [2, 10000000]");
  o = EnvelopeOptions{};
  o.table_margin = 1.0;
  CHECK(test::describe(o.validate()) == "table_margin: value 1 is out of range: must be > 1");
  o = EnvelopeOptions{};
  o.speed_ceiling_mps = 0.0;
  CHECK(test::describe(o.validate()) ==
        "speed_ceiling_mps: value 0 is out of range: must be > 0 in SI units");
  try {
    const Envelope env(test::configured(car), air, o);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.subject() == "envelope options");
  }
  Air thin = air;
  thin.density_kg_m3 = 0.0;
  CHECK_THROWS_AS(Envelope(test::configured(car), thin), InvalidInput);
}

TEST_CASE("an Envelope's drive rows are the same kept for its powertrain as built afresh") {
  // The drive force and gear rows are kept for the last few powertrains (recent_per_key, eight)
  // and shared by the Envelopes of cars with an equal one (a sweep's cars): an Envelope that
  // reads them kept must read what one that built them reads, bit for bit. Built first, then
  // read kept by a heavier car of the same powertrain, then built again after nine other
  // final drives pushed them out.
  Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  const Air air = make_air(AirSpec{});
  auto rows = [&](const Car& c) {
    const Envelope env(c.configured(0), air);
    std::vector<double> drive;
    std::vector<int> gear;
    for (int k = 0; k <= 2000; ++k) {
      const double v = env.max_speed_mps() * k / 2000.0;
      drive.push_back(env.drive_n(v));
      gear.push_back(env.gear(v));
    }
    return std::pair{drive, gear};
  };
  const auto built = rows(car);
  Car heavier = car;
  heavier.mass_kg += 100.0;
  CHECK(rows(heavier) == built);  // kept: the same powertrain
  for (int k = 1; k <= 9; ++k) {
    Car other = car;
    other.powertrain.final_drive = car.powertrain.final_drive * (1.0 + 0.01 * k);
    const auto o = rows(other);
    CHECK(o.first != built.first);  // a powertrain of its own: rows of its own
  }
  CHECK(rows(car) == built);  // built again
}

TEST_CASE("a ride-height map's off-map speeds are spans whose ends the map's own solve confirms") {
  // The FR-2's high_map on springs a fifth as stiff: its ride heights leave the map's grid at
  // speed. Each span's finite end is where solve_ride_heights (model/aero.hpp, from the static
  // heights) turns its off-map flag, to the bisection's 1e-6 m/s: 1e-3 m/s either side of it
  // the flags differ. The note names the spans; its share of a lap reads the same test.
  const Car file = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const ConfiguredCar soft =
      file.configured(static_cast<std::size_t>(file.config_index("high_map")))
          .changed([](Car&, AeroConfig& a) {
            a.map->stiffness_front_npm /= 5.0;
            a.map->stiffness_rear_npm /= 5.0;
          });
  const Envelope env(soft, test::sea_level);
  REQUIRE_FALSE(env.off_map_spans().empty());
  const RideHeightMap& m = *soft.aero().map;
  const auto off = [&](double v) {
    return solve_ride_heights(m, v, test::sea_level.density_kg_m3, soft.car().drag_height_m,
                              soft.car().wheelbase_m, m.static_front_m, m.static_rear_m)
        .off_map;
  };
  for (const Envelope::SpeedSpan& sp : env.off_map_spans()) {
    if (sp.lo_mps > 0.0) {
      CHECK_FALSE(off(sp.lo_mps - 1e-3));
      CHECK(off(sp.lo_mps + 1e-3));
    }
    if (std::isfinite(sp.hi_mps)) {
      CHECK(off(sp.hi_mps - 1e-3));
      CHECK_FALSE(off(sp.hi_mps + 1e-3));
    }
  }
  bool noted = false;
  for (const RangeNote& n : range_notes(env))
    noted = noted || (n.kind == RangeNote::Kind::off_map &&
                      n.text.find("a ride height is off the map (from ") == 0);
  CHECK(noted);
}
