// Unit conversions at the boundary. Factors exact by definition (NIST SP 811, appendix B), hp
// to the micro-watt as README, "Input formats" gives it (550 ft lbf/s = 745.69987158 W), PS =
// 75 x 9.80665 W (DIN 66036; from memory).
#include <doctest/doctest.h>

#include "lapwing/base/units.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
double si(const char* text, Quantity q) {
  std::string err;
  auto v = parse_quantity(text, q, err);
  REQUIRE_MESSAGE(v.has_value(), err);
  return *v;
}
std::string error_of(const char* text, Quantity q) {
  std::string err;
  auto v = parse_quantity(text, q, err);
  CHECK_FALSE(v.has_value());
  return err;
}
}  // namespace

TEST_CASE("speeds: km/h, kph and mph to m/s (1 mi = 1609.344 m exactly)") {
  CHECK(near(si("310 km/h", Quantity::speed), 310 / 3.6, 1e-15));
  CHECK(near(si("36kph", Quantity::speed), 10.0, 1e-15));
  CHECK(near(si("60 mph", Quantity::speed), 60 * 1609.344 / 3600, 1e-15));
  CHECK(si("12.5", Quantity::speed) == 12.5);
}

TEST_CASE("power, mass, force, torque, length, area") {
  CHECK(si("450 kW", Quantity::power) == 450e3);
  CHECK(near(si("100 hp", Quantity::power), 74569.9872, 1e-15));
  CHECK(near(si("100 PS", Quantity::power), 73549.875, 1e-15));
  CHECK(near(si("1 lb", Quantity::mass), 0.45359237, 1e-15));
  CHECK(near(si("1 lbf", Quantity::force), 4.4482216152605, 1e-13));
  CHECK(near(si("100 lbf ft", Quantity::torque), 135.5817948331, 1e-12));
  CHECK(si("390 Nm", Quantity::torque) == 390.0);
  CHECK(near(si("12 in", Quantity::length), 0.3048, 1e-15));
  CHECK(near(si("2.5 km", Quantity::length), 2500.0, 1e-15));
  CHECK(near(si("10 ft2", Quantity::area), 0.9290304, 1e-15));
}

TEST_CASE("angles default to degrees; temperatures to Celsius; fractions take %") {
  CHECK(near(si("90", Quantity::angle), units::pi / 2, 1e-15));
  CHECK(near(si("1 rad", Quantity::angle), 1.0, 1e-15));
  CHECK(near(si("24 C", Quantity::temperature), 297.15, 1e-15));
  CHECK(near(si("32 F", Quantity::temperature), 273.15, 1e-14));
  CHECK(near(si("212 F", Quantity::temperature), 373.15, 1e-14));
  CHECK(si("300 K", Quantity::temperature) == 300.0);
  CHECK(near(si("40 %", Quantity::fraction), 0.4, 1e-15));
  CHECK(si("0.43", Quantity::fraction) == 0.43);
  CHECK(near(si("1013.25 hPa", Quantity::pressure), 101325.0, 1e-15));
  CHECK(near(si("12200 rpm", Quantity::engine_speed), 12200 * 2 * units::pi / 60, 1e-15));
  CHECK(near(si("40 N/mm", Quantity::stiffness), 40000.0, 1e-15));
  CHECK(near(si("40 ms", Quantity::time), 0.04, 1e-15));
}

TEST_CASE("bad quantities say what is wrong") {
  CHECK(error_of("310 kmh", Quantity::speed).find("unknown speed unit 'kmh'") != std::string::npos);
  CHECK(error_of("fast", Quantity::speed).find("is not a speed") != std::string::npos);
  CHECK(error_of("nan", Quantity::length).find("finite") != std::string::npos);
  CHECK(error_of("inf m", Quantity::length).find("finite") != std::string::npos);
  CHECK(error_of("2 m", Quantity::number).find("plain number") != std::string::npos);
  CHECK_FALSE(parse_number("1e400").has_value());
  CHECK_FALSE(parse_number("3 apples").has_value());
}
