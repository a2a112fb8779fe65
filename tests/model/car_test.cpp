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
  const Car k = c.configured(1);
  CHECK(k.mass_kg == 652.0);
  CHECK(k.drag_height_m == 0.5);
  CHECK(k.configs.size() == 1);
  CHECK(c.configured(0).mass_kg == 640.0);
}
