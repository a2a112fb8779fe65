// Corner detection from curvature alone.
#include <doctest/doctest.h>

#include "lapwing/corners.hpp"
#include "lapwing/units.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {
Mesh laid(std::vector<Segment> segs) {
  Track t = test::straight_track(1.0, 0.5, 0.0);
  t.segments = std::move(segs);
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
