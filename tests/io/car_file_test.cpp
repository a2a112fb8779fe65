// Car files: the bundled ones load; values come out in SI.
#include <doctest/doctest.h>

#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("the bundled formula car loads in SI units") {
  const Car c = load_car(test::source_path("cars/pellion-fr2.yaml"));
  CHECK(c.mass_kg == 640.0);
  CHECK(c.config_names() == std::vector<std::string>{"low", "medium", "high", "medium_table",
                                                     "high_tunnel", "high_map", "high_trim"});
  CHECK(c.configs[3].form == AeroConfig::Form::speed_table);
  CHECK(c.configs[4].form == AeroConfig::Form::forces);
  CHECK(c.configs[5].form == AeroConfig::Form::ride_height_map);
  CHECK(c.configs[6].trim.has_value());
  CHECK(c.configured(6).mass_kg == 642.0);  // the trim actuator's mass, an override
  CHECK(near(c.powertrain.rev_limit_radps, 12200 * units::rpm, 1e-15));
  CHECK(c.powertrain.gears.size() == 7);
  CHECK(c.configs[2].cla_m2.front() == 4.3);
  // balance_window: {front_share: [33.5 %, 57.5 %], above: 150 km/h}, in SI (150 / 3.6 m/s).
  REQUIRE(c.balance_window.has_value());
  CHECK(near(c.balance_window->front_share_min, 0.335, 1e-15));
  CHECK(near(c.balance_window->front_share_max, 0.575, 1e-15));
  CHECK(near(c.balance_window->above_mps, 150.0 / 3.6, 1e-14));
  CHECK(c.configured(2).balance_window.has_value());  // every config is held to it
}

TEST_CASE("a power curve becomes torque = power / engine speed") {
  const Car c = load_car(test::source_path("cars/caldra-gt.yaml"));
  CHECK(near(c.powertrain.torque_nm[3], 460e3 / (7500 * units::rpm), 1e-12));
}
