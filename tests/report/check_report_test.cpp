// check's text and JSON render one CheckSummary: the same figures, "-" in the text where the JSON
// has null, and a failed lap in the caller's words.
#include <doctest/doctest.h>

#include "lapwing/base/units.hpp"
#include "lapwing/report/check_report.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("check's text and JSON show one summary: undefined shares are '-' and null") {
  Car car = test::plain_car();
  car.configs.front().cda_m2 = {0.8};  // drag, no downforce
  car.drag_height_m = 0.5;
  const Air air = make_air(AirSpec{});
  const CheckSummary s = check_summary(car, {}, air);
  const std::string text = check_text(car, {}, s);
  const std::string json = check_json(car, {}, s);
  CHECK(text.find("aero figures in air of 1.2250 kg/m3 (ISO 2533 at 0 m)") != std::string::npos);
  CHECK(text.find("note: no downforce: the front share of the aero load is undefined") !=
        std::string::npos);
  CHECK(json.find("\"front_share\": null") != std::string::npos);
  CHECK(json.find("\"front_share_with_drag_moment\": null") != std::string::npos);
  CHECK(json.find("no downforce: the front share") != std::string::npos);
  // The drag at 100 km/h, q CdA = 0.5 x 1.225 x (100 / 3.6)^2 x 0.8 = 378 N, in both.
  CHECK(text.find(" 378 ") != std::string::npos);
  CHECK(json.find("\"drag_n\": 378.") != std::string::npos);
}

TEST_CASE("a lap that finds bad input is a note in the caller's words") {
  Track t = test::straight_track(50.0, 0.5, 60.0);
  t.segments = {test::arc(15.0, 1.5, true), test::straight(50.0)};  // 60 m/s into a 15 m arc
  const Air air = make_air(AirSpec{});
  const std::vector<Circuit> circuits{lay_out(t, air)};
  const Car car = test::plain_car();
  const CheckSummary s = check_summary(car, circuits, air);
  REQUIRE(s.tracks.front().failures.size() == 1);
  const std::string plain = check_text(car, circuits, s);
  CHECK(plain.find("note: config none cannot lap the track: start_speed 216.0 km/h is more than "
                   "the car can hold") != std::string::npos);
  const std::string placed = check_text(
      car, circuits, s, [](const InvalidInput& e) { return "at its place: " + e.message(); });
  CHECK(placed.find("cannot lap the track: at its place: start_speed 216.0 km/h") !=
        std::string::npos);
}

TEST_CASE("a tyre force peak beyond the level top speed is not said to be reached on a straight") {
  // The peak load Fn (1 + s) / (2 s) = 4500 N a tyre (check_summary_test's closed form) needs
  // q ClA = 4 x 4500 - m g on the point mass's four tyres: v = 48.9 m/s (176 km/h) for 640 kg and
  // ClA 8 m2 in ISO sea-level air. With 400 kW and CdA 1 m2 the level top speed is
  // (2 P / rho CdA)^(1/3) = 86.8 m/s: the peak is reached on a level straight. With 50 kW it is
  // 43.4 m/s (156 km/h): the peak lies beyond it, and the text must not say a straight reaches it.
  auto text_for = [](double power_w) {
    Car car = test::plain_car(640.0, 1.5, power_w);
    car.configs.front().cda_m2 = {1.0};
    car.configs.front().cla_m2 = {8.0};
    car.tyres.nominal_load_n = 1500.0;
    car.tyres.load_sensitivity = 0.2;
    const Air air = make_air(AirSpec{});
    const CheckSummary s = check_summary(car, {}, air);
    REQUIRE(s.configs.front().tyre_peak_speed_mps);
    CHECK(near(*s.configs.front().tyre_peak_speed_mps, 48.9, 0.0, 0.05));
    return check_text(car, {}, s);
  };
  const std::string fast = text_for(400e3), slow = text_for(50e3);
  CHECK(fast.find("4500 N a tyre, reached at 176.") != std::string::npos);
  CHECK(slow.find("reached at") == std::string::npos);
  CHECK(slow.find("4500 N a tyre, a level road would reach it at 176.") != std::string::npos);
  CHECK(slow.find("above this config's level top speed (156.") != std::string::npos);
}

TEST_CASE("the head wind on the longest straight: none where the track has no straight") {
  // A wind of 10 m/s from +x (bearing 90 deg). On a 500 m straight along +x it is a head wind
  // of 10 m/s (the component against the heading, closed form); a circle has no two points
  // with |curvature| under 1/800 m: no straight, `null` in JSON, "no straight" in the text
  // (it read "0.0 m/s on the longest straight (0 to 0 m)" and 0).
  const Air air = make_air(AirSpec{});
  const Car car = test::plain_car();
  Track straight = test::straight_track(500.0, 0.5, 20.0);
  Track ring = test::circle_track(50.0, 0.5);
  for (Track* t : {&straight, &ring}) t->wind = Wind{10.0, 90.0 * units::deg};
  const std::vector<Circuit> circuits{lay_out(straight, air), lay_out(ring, air)};
  const CheckSummary s = check_summary(car, circuits, air);
  REQUIRE(s.tracks[0].head_wind_longest_straight_mps);
  CHECK(near(*s.tracks[0].head_wind_longest_straight_mps, 10.0, 1e-12));
  CHECK_FALSE(s.tracks[1].head_wind_longest_straight_mps);
  const std::string text = check_text(car, circuits, s), json = check_json(car, circuits, s);
  CHECK(text.find("head wind 10.0 m/s on the longest straight (0 to 500 m)") != std::string::npos);
  CHECK(text.find("wind 10.0 m/s from 90 deg: no straight") != std::string::npos);
  CHECK(json.find("\"head_wind_longest_straight_mps\": null") != std::string::npos);
  CHECK(json.find("\"head_wind_longest_straight_mps\": 10") != std::string::npos);
}
