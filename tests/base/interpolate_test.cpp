// Linear interpolation (base/interpolate.hpp): a straight line is reproduced exactly wherever it
// is sampled (the interpolant of a linear function is the function; any numerical analysis text,
// e.g. Burden & Faires, Numerical Analysis, sec. 3.1), ends are held, and the three ways of
// finding the bracket agree.
#include <doctest/doctest.h>

#include <vector>

#include "lapwing/base/interpolate.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("a straight line sampled on an uneven axis is reproduced between the nodes (1e-15)") {
  const std::vector<double> xs{0.0, 0.5, 2.0, 2.25, 7.0};
  std::vector<double> ys;
  for (double x : xs) ys.push_back(3.0 - 1.5 * x);
  for (double x = 0.0; x <= 7.0; x += 0.125)
    CHECK(near(interpolate(xs, ys, x), 3.0 - 1.5 * x, 1e-15, 1e-15));
  // Held at the ends: exactly the end values.
  CHECK(interpolate(xs, ys, -4.0) == ys.front());
  CHECK(interpolate(xs, ys, 9.0) == ys.back());
  CHECK(interpolate(xs, ys, 7.0) == ys.back());
  // One point or none: a constant.
  CHECK(interpolate({}, {4.0}, 12.0) == 4.0);
  CHECK(interpolate({1.0}, {4.0}, -12.0) == 4.0);
}

TEST_CASE("lerp is a + w (b - a): exact at w = 0, and the midpoint of a and b at w = 0.5") {
  CHECK(lapwing::lerp(0.1, 0.7, 0.0) == 0.1);
  CHECK(lapwing::lerp(2.0, 6.0, 0.5) == 4.0);
  CHECK(lapwing::lerp(2.0, 6.0, 0.25) == 3.0);
}

TEST_CASE("bracket, the even grid and the walk find the same interval and share") {
  const std::vector<double> grid{0.0, 1.0, 2.0, 3.0, 4.0};  // an even axis, step 1
  AxisWalk walk(grid);
  for (double x = 0.0; x < 4.0; x += 0.25) {
    const Bracket a = bracket(grid, x), b = even_bracket(x, 4), c = walk.at(x);
    CHECK(a.i == b.i);
    CHECK(a.i == c.i);
    CHECK(a.w == b.w);
    CHECK(a.w == c.w);
  }
  // Outside: held at the ends, and said so.
  bool outside = false;
  const Bracket lo = bracket(grid, -1.0, &outside);
  CHECK(outside);
  CHECK(lo.i == 0);
  CHECK(lo.w == 0.0);
  const Bracket hi = bracket(grid, 5.0, &outside);
  CHECK(outside);
  CHECK(hi.i == 3);
  CHECK(hi.w == 1.0);
  CHECK(even_bracket(-2.0, 4).w == 0.0);
  CHECK(even_bracket(9.0, 4).i == 3);
  CHECK(even_bracket(9.0, 4).w == 1.0);
}

TEST_CASE("the walk gives a node's own value on the node, and none of a zero-length interval") {
  const std::vector<double> s{0.0, 1.0, 1.0, 2.0};  // a repeated node: a zero-length interval
  const std::vector<double> v{10.0, 20.0, 30.0, 40.0};
  AxisWalk walk(s);
  CHECK(at(v, walk.at(0.0)) == 10.0);
  CHECK(at(v, walk.at(1.0)) == 30.0);  // the interval that starts at the last copy of the node
  CHECK(at(v, walk.at(1.5)) == 35.0);
  CHECK(at(v, walk.at(2.5)) == 40.0);  // held
}
