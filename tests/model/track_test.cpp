// Track: segments, profiles and the track as a whole name their first bad value by its key path
// in a track file (README, "Track").
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/units.hpp"
#include "lapwing/model/track.hpp"
#include "test_support.hpp"

using namespace lapwing;

TEST_CASE("the bundled tracks break no rule") {
  for (const char* file : {"tracks/brannock-park.yaml", "tracks/cairnholt.yaml",
                           "tracks/acceleration.yaml", "tracks/brannock-park-survey.yaml"})
    CHECK(test::describe(load_track(test::source_path(file)).validate()) == "none");
}

TEST_CASE("a segment's radius and angle are 1 / |curvature| and length x |curvature|") {
  CHECK(test::describe(test::arc(100e3, 1e-3, true).validate()) == "none");  // 100 km radius
  CHECK(test::describe(test::arc(20.0, 4 * units::pi, false).validate()) == "none");  // 2 turns
  CHECK(test::describe(test::arc(200e3, 0.1, true).validate()) ==
        "arc.radius: value 200000 is out of range: must be [1, 100000] in SI units");
  CHECK(test::describe(test::arc(20.0, 5 * units::pi, true).validate()) ==
        "arc.angle: value 900 is out of range: must be (0, 720] deg");  // an angle in degrees
  CHECK(test::describe(test::straight(0.0).validate()) ==
        "straight.length: value 0 is out of range: must be (0, 100000] in SI units");
  CHECK(test::describe(test::straight(100.0, 0.6).validate()) ==
        "straight.grade: value 0.6 is out of range: must be [-0.5, 0.5]");
  Segment bent = test::straight(100.0);
  bent.curvature_end_1pm = 0.01;
  CHECK(test::describe(bent.validate()) == "straight: a straight has no curvature");
  CHECK(test::describe(test::clothoid(30.0, 0.0, 0.0).validate()) ==
        "clothoid: a clothoid needs from_radius, to_radius or both (a missing one is straight)");
  CHECK(test::describe(test::clothoid(30.0, 0.02, -0.01).validate()) ==
        "clothoid: a clothoid turns one way: its curvatures have one sign");
  CHECK(test::describe(test::clothoid(30.0, 0.0, 1.0 / 150e3).validate()) ==
        "clothoid.to_radius: value 150000 is out of range: must be [1, 100000] in SI "
        "units");
}

TEST_CASE("a path profile has at least two samples, columns of one length, s from 0 upwards") {
  PathProfile p;
  p.s_m = {0.0, 1.0, 2.0};
  p.curvature_1pm = p.grade = p.x_m = p.y_m = p.elevation_m = {0.0, 0.0, 0.0};
  CHECK(test::describe(p.validate()) == "none");
  p.grade.pop_back();
  CHECK(test::describe(p.validate()) == "grade: size differs from s_m: expected 3, got 2");
  p.grade.push_back(0.0);
  p.s_m = {0.0, 2.0, 1.0};
  CHECK(test::describe(p.validate()) ==
        "s_m: values must be strictly increasing (item 2: 1 after 2)");
  p.s_m = {5.0, 6.0, 7.0};
  CHECK(test::describe(p.validate()) == "s_m: a path profile starts at distance 0");
}

TEST_CASE(
    "no path turns tighter than a 1 m radius: segments, profiles (issue 19, findings 7, 12)") {
  // A radius of 1 m passes (read back as 1 / (1 / 1)); below it, down to the 1e-300 m a file
  // once got through, does not.
  CHECK(test::describe(test::arc(1.0, 1.0, true).validate()) == "none");
  CHECK(test::describe(test::arc(0.5, 1.0, true).validate()) ==
        "arc.radius: value 0.5 is out of range: must be [1, 100000] in SI units");
  CHECK(test::describe(test::arc(1e-300, 1.0, true).validate()) ==
        "arc.radius: value 1e-300 is out of range: must be [1, 100000] in SI units");
  CHECK(test::describe(test::clothoid(30.0, 0.0, 2.0).validate()) ==
        "clothoid.to_radius: value 0.5 is out of range: must be [1, 100000] in SI units");
  // A profile's curvature: within +-1/m, and a number (a fit that divided 0 by 0 gave NaN).
  PathProfile p;
  p.s_m = {0.0, 1.0, 2.0};
  p.curvature_1pm = p.grade = p.x_m = p.y_m = p.elevation_m = {0.0, 0.0, 0.0};
  p.curvature_1pm = {0.0, -1.0, 1.0};
  CHECK(test::describe(p.validate()) == "none");
  p.curvature_1pm = {0.0, -1.5, 0.0};
  CHECK(test::describe(p.validate()) ==
        "curvature_1pm: curvature -1.5 1/m at 1 m is beyond 1/m (a radius under 1 m)");
  p.curvature_1pm = {0.0, 0.0, std::nan("")};
  CHECK(test::describe(p.validate()) ==
        "curvature_1pm: curvature nan 1/m at 2 m is beyond 1/m (a radius under 1 m)");
}

TEST_CASE("a track names its first bad value by its key path in a track file") {
  const Track good = test::straight_track(500.0, 0.5, 20.0);
  CHECK(test::describe(good.validate()) == "none");
  struct Case {
    void (*spoil)(Track&);
    const char* want;
  };
  const Case cases[] = {
      {[](Track& t) { t.closed = true; },
       "start_speed: start_speed applies to open tracks only (closed: false)"},
      {[](Track& t) { t.start_speed_mps = 200.0; },
       "start_speed: value 200 is out of range: must be [0, 150] in SI units"},
      {[](Track& t) { t.air.pressure_pa = 20000.0; },
       "ambient.pressure: value 20000 is out of range: must be [30000, 110000] in SI units"},
      {[](Track& t) { t.mesh_m = 0.0; },
       "mesh: value 0 is out of range: must be [0.01, 10] in SI units"},
      {[](Track& t) { t.segments.clear(); },
       ": give exactly one of segments, centerline, curvature"},
      {[](Track& t) { t.segments.push_back(test::arc(-30.0, 1.0, true)); },
       "segments[1].arc.angle: value -57.2957795131 is out of range: must be (0, 720] deg"},
      {[](Track& t) {
         t.mesh_m = 0.01,
         t.segments = {test::straight(99e3), test::straight(99e3), test::straight(99e3)};
       },
       ": the track is 297000.000000 m long: at a mesh of 0.010000 m that is more than 20 "
       "million points"},
      {[](Track& t) { t.sectors_m = {10.0}; }, "sectors: sectors must start at 0 m"},
      {[](Track& t) {
         t.sectors_m = {0.0, -5.0};
       },
       "sectors[1]: value -5 is out of range: must be >= 0 in SI units"},
      {[](Track& t) {
         t.sectors_m = {0.0, 300.0, 200.0};
       },
       "sectors: sector starts must be strictly increasing"},
      {[](Track& t) {
         t.sectors_m = {0.0, 600.0};
       },
       "sectors: sector start lies beyond the track's length (500.000000 m)"},
  };
  for (const Case& c : cases) {
    Track t = good;
    c.spoil(t);
    CHECK(test::describe(t.validate()) == c.want);
  }
  // The sector that breaks the rule is where the error points.
  Track t = good;
  t.sectors_m = {0.0, 300.0, 200.0};
  CHECK(t.validate()->where() == "sectors[2]");
}

TEST_CASE("widths and the line are checked: ranges, the segment form, both centerline widths") {
  // A segment's width and the track's: (0, 100] m (README, "Track").
  Segment s = test::straight(100.0);
  s.width_m = 0.0;
  CHECK(test::describe(s.validate()) ==
        "straight.width: value 0 is out of range: must be (0, 100] in SI units");
  Track t = test::circle_track(50.0, 0.5);
  t.width_m = 120.0;
  CHECK(test::describe(t.validate()) ==
        "width: value 120 is out of range: must be (0, 100] in SI units");
  t.width_m = 12.0;
  CHECK(test::describe(t.validate()) == "none");
  // The line: min-curvature only in a track file (the min-time line depends on the car), a
  // vehicle 0.5 to 5 m wide, a margin of 0 to 5 m.
  t.line = LineSpec{};
  CHECK(test::describe(t.validate()) == "none");
  t.line->vehicle_width_m = 6.0;
  CHECK(test::describe(t.validate()) ==
        "line.vehicle_width: value 6 is out of range: must be [0.5, 5] in SI units");
  t.line->vehicle_width_m = 2.0;
  t.line->method = LineSpec::Method::min_time;
  CHECK(
      test::describe(t.validate()).rfind("line.method: the min-time line depends on the car", 0) ==
      0);
  // A centerline's widths: both, one per sample, every one > 0.
  PathProfile p;
  p.s_m = {0.0, 1.0, 2.0};
  p.curvature_1pm = p.grade = p.x_m = p.y_m = p.elevation_m = {0.0, 0.0, 0.0};
  p.width_left_m = {5.0, 5.0, 5.0};
  CHECK(test::describe(p.validate()) ==
        "width_right_m: give both widths (width_left_m and width_right_m) or neither");
  p.width_right_m = {5.0, -1.0, 5.0};
  CHECK(test::describe(p.validate()).rfind("width_right_m", 0) == 0);
  p.width_right_m = {5.0, 5.0, 5.0};
  CHECK(test::describe(p.validate()) == "none");
}
