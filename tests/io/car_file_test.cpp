// Car files: the bundled ones load; values come out in SI.
#include <doctest/doctest.h>

#include <fstream>
#include <iterator>
#include <optional>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/document.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("the bundled formula car loads in SI units") {
  const Car c = load_car(test::source_path("cars/pellion-fr2.yaml"));
  CHECK(c.mass_kg == 640.0);
  CHECK(c.config_names() == std::vector<std::string>{"low", "medium", "high", "medium_table",
                                                     "high_tunnel", "high_map", "high_trim",
                                                     "flap7", "flap17", "flap22", "front_flap"});
  CHECK(c.configs[3].form == AeroConfig::Form::speed_table);
  CHECK(c.configs[4].form == AeroConfig::Form::forces);
  CHECK(c.configs[5].form == AeroConfig::Form::ride_height_map);
  CHECK(c.configs[6].trim.has_value());
  CHECK(c.configured(6).car().mass_kg == 642.0);  // the trim actuator's mass, an override
  CHECK(near(c.powertrain.rev_limit_radps, 12200 * units::rpm, 1e-15));
  CHECK(c.powertrain.gears.size() == 7);
  CHECK(c.configs[2].cla_m2.front() == 4.3);
  // balance_window: {front_share: [33.5 %, 57.5 %], above: 150 km/h}, in SI (150 / 3.6 m/s).
  REQUIRE(c.balance_window.has_value());
  CHECK(near(c.balance_window->front_share_min, 0.335, 1e-15));
  CHECK(near(c.balance_window->front_share_max, 0.575, 1e-15));
  CHECK(near(c.balance_window->above_mps, 150.0 / 3.6, 1e-14));
  CHECK(c.configured(2).car().balance_window.has_value());  // every config is held to it
}

TEST_CASE("a power curve becomes torque = power / engine speed") {
  const Car c = load_car(test::source_path("cars/caldra-gt.yaml"));
  CHECK(near(c.powertrain.torque_nm[3], 460e3 / (7500 * units::rpm), 1e-12));
}

namespace {
// The input error a car file gives.
InputError file_error(const std::string& relative) {
  try {
    read_car_file(test::source_path(relative));
  } catch (const InputError& e) {
    return e;
  }
  FAIL("no error");
  return InputError("", Mark{}, "");
}
}  // namespace

TEST_CASE("a file's value that breaks a rule is the library's violation, placed in the file") {
  // The same rule on the same car built in code: the same words and key path, without the place.
  const InputError from_file = file_error("tests/data/bad/car-cg-above-wheelbase.yaml");
  CHECK(from_file.mark().line == 6);
  CHECK(from_file.mark().col == 12);
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  car.cg_height_m = 3.1;
  const std::optional<Violation> v = car.validate();
  REQUIRE(v);
  CHECK(v->message() == from_file.message());
  CHECK(v->field == from_file.key_path());
  // A range: the same rule and key path; the file shows the value as written ("-640 kg"), the
  // library its SI value.
  const InputError mass = file_error("tests/data/bad/car-negative-mass.yaml");
  car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  car.mass_kg = -640.0;
  CHECK(mass.message() == "value -640 kg is out of range: must be [1, 100000] in SI units");
  CHECK(car.validate()->message() == "value -640 is out of range: must be [1, 100000] in SI units");
  CHECK(car.validate()->field == mass.key_path());
}

TEST_CASE("a power curve's rule on torque is reported at its power, as written") {
  std::ifstream in(test::source_path("cars/caldra-gt.yaml"));
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  const std::size_t at = text.find("power: [");
  REQUIRE(at != std::string::npos);
  // The curve's second power made negative.
  const std::size_t first = text.find(',', at);
  text.insert(first + 2, "-");
  const std::string path = "car_file_test_power.yaml";
  std::ofstream(path) << text;
  try {
    read_car_file(path);
    FAIL("expected an InputError");
  } catch (const InputError& e) {
    CHECK(e.key_path() == "powertrain.power_curve.power[1]");
    CHECK(e.message().rfind("value -", 0) == 0);
    CHECK(e.message().find(" is out of range: must be [0, 1000000] in SI units") !=
          std::string::npos);
  }
  std::remove(path.c_str());
}

TEST_CASE("a car file without issue 12's keys: axle model, no lateral transfer, engine fixed") {
  // README, "Physics and assumptions": the keys' defaults keep a file's meaning (but the model).
  const Car car = load_car(test::source_path("tests/data/no-aero-car.yaml"));
  CHECK(car.model == VehicleModel::axle);
  CHECK_FALSE(car.roll.has_value());
  CHECK(car.powertrain.aspiration == Aspiration::fixed);
  CHECK_FALSE(car.powertrain.full_power_altitude_m.has_value());
}

TEST_CASE("the bundled cars declare their roll geometry and aspiration") {
  const Car formula = load_car(test::source_path("cars/pellion-fr2.yaml"));
  REQUIRE(formula.roll.has_value());
  CHECK(formula.roll->track_front_m == doctest::Approx(1.60));
  CHECK(formula.roll->roll_stiffness_front == doctest::Approx(0.55));
  CHECK(formula.roll->roll_centre_rear_m == doctest::Approx(0.06));
  CHECK(formula.powertrain.aspiration == Aspiration::natural);
  const Car gt = load_car(test::source_path("cars/caldra-gt.yaml"));
  CHECK(gt.powertrain.aspiration == Aspiration::turbo);
  CHECK(gt.powertrain.full_power_altitude_m.value_or(0) == doctest::Approx(1500.0));
}

namespace {
// The bundled formula car with `key` set to `text`, read as a car file.
std::string set_error(const std::string& key, const std::string& text) {
  Document doc = load_document(test::source_path("cars/pellion-fr2.yaml"));
  try {
    set_car_value(doc, car_key_path(doc, key), text);
    read_car_document(doc);
  } catch (const InputError& e) {
    return e.message() + " (" + e.key_path() + ")";
  }
  return "no error";
}
}  // namespace

TEST_CASE("a value set in the car's document is read like the file's own, units and rules") {
  Document doc = load_document(test::source_path("cars/pellion-fr2.yaml"));
  set_car_value(doc, "mass", "1000 lb");
  set_car_value(doc, "tyres.rolling_resistance", "0.02");  // in the file
  set_car_value(doc, "powertrain.gears[6]", "1.01");
  set_car_value(doc, "aero.configs.medium.cla", "3.9 m2");
  set_car_value(doc, car_key_path(doc, "front_flap"), "12 deg");
  const Car c = read_car_document(doc).car;
  CHECK(near(c.mass_kg, 453.59237, 1e-12));  // 1 lb = 0.45359237 kg (exact by definition)
  CHECK(c.tyres.rolling_resistance == 0.02);
  CHECK(c.powertrain.gears[6] == 1.01);
  CHECK(c.configs[1].cla_m2.front() == 3.9);
  CHECK(car_key_path(doc, "front_flap") == "aero.families.front_flap.at");
  // Unset keys the schema knows are added: the default inertia factor of a car without one.
  set_car_value(doc, "tyres.load_sensitivity", "0.1");
  CHECK(read_car_document(doc).car.tyres.load_sensitivity == 0.1);
  // A ride-height map's cell: an item of a list of lists, one index after the other (the
  // first index was dropped: cla[1][2] set cla[2], a list, and refused).
  set_car_value(doc, "aero.configs.high_map.ride_height_map.cla[1][2]", "4.75");
  const Car m = read_car_document(doc).car;
  const AeroConfig& high_map = m.configs[5];
  REQUIRE(high_map.name == "high_map");
  REQUIRE(high_map.map);
  CHECK(high_map.map->cla_m2(1, 2) == 4.75);
  CHECK(high_map.map->cla_m2(2, 1) == 4.3);  // the file's (the other indices' cell) unchanged
}

TEST_CASE("a bad key or value set in the car's document is the car file's error") {
  CHECK(set_error("tyres.mu_latt", "1.6") ==
        "unknown key 'mu_latt'; did you mean 'mu_lat'? (tyres.mu_latt)");
  CHECK(set_error("tyre.mu_lat", "1.6").find("no key 'tyre'; did you mean 'tyres'?") == 0);
  CHECK(set_error("aero.configs.medum.cla", "3").find("did you mean 'medium'?") !=
        std::string::npos);
  CHECK(set_error("mass", "-600 kg").find("(mass)") != std::string::npos);
  CHECK(set_error("mass", "600 m").find("(mass)") != std::string::npos);
  CHECK(set_error("tyres", "1").find("is a map") != std::string::npos);
  CHECK(set_error("powertrain.gears[9]", "1").find("has no item 9 (it has 7)") !=
        std::string::npos);
  // A list of lists: each index names its list; an index past a value is no item of it.
  const std::string cell = "aero.configs.high_map.ride_height_map.cla";
  CHECK(set_error(cell + "[1]", "3").find("'" + cell + "[1]' is a list; set one of its items") ==
        0);
  CHECK(set_error(cell + "[1][9]", "3").find("'" + cell + "[1]' has no item 9 (it has 4)") == 0);
  CHECK(set_error(cell + "[1][2][0]", "3")
            .find("'" + cell + "[1][2]' has no item 0 (it is not a list)") == 0);
  CHECK(set_error("powertrain.gears[1][0]", "1")
            .find("'powertrain.gears[1]' has no item 0 (it is not a list)") == 0);
  CHECK(set_error(cell + "[1]x", "3").find("is not a key or key[INDEX]") != std::string::npos);
  // An index past what a 64-bit size holds does not wrap round to a small one (2^64 + 1 was
  // item 1): it is no item, named as typed.
  CHECK(set_error("powertrain.gears[18446744073709551617]", "1")
            .find("has no item 18446744073709551617 (it has 7)") != std::string::npos);
  CHECK(set_error("powertrain.gears[99999999999999999999]", "1")
            .find("has no item 99999999999999999999 (it has 7)") != std::string::npos);
  CHECK(set_error("front_flap", "30 deg").find("(aero.families.front_flap.at)") !=
        std::string::npos);
  // Its range in degrees, the family's settings as the file gives them (7 to 22 deg), where it
  // read "[0.12217304764, 0.383972435439] in SI units" beside the 30 deg typed.
  CHECK(
      set_error("front_flap", "30 deg").find("value 30 deg is out of range: must be [7, 22] deg") !=
      std::string::npos);
}
