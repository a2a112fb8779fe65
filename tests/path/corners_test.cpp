// Corner detection from curvature alone.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>

#include "lapwing/base/units.hpp"
#include "lapwing/io/track_data.hpp"
#include "lapwing/path/corners.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {
Mesh laid(std::vector<Segment> segs) {
  Track t = test::straight_track(1.0, 0.5, 0.0);
  t.segments = std::move(segs);
  return build_mesh(t, 0.5);
}

// An open track from a curvature profile given as pieces of constant curvature (length m,
// curvature 1/m), sampled every 0.1 m as a CSV would give it and read by import_curvature.
Mesh from_profile(const std::vector<std::pair<double, double>>& pieces) {
  std::ostringstream os;
  os.precision(12);
  os << "distance_m,curvature_1pm\n";
  double s0 = 0.0;
  for (const auto& [length, k] : pieces) {
    const int n = static_cast<int>(std::lround(length / 0.1));
    for (int i = 0; i < n; ++i) os << s0 + 0.1 * i << "," << k << "\n";
    s0 += length;
  }
  os << s0 << ",0\n";
  const std::string file = "corners_profile.csv";
  std::ofstream(file) << os.str();
  Track t = test::straight_track(1.0, 0.5, 0.0);
  t.segments.clear();
  t.profile = import_curvature(file);
  std::remove(file.c_str());
  return build_mesh(t, 0.5);
}
}  // namespace

TEST_CASE("an arc between straights is one corner spanning the arc") {
  const Mesh m =
      laid({test::straight(100), test::arc(40, units::pi / 2, false), test::straight(100)});
  const auto c = find_corners(m);
  REQUIRE(c.size() == 1);
  CHECK(c[0].direction == -1);
  CHECK(m.s_m[c[0].start] == doctest::Approx(100.0).epsilon(0.01));
  CHECK(m.s_m[c[0].end] == doctest::Approx(100 + 40 * units::pi / 2).epsilon(0.01));
}

TEST_CASE("a chicane is two corners; a short straight inside one direction merges") {
  const Mesh chicane = laid({test::straight(100), test::arc(30, 0.8, true), test::straight(10),
                             test::arc(30, 0.8, false), test::straight(100)});
  CHECK(find_corners(chicane).size() == 2);
  const Mesh split = laid({test::straight(100), test::arc(30, 0.8, true), test::straight(10),
                           test::arc(30, 0.8, true), test::straight(100)});
  CHECK(find_corners(split).size() == 1);
  const Mesh apart = laid({test::straight(100), test::arc(30, 0.8, true), test::straight(60),
                           test::arc(30, 0.8, true), test::straight(100)});
  CHECK(find_corners(apart).size() == 2);
}

TEST_CASE("a gentle bend above the entry radius is no corner; hysteresis holds a corner open") {
  const Mesh gentle = laid({test::straight(100), test::arc(900, 0.3, true), test::straight(100)});
  CHECK(find_corners(gentle).empty());
  // Radius 600 m lies between the entry (500 m) and exit (800 m) radii: it stays inside the
  // corner it follows but does not start one.
  const Mesh held = laid({test::straight(100), test::arc(100, 0.5, true), test::arc(600, 0.2, true),
                          test::straight(100)});
  const auto c = find_corners(held);
  REQUIRE(c.size() == 1);
  CHECK(held.s_m[c[0].end] == doctest::Approx(100 + 50 + 120).epsilon(0.01));
}

TEST_CASE("a run turning less than 5 deg is a wiggle, not a corner") {
  // Radius 300 m (inside the entry radius) over 3 deg: 15.7 m long, but hardly a turn.
  const Mesh m =
      laid({test::straight(100), test::arc(300, 3 * units::deg, true), test::straight(100)});
  CHECK(find_corners(m).empty());
}

TEST_CASE(
    "a hairpin over 5 m is a corner wherever the mesh points fall (README, \"Physics and "
    "assumptions\")") {
  // Arc length R theta (the geometry): 3 m x 110 deg = 5.76 m, over the 5 m floor. Measured
  // between its first and last mesh points it read 4.996 m at a 0.5 m mesh (11 points) and was
  // dropped; its points' cells measure 11 steps (5.5 m). The straight before it moves the
  // points along the arc by a tenth of a step at a time; meshes from 0.1 m to 0.5 m.
  for (const double mesh : {0.1, 0.25, 0.4, 0.5}) {
    for (const double lead : {200.0, 200.05, 200.1, 200.15, 200.2, 200.25, 200.3, 200.35, 200.4}) {
      CAPTURE(mesh);
      CAPTURE(lead);
      Track t = test::straight_track(1.0, mesh, 0.0);
      t.segments = {test::straight(lead), test::arc(3.0, 110 * units::deg, true),
                    test::straight(100)};
      const Mesh m = build_mesh(t, mesh);
      const auto c = find_corners(m);
      REQUIRE(c.size() == 1);
      CHECK(c[0].direction == 1);
    }
  }
}

TEST_CASE("a short run that turns sharply is a corner; a short gentle one is a kink") {
  // 70 deg at radius 4 m: 4.89 m of arc (R theta), under the 5 m floor, but a turn of 70 deg
  // is no kink (README, "Physics and assumptions", Corners: runs under 5 m stay corners from 30
  // deg). 20 deg at radius 10 m: 3.49 m, and under 30 deg: a kink, dropped.
  const Mesh sharp =
      laid({test::straight(200), test::arc(4.0, 70 * units::deg, false), test::straight(100)});
  const auto c = find_corners(sharp);
  REQUIRE(c.size() == 1);
  CHECK(c[0].direction == -1);
  const Mesh kink =
      laid({test::straight(200), test::arc(10.0, 20 * units::deg, true), test::straight(100)});
  CHECK(find_corners(kink).empty());
}

TEST_CASE(
    "a short opposite wiggle inside one corner does not split it (README, \"Physics\", corners)") {
  // Right at radius 40 m for 60 m (86 deg), a 3 m left kink at radius 60 m (2.9 deg: a wiggle,
  // under both 5 m and 5 deg), then right again for 60 m. The two right runs are 3 m apart,
  // within the 20 m merge gap once the wiggle is dropped: one corner from 100 m to 223 m.
  const Mesh m =
      from_profile({{100, 0.0}, {60, -1.0 / 40}, {3, 1.0 / 60}, {60, -1.0 / 40}, {100, 0.0}});
  const auto c = find_corners(m);
  REQUIRE(c.size() == 1);
  CHECK(c[0].direction == -1);
  // Ends within a mesh step and a sample (0.5 m + 0.1 m) of the pieces' ends.
  CHECK(std::abs(m.s_m[c[0].start] - 100.0) <= 0.6);
  CHECK(std::abs(m.s_m[c[0].end] - 223.0) <= 0.6);

  // The same wiggle with 10 m of straight on each side: the right runs are 23 m apart, more
  // than the 20 m merge gap: two corners.
  const Mesh apart = from_profile({{100, 0.0},
                                   {60, -1.0 / 40},
                                   {10, 0.0},
                                   {3, 1.0 / 60},
                                   {10, 0.0},
                                   {60, -1.0 / 40},
                                   {100, 0.0}});
  CHECK(find_corners(apart).size() == 2);

  // A left that counts as a corner (20 m at radius 40 m: 29 deg) is a chicane's middle: three.
  const Mesh chicane =
      from_profile({{100, 0.0}, {60, -1.0 / 40}, {20, 1.0 / 40}, {60, -1.0 / 40}, {100, 0.0}});
  const auto three = find_corners(chicane);
  REQUIRE(three.size() == 3);
  CHECK(three[1].direction == 1);
}

TEST_CASE("corner options out of range are a typed error naming the option") {
  CHECK(test::describe(CornerOptions{}.validate()) == "none");
  CornerOptions o;
  o.exit_curvature_1pm = 2.0 * o.enter_curvature_1pm;  // no hysteresis: ends before it starts
  CHECK(test::describe(o.validate()) ==
        "exit_curvature_1pm: exit_curvature_1pm must not exceed enter_curvature_1pm (a corner "
        "ends at a larger radius than it starts at)");
  o = CornerOptions{};
  o.min_length_m = -1.0;
  CHECK(test::describe(o.validate()) ==
        "min_length_m: value -1 is out of range: must be >= 0 in SI units");
  o = CornerOptions{};
  o.sharp_turn_deg = -1.0;
  CHECK(test::describe(o.validate()) == "sharp_turn_deg: value -1 is out of range: must be >= 0");
  o.min_length_m = -1.0;
  o.enter_curvature_1pm = 0.0;
  CHECK(o.validate()->field == "enter_curvature_1pm");  // the first in order
  const Mesh m = build_mesh(test::circle_track(50.0, 0.5), 0.5);
  CHECK_THROWS_AS(find_corners(m, o), InvalidInput);
}
