// Engine and gearbox against the relations in REFERENCES.md ("Engine": power = torque x angular
// speed; rpm = v / r_wheel x gear x final x 60 / (2 pi)).
#include <doctest/doctest.h>

#include "lapwing/base/units.hpp"
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
       "torque_curve.torque[1]: value -1 is out of range: must be >= 0 in SI units"},
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
      {[](Powertrain& p) { p.gears = {-1.0}; }, "gears[0]: value -1 is out of range: must be > 0"},
      {[](Powertrain& p) { p.gears.clear(); }, "gears: at least one gear is needed"},
      {[](Powertrain& p) {
         p.gears = {2.0, 3.0};
       },
       "gears: values must be strictly decreasing (item 1: 3 after 2)"},
      {[](Powertrain& p) { p.final_drive = 0.0; },
       "final_drive: value 0 is out of range: must be > 0"},
      {[](Powertrain& p) { p.shift_time_s = 3.0; },
       "shift_time: value 3 is out of range: must be [0, 2] in SI units"},
      {[](Powertrain& p) { p.efficiency = 1.5; },
       "efficiency: value 1.5 is out of range: must be (0, 1]"},
      {[](Powertrain& p) {
         p.ideal = true;
         p.constant_power_w = 0.0;
       },
       "constant_power: value 0 is out of range: must be > 0 in SI units"},
  };
  for (const Case& c : cases) {
    Powertrain p = good;
    c.spoil(p);
    CHECK(test::describe(p.validate()) == c.want);
  }
}
