// Car: a config's overrides replace the car-level values.
#include <doctest/doctest.h>

#include "lapwing/io/car_file.hpp"
#include "lapwing/model/car.hpp"
#include "test_support.hpp"

using namespace lapwing;

TEST_CASE("a config's overrides replace the car-level values") {
  Car c = load_car(test::source_path("cars/pellion-fr2.yaml"));
  c.configs[1].mass_kg = 652.0;
  c.configs[1].drag_height_m = 0.5;
  const Car k = c.configured(1).car();
  CHECK(k.mass_kg == 652.0);
  CHECK(k.drag_height_m == 0.5);
  CHECK(k.configs.size() == 1);
  CHECK(c.configured(0).car().mass_kg == 640.0);
}

TEST_CASE("the bundled cars break no rule") {
  for (const char* file : {"cars/pellion-fr2.yaml", "cars/caldra-gt.yaml"}) {
    const Car c = load_car(test::source_path(file));
    CHECK(test::describe(c.validate()) == "none");
    for (std::size_t i = 0; i < c.configs.size(); ++i)
      CHECK(test::describe(c.configured(i).car().validate()) == "none");
  }
}

TEST_CASE("a car names its first bad value by its key path in a car file") {
  const Car good = test::plain_car();
  CHECK(test::describe(good.validate()) == "none");
  struct Case {
    void (*spoil)(Car&);
    const char* want;
  };
  const Case cases[] = {
      {[](Car& c) { c.mass_kg = -5.0; },
       "mass: value -5 is out of range: must be [1, 100000] in SI units"},
      // A subnormal mass (a robustness campaign's: a trade's non-finite output) is below 1 kg.
      {[](Car& c) { c.mass_kg = 5e-324; },
       "mass: value 4.94065645841e-324 is out of range: must be [1, 100000] in SI units"},
      {[](Car& c) { c.inertia_factor = 1.0; },
       "inertia_factor: value 1 is out of range: must be [0, 1)"},
      {[](Car& c) { c.wheelbase_m = 0.2; },
       "wheelbase: value 0.2 is out of range: must be [0.5, 10] in SI units"},
      {[](Car& c) { c.cg_height_m = 3.0; }, "cg_height: cg_height must be below the wheelbase"},
      {[](Car& c) { c.front_weight = 1.0; },
       "front_weight: value 1 is out of range: must be (0, 1)"},
      {[](Car& c) { c.tyres.mu_lat = 3.5; },
       "tyres.mu_lat: value 3.5 is out of range: must be (0, 3]"},
      {[](Car& c) { c.powertrain.efficiency = 0.0; },
       "powertrain.efficiency: value 0 is out of range: must be (0, 1]"},
      {[](Car& c) { c.brake_front_bias = 0.0; },
       "brakes.front_bias: value 0 is out of range: must be (0, 1)"},
      {[](Car& c) { c.drag_height_m = -0.1; },
       "aero.drag_height: value -0.1 is out of range: must be [0, 3] in SI units"},
      {[](Car& c) { c.configs.front().name = "high downforce"; },
       "aero.configs.high downforce: config name 'high downforce' must use letters, digits, '_' "
       "or '-' only"},
      {[](Car& c) { c.configs.push_back(c.configs.front()); },
       "aero.configs.none: config name 'none' is given twice"},
      {[](Car& c) { c.configs.front().balance = {1.5}; },
       "aero.configs.none.balance: value 1.5 is out of range: must be [0, 1]"},
      {[](Car& c) { c.configs.front().mass_kg = 0.0; },
       "aero.configs.none.mass: value 0 is out of range: must be [1, 100000] in SI units"},
      {[](Car& c) { c.configs.front().cg_height_m = 2.8; },
       "aero.configs.none.cg_height: cg_height must be below the wheelbase"},
      {[](Car& c) { c.configs.clear(); }, "aero.configs: at least one aero config is needed"},
  };
  for (const Case& c : cases) {
    Car car = good;
    c.spoil(car);
    CHECK(test::describe(car.validate()) == c.want);
  }
}

TEST_CASE("a car built in code is named by its name; a loaded one by its file") {
  Car c = test::plain_car();
  c.file.clear();
  CHECK(c.subject() == "car 'test car'");
  c.file = "cars/x.yaml";
  CHECK(c.subject() == "cars/x.yaml");
}

TEST_CASE("a balance window checks itself: shares in [0, 1], the max above the min, a speed") {
  // Issue 17's key, balance_window {front_share: [min, max], above: speed}.
  Car car = test::plain_car();
  car.balance_window = BalanceWindow{0.38, 0.46, 150.0 / 3.6};
  CHECK(test::describe(car.validate()) == "none");
  car.balance_window = BalanceWindow{0.46, 0.38, 150.0 / 3.6};
  CHECK(test::describe(car.validate()) ==
        "balance_window.front_share: the window's max (38.0 %) must lie above its min (46.0 %)");
  car.balance_window = BalanceWindow{0.38, 1.46, 150.0 / 3.6};
  CHECK(test::describe(car.validate()) ==
        "balance_window.front_share[1]: value 1.46 is out of range: must be [0, 1]");
  car.balance_window = BalanceWindow{0.38, 0.46, -1.0};
  CHECK(test::describe(car.validate()).rfind("balance_window.above: value -1 is out of range", 0) ==
        0);
}

TEST_CASE("a cg so high that braking within grip lifts the rear axle is refused at its key") {
  // Moments about the front contact patch without aero: the rear axle's load is
  // W (1 - f) - m a h / L, 0 at a deceleration a = g (1 - f) L / h (Gillespie, Fundamentals of
  // Vehicle Dynamics, ch. 2: a = g b / h, b the cg's distance behind the front axle). The tyres
  // brake up to about mu_long g, so mu_long h >= (1 - f) L lifts the rear within grip. The
  // Pellion (f 0.43, L 2.90 m, mu_long 1.55): h < 1.653 / 1.55 = 1.066 m.
  Car c = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const double limit = (1.0 - c.front_weight) * c.wheelbase_m / c.tyres.mu_long;
  CHECK(limit == doctest::Approx(1.0665).epsilon(1e-3));  // the figure above
  c.cg_height_m = 0.99 * limit;
  CHECK(test::describe(c.validate()) == "none");
  c.cg_height_m = 1.01 * limit;
  const std::string why = test::describe(c.validate());
  CHECK(why.rfind("cg_height: cg_height must be below (1 - front_weight) wheelbase / mu_long", 0) ==
        0);
  // A config's own cg_height is checked against the same bound, at its key.
  c.cg_height_m = 0.29;
  REQUIRE(test::describe(c.validate()) == "none");
  c.configs[0].cg_height_m = 1.01 * limit;
  CHECK(test::describe(c.validate()).find("aero.configs." + c.configs[0].name + ".cg_height") !=
        std::string::npos);
}
