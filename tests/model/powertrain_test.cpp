// Engine and gearbox against the relations in REFERENCES.md ("Engine": power = torque x angular
// speed; rpm = v / r_wheel x gear x final x 60 / (2 pi)).
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <vector>

#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/powertrain.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
Powertrain gearbox() {
  Powertrain p;
  p.engine_radps = {5000 * units::rpm, 9000 * units::rpm, 12000 * units::rpm};
  p.torque_nm = {300, 400, 350};
  p.rev_limit_radps = 12000 * units::rpm;
  p.gears = {3.0, 2.0, 1.4, 1.0};
  p.final_drive = 3.5;
  p.efficiency = 0.9;
  return p;
}
}  // namespace

TEST_CASE("engine speed is v / r x gear x final x 60 / (2 pi) rpm (REFERENCES, engine)") {
  const Powertrain p = gearbox();
  const double r = 0.33, v = 40.0;
  const Drive d = best_drive(p, r, v);
  const double rpm = v / r * p.gears[d.gear - 1] * p.final_drive * 60.0 / (2 * units::pi);
  CHECK(near(d.engine_radps / units::rpm, rpm, 1e-12));
}

TEST_CASE("drive force is torque x overall ratio x efficiency / r, in the gear that gives most") {
  const Powertrain p = gearbox();
  const double r = 0.33;
  for (double v : {5.0, 20.0, 35.0, 60.0, 80.0}) {
    const Drive d = best_drive(p, r, v);
    double best = 0.0;
    for (double gr : p.gears) {
      const double w = v / r * gr * p.final_drive;
      if (w > p.rev_limit_radps) continue;
      best = std::max(best, engine_torque_nm(p, w) * gr * p.final_drive * p.efficiency / r);
    }
    CHECK(near(d.force_n, best, 1e-12));
    // Power at the wheels = efficiency x torque x engine speed (power = torque x angular speed)
    // wherever the engine runs on its curve (not slipping the clutch).
    const double w = v / r * p.gears[d.gear - 1] * p.final_drive;
    if (w > p.engine_radps.front())
      CHECK(near(d.force_n * v, p.efficiency * engine_torque_nm(p, w) * w, 1e-12));
  }
}

TEST_CASE("the torque curve is linear between points, held below the first, zero past the limit") {
  const Powertrain p = gearbox();
  CHECK(near(engine_torque_nm(p, 7000 * units::rpm), 350.0, 1e-12));
  CHECK(engine_torque_nm(p, 1000 * units::rpm) == 300.0);
  CHECK(engine_torque_nm(p, 12001 * units::rpm) == 0.0);
}

TEST_CASE("past the rev limit in top gear there is no drive") {
  const Powertrain p = gearbox();
  const double r = 0.33;
  const double v_top = rev_limited_speed_mps(p, r);
  CHECK(near(v_top, 12000 * units::rpm * r / 3.5, 1e-12));
  CHECK(best_drive(p, r, v_top).force_n > 0.0);
  CHECK(best_drive(p, r, v_top * 1.001).force_n == 0.0);
}

TEST_CASE("DriveWalk gives best_drive bit for bit at increasing speeds") {
  // DriveWalk is best_drive read along a walk of the torque curve (the Envelope's rows): the
  // same force, gear and engine speed, exactly, at speeds that land on curve nodes, between
  // them, below the first, at the rev limit and beyond it in top gear, for the gearbox above
  // and the bundled cars' (a search and a walk must pick the same interval).
  const auto check = [](const Powertrain& p, double r) {
    DriveWalk walk(p, r);
    const double v_top = p.ideal ? 90.0 : rev_limited_speed_mps(p, r);
    std::vector<double> speeds;
    for (int k = 0; k <= 4000; ++k) speeds.push_back(1.05 * v_top * k / 4000.0);
    // Speeds that put the engine exactly on each curve node in each gear, and the rev limit.
    if (!p.ideal)
      for (double g : p.gears)
        for (double w : p.engine_radps) speeds.push_back(w * r / (g * p.final_drive));
    speeds.push_back(v_top);
    std::sort(speeds.begin(), speeds.end());
    int mismatches = 0;
    for (double v : speeds) {
      const Drive a = best_drive(p, r, v), b = walk.at(v);
      mismatches +=
          !(a.force_n == b.force_n && a.gear == b.gear && a.engine_radps == b.engine_radps);
    }
    CHECK(mismatches == 0);
  };
  check(gearbox(), 0.33);
  for (const char* file : {"cars/caldra-gt.yaml", "cars/pellion-fr2.yaml"}) {
    CAPTURE(file);
    const Car car = load_car(test::source_path(file));
    check(car.powertrain, car.tyres.rolling_radius_m);
  }
  Powertrain ideal;
  ideal.ideal = true;
  ideal.constant_power_w = 300e3;
  check(ideal, 0.33);
}

TEST_CASE("an ideal transmission gives F = eta P / v") {
  Powertrain p;
  p.ideal = true;
  p.constant_power_w = 300e3;
  p.efficiency = 0.95;
  CHECK(near(best_drive(p, 0.3, 50.0).force_n, 0.95 * 300e3 / 50.0, 1e-12));
  CHECK(best_drive(p, 0.3, 50.0).gear == 0);
}

TEST_CASE("a powertrain names the first value that breaks a rule (README, \"Car\")") {
  const Powertrain good = test::constant_force_car(600.0, 3000.0, 1.5).powertrain;
  CHECK(test::describe(good.validate()) == "none");
  struct Case {
    void (*spoil)(Powertrain&);
    const char* want;
  };
  const Case cases[] = {
      {[](Powertrain& p) { p.engine_radps[0] = 0.0; },
       "torque_curve.rpm[0]: value 0 is out of range: must be > 0 in SI units"},
      {[](Powertrain& p) { p.torque_nm[1] = -1.0; },
       "torque_curve.torque[1]: value -1 is out of range: must be [0, 1000000] in SI units"},
      {[](Powertrain& p) {
         p.engine_radps = {300.0};
         p.torque_nm = {100.0};
       },
       "torque_curve.rpm: a curve needs at least 2 points"},
      {[](Powertrain& p) { p.torque_nm.push_back(100.0); },
       "torque_curve.torque: size differs from rpm: expected 2, got 3"},
      {[](Powertrain& p) {
         p.engine_radps = {200.0, 100.0};
         p.rev_limit_radps = 100.0;
       },
       "torque_curve.rpm: values must be strictly increasing (item 1: 100 after 200)"},
      {[](Powertrain& p) { p.rev_limit_radps = 0.0; },
       "rev_limit: value 0 is out of range: must be > 0 in SI units"},
      {[](Powertrain& p) { p.rev_limit_radps = p.engine_radps.back() * 1.01; },
       "rev_limit: rev_limit must lie above the curve's first rpm and not beyond its last"},
      {[](Powertrain& p) { p.gears = {-1.0}; },
       "gears[0]: value -1 is out of range: must be (0, 100]"},
      {[](Powertrain& p) { p.gears.clear(); }, "gears: at least one gear is needed"},
      {[](Powertrain& p) {
         p.gears = {2.0, 3.0};
       },
       "gears: values must be strictly decreasing (item 1: 3 after 2)"},
      {[](Powertrain& p) { p.final_drive = 0.0; },
       "final_drive: value 0 is out of range: must be (0, 100]"},
      {[](Powertrain& p) { p.shift_time_s = 3.0; },
       "shift_time: value 3 is out of range: must be [0, 2] in SI units"},
      {[](Powertrain& p) { p.efficiency = 1.5; },
       "efficiency: value 1.5 is out of range: must be (0, 1]"},
      {[](Powertrain& p) {
         p.ideal = true;
         p.constant_power_w = 0.0;
       },
       "constant_power: value 0 is out of range: must be (0, 100000000] in SI units"},
  };
  for (const Case& c : cases) {
    Powertrain p = good;
    c.spoil(p);
    CHECK(test::describe(p.validate()) == c.want);
  }
}

TEST_CASE("SAE J1349 (June 1990): CF = 1.18 (99 kPa / p_dry) sqrt(T / 298 K) - 0.18") {
  // At the reference air the factor is 1 (to rounding).
  CHECK(near(j1349_correction_factor(99e3, 298.0), 1.0, 1e-15));
  // The formula at 80 kPa dry, 30 C, written out: 1.18 x 1.2375 x sqrt(303.15 / 298) - 0.18.
  CHECK(near(j1349_correction_factor(80e3, 303.15),
             1.18 * (99.0 / 80.0) * std::sqrt(303.15 / 298.0) - 0.18, 1e-15));
}

TEST_CASE("a natural engine gives P_ref / CF; fixed gives the curve; turbo holds to its altitude") {
  Powertrain p;
  p.aspiration = Aspiration::fixed;
  CHECK(engine_power_ratio(p, 70e3, 300.0, 0.5) == 1.0);
  p.aspiration = Aspiration::natural;
  // ISO 2533 at 2000 m (REFERENCES: p = 79501 Pa, T = 275.15 K), dry:
  // CF = 1.18 (99000 / 79501) sqrt(275.15 / 298) - 0.18 = 1.2319..., ratio 0.8117...
  const StandardAtmosphere isa = standard_atmosphere(2000.0);
  const double cf =
      1.18 * (99000.0 / isa.pressure_pa) * std::sqrt(isa.temperature_k / 298.0) - 0.18;
  CHECK(near(engine_power_ratio(p, isa.pressure_pa, isa.temperature_k, 0.0), 1.0 / cf, 1e-14));
  // REFERENCES' table pressure at 2000 m, 79501 Pa (from memory), within 0.01 % of ISO 2533's
  // formula; the J1349 ratio there is 0.812 to three figures (computed from the formula).
  CHECK(near(isa.pressure_pa, 79501.0, 1e-4));
  CHECK(near(1.0 / cf, 0.812, 1e-3));
  // Humidity takes the vapour pressure off the dry-air pressure (Magnus, WMO Annex 4.B).
  const double e = 0.6 * saturation_vapour_pressure_pa(303.15);
  CHECK(near(engine_power_ratio(p, 101325.0, 303.15, 0.6),
             1.0 / j1349_correction_factor(101325.0 - e, 303.15), 1e-14));
  // Turbo rated to 1500 m: full power below, the natural law referred to 1500 m above.
  p.aspiration = Aspiration::turbo;
  p.full_power_altitude_m = 1500.0;
  const double p1500 = standard_atmosphere(1500.0).pressure_pa;
  CHECK(engine_power_ratio(p, standard_atmosphere(1000.0).pressure_pa, 281.65, 0.0) == 1.0);
  CHECK(near(engine_power_ratio(p, isa.pressure_pa, isa.temperature_k, 0.0),
             1.0 / (1.18 * p1500 / isa.pressure_pa - 0.18), 1e-14));
  CHECK(engine_power_ratio(p, isa.pressure_pa, isa.temperature_k, 0.0) < 1.0);
}

TEST_CASE("aspiration rules: turbo needs full_power_altitude, which only a turbo takes") {
  Powertrain p;
  p.ideal = true;
  p.constant_power_w = 300e3;
  p.aspiration = Aspiration::turbo;
  CHECK(test::describe(p.validate()).find("aspiration: a turbo engine needs full_power_altitude") ==
        0);
  p.full_power_altitude_m = 7000.0;
  CHECK(test::describe(p.validate()).find("full_power_altitude") == 0);
  p.full_power_altitude_m = 1000.0;
  CHECK(test::describe(p.validate()) == "none");
  p.aspiration = Aspiration::natural;
  CHECK(test::describe(p.validate()).find("full_power_altitude: full_power_altitude applies") == 0);
}
