// The air: ISO 2533:1975 standard atmosphere and moist-air density (REFERENCES.md).
#include <doctest/doctest.h>

#include <string>
#include <tuple>

#include "lapwing/base/named_value.hpp"
#include "lapwing/model/air.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("ISO 2533 sea level: 288.15 K, 101325 Pa, 1.2250 kg/m3") {
  const StandardAtmosphere a = standard_atmosphere(0.0);
  CHECK(a.temperature_k == 288.15);
  CHECK(a.pressure_pa == 101325.0);
  CHECK(near(a.density_kg_m3, 1.2250, 5e-5));
}

TEST_CASE("ISO 2533 densities at 500 to 3000 m match the table to 0.05 % (table from memory)") {
  const double table[][2] = {{500, 1.1673},  {1000, 1.1117}, {1500, 1.0581},
                             {2000, 1.0066}, {2500, 0.9569}, {3000, 0.9093}};
  for (const auto& row : table) {
    CAPTURE(row[0]);
    CHECK(near(standard_atmosphere(row[0]).density_kg_m3, row[1], 5e-4));
  }
  // Pressure table values (from memory): 1000 m 89876 Pa, 2000 m 79501 Pa.
  CHECK(near(standard_atmosphere(1000).pressure_pa, 89876.0, 5e-4));
  CHECK(near(standard_atmosphere(2000).pressure_pa, 79501.0, 5e-4));
}

TEST_CASE("moist air at 20 C, 101325 Pa, 50 % RH is 1.1989 kg/m3 (REFERENCES check value; 0.1 %)") {
  CHECK(near(moist_air_density(101325.0, 293.15, 0.5), 1.1989, 1e-3));
  // Saturation vapour pressure over water at 20 C: 2339 Pa (CRC Handbook table, from memory);
  // the Magnus form agrees within 0.3 %.
  CHECK(near(saturation_vapour_pressure_pa(293.15), 2339.0, 3e-3));
}

TEST_CASE("given values replace the standard ones; none given is the standard atmosphere") {
  const Air standard = make_air(AirSpec{320.0, {}, {}, 0.0});
  CHECK(standard.standard);
  CHECK(standard.density_kg_m3 == standard_atmosphere(320.0).density_kg_m3);
  const Air hot = make_air(AirSpec{320.0, 308.15, {}, 0.0});
  CHECK_FALSE(hot.standard);
  CHECK(hot.pressure_pa == standard_atmosphere(320.0).pressure_pa);
  CHECK(hot.density_kg_m3 < standard.density_kg_m3);
}

TEST_CASE("air outside the troposphere's circuits is refused by name (README, \"Track\")") {
  CHECK(test::describe(AirSpec{}.validate()) == "none");
  AirSpec a;
  a.altitude_m = 7000.0;
  CHECK(test::describe(a.validate()) ==
        "altitude: value 7000 is out of range: must be [-500, 6000] in SI units");
  a.altitude_m = 0.0;
  a.temperature_k = 200.0;
  CHECK(test::describe(a.validate()) ==
        "ambient.temperature: value -73.15 is out of range: must be [-50, 70] C");  // 200 K
  a.temperature_k.reset();
  a.relative_humidity = 1.5;
  CHECK(test::describe(a.validate()) ==
        "ambient.humidity: value 1.5 is out of range: must be [0, 1]");
  // make_air takes no air it cannot stand for.
  try {
    make_air(a);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(std::string(e.what()) ==
          "air: error: value 1.5 is out of range: must be [0, 1] (ambient.humidity)");
  }
}

TEST_CASE("the documented ends of the air's ranges are inside in every unit (README, \"Track\")") {
  // README, "Track" gives the temperature range as [-50, 70] C; -58 F and 158 F are the same ends
  // (F = C x 9/5 + 32, the definition), 223.15 K and 343.15 K too (K = C + 273.15, SI
  // brochure). Each is read as a user gives it (the option's parser) and must be in range; a
  // hair beyond each is still refused.
  const char* ends[] = {"-50 C", "70 C", "-58 F", "158 F", "223.15 K", "343.15 K"};
  for (const char* text : ends) {
    CAPTURE(text);
    std::string error;
    const auto k = parse_named_value(text, "--temperature", Quantity::temperature,
                                     AirSpec::temperature_range, error);
    CHECK(error.empty());
    REQUIRE(k);
    AirSpec a;
    a.temperature_k = *k;
    CHECK(test::describe(a.validate()) == "none");
  }
  for (const char* text : {"-50.001 C", "70.001 C", "-58.01 F", "158.01 F"}) {
    CAPTURE(text);
    std::string error;
    CHECK_FALSE(parse_named_value(text, "--temperature", Quantity::temperature,
                                  AirSpec::temperature_range, error));
    CHECK(error.find("is out of range ([-50, 70] C)") != std::string::npos);
  }
  // The other air ranges' ends in their other units: 300 and 1100 hPa (1 hPa = 100 Pa, SI
  // brochure), 100 % humidity; all exact in binary, checked so that a change of unit table
  // cannot move them out.
  for (const auto& [text, q, r] :
       {std::tuple{"300 hPa", Quantity::pressure, AirSpec::pressure_range},
        std::tuple{"1100 hPa", Quantity::pressure, AirSpec::pressure_range},
        std::tuple{"100 %", Quantity::fraction, AirSpec::humidity_range}}) {
    const std::string given = text;  // a copy: clang 14's lambdas (CAPTURE) take no binding
    CAPTURE(given);
    std::string error;
    CHECK(parse_named_value(text, "x", q, r, error));
  }
}

TEST_CASE("air whose water vapour would exceed its pressure is refused (Magnus, WMO Guide 4.B)") {
  // e_s(70 C) = 611.2 exp(17.62 x 70 / (243.12 + 70)) = 31,398 Pa (worked by hand from the
  // Magnus form the project uses): at 100 % humidity the air's pressure must exceed it.
  AirSpec a;
  a.temperature_k = 343.15;
  a.relative_humidity = 1.0;
  a.pressure_pa = 31300.0;
  CHECK(test::describe(a.validate()) ==
        "ambient.humidity: the water vapour at 100 % humidity and 70.0 C (314 hPa) is not below "
        "the air's pressure (313 hPa): no such air");
  a.pressure_pa = 31500.0;
  CHECK(test::describe(a.validate()) == "none");
  CHECK(make_air(a).density_kg_m3 > 0.0);
  // Half the humidity halves the vapour: 157 hPa under the same 313 hPa is air.
  a.pressure_pa = 31300.0;
  a.relative_humidity = 0.5;
  CHECK(test::describe(a.validate()) == "none");
  // The pressure from the standard atmosphere where none is given: 6000 m (472 hPa) at 70 C
  // and 100 % is still air; the rule reads the same pressure make_air uses.
  a.pressure_pa.reset();
  a.altitude_m = 6000.0;
  a.relative_humidity = 1.0;
  CHECK(test::describe(a.validate()) == "none");
}
