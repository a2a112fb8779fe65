// Logged laps into curvature: a steady circle gives a_y / v^2 = 1/R and a closed lap that
// closes; a log that cannot be read is a typed error naming its row.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/log_curvature.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
// One lap of a circle of radius R at speed v, logged every 0.2 m: a_y = v^2 / R (steady
// cornering, closed form).
LogChannels circle_log(double radius, double speed) {
  LogChannels log;
  log.source = "circle.csv";
  const double length = 2 * units::pi * radius;
  const int rows = static_cast<int>(std::lround(length / 0.2));
  for (int i = 0; i <= rows; ++i) {
    log.distance_m.push_back(length * i / rows);
    log.speed_mps.push_back(speed);
    log.lat_accel_mps2.push_back(speed * speed / radius);
  }
  return log;
}
}  // namespace

TEST_CASE("a steady circle logs curvature 1/R, a peak of v^2 / (R g0), and a lap that closes") {
  const double radius = 80.0, speed = 25.0;
  LogCurvatureOptions o;
  o.closed = true;
  const LogCurvature c = log_curvature(circle_log(radius, speed), o);
  // A constant survives the filter and the resampling exactly, and one whole turn needs no
  // spreading: 1e-9 relative (round-off of the integration).
  for (double k : c.curvature_1pm) CHECK(near(k, 1.0 / radius, 1e-9));
  CHECK(near(c.length_m, 2 * units::pi * radius, 1e-12));
  CHECK(near(c.peak_lateral_g, speed * speed / radius / units::g0, 1e-9));
  CHECK(near(c.turns, 1.0, 1e-9));
  CHECK(std::abs(c.closure_heading_deg) < 1e-6);
  CHECK(c.closure_gap_m < 1e-6);
  // The yaw rate v / R says the same.
  LogChannels yaw = circle_log(radius, speed);
  yaw.yaw_rate_radps.assign(yaw.speed_mps.size(), speed / radius);
  yaw.lat_accel_mps2.clear();
  for (double k : log_curvature(yaw, o).curvature_1pm) CHECK(near(k, 1.0 / radius, 1e-9));
}

TEST_CASE("a car that stops between two timed rows, or never reaches min_speed, is refused") {
  LogChannels log;
  log.source = "log.csv";
  for (int i = 0; i < 12; ++i) {
    log.time_s.push_back(0.1 * i);
    log.speed_mps.push_back(i == 1 || i == 2 ? 0.0 : 20.0);
    log.lat_accel_mps2.push_back(0.0);
  }
  try {
    log_curvature(log, LogCurvatureOptions{});
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    // Rows 1 and 2 both stand still: no distance between them.
    CHECK(e.violation().at == "time_s[2]");
    CHECK(e.message() == "the car does not move between these rows");
    CHECK(e.subject() == "log.csv");
  }
  log.speed_mps.assign(12, 1.0);  // under the 5 m/s minimum everywhere
  try {
    log_curvature(log, LogCurvatureOptions{});
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.message() == "no row is fast enough to read curvature from");
  }
  LogCurvatureOptions bad;
  bad.smoothing_m = 0.0;
  CHECK_THROWS_AS(log_curvature(circle_log(50.0, 20.0), bad), InvalidInput);
}
