// check's text and JSON render one CheckSummary: the same figures, "-" in the text where the JSON
// has null, and a failed lap in the caller's words.
#include <doctest/doctest.h>

#include "lapwing/report/check_report.hpp"
#include "test_support.hpp"

using namespace lapwing;

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
