// Curvature profiles: positions integrated from curvature against the closed form of a circle;
// the profile's own rules as typed errors.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/curvature_profile.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("a constant curvature integrates to a closed polygon on a circle (closed form)") {
  // 1000 steps of ds round a circle of radius R: each step is a chord of the arc it stands for,
  // in the direction of the mean heading (the midpoint rule), so the points lie on the circle of
  // radius R' = ds / (2 sin(ds / 2R)) through the origin, x = R' sin(th), y = R' (1 - cos(th)),
  // and the last is the first again. To 1e-9 of R (round-off of 1000 sums).
  const double radius = 80.0, grade = 0.03;
  const std::size_t n = 1000;
  const double ds = 2 * units::pi * radius / static_cast<double>(n);
  std::vector<double> s(n + 1), k(n + 1, 1.0 / radius), g(n + 1, grade);
  for (std::size_t i = 0; i <= n; ++i) s[i] = 100.0 + static_cast<double>(i) * ds;  // offset
  const PathProfile p = profile_from_curvature("circle.csv", s, k, g);
  const double chord_radius = ds / (2 * std::sin(ds / (2 * radius)));
  for (std::size_t i = 0; i <= n; i += 50) {
    const double th = static_cast<double>(i) * ds / radius;
    CHECK(near(p.x_m[i], chord_radius * std::sin(th), 0.0, 1e-9 * radius));
    CHECK(near(p.y_m[i], chord_radius * (1 - std::cos(th)), 0.0, 1e-9 * radius));
  }
  CHECK(p.s_m.front() == 0.0);  // distances from the first row
  CHECK(near(p.s_m.back(), 2 * units::pi * radius, 1e-12));
  // Elevation integrates the grade (the trapezoid rule is exact for a constant).
  CHECK(near(p.elevation_m.back(), grade * 2 * units::pi * radius, 1e-12));
  CHECK(p.source == PathProfile::Source::curvature);
}

TEST_CASE("a profile's curvature beyond 1/m or grade beyond 50 % names its row") {
  std::vector<double> s, k, g;
  for (int i = 0; i < 12; ++i) {
    s.push_back(10.0 * i);
    k.push_back(i == 4 ? 1.5 : 0.01);
    g.push_back(i == 2 ? -0.6 : 0.0);
  }
  try {
    profile_from_curvature("data.csv", s, k, g);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.subject() == "data.csv");
    CHECK(e.violation().at == "curvature_1pm[4]");
    CHECK(std::string(e.what()) ==
          "data.csv: error: curvature beyond 1/m (a radius under 1 m) (curvature_1pm[4])");
  }
  k[4] = 0.01;
  try {
    profile_from_curvature("data.csv", s, k, g);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.violation().at == "grade[2]");
    CHECK(e.message() == "grade beyond +-50 %");
  }
  // Distances that go back are refused before anything is integrated.
  s[5] = s[4];
  CHECK_THROWS_AS(profile_from_curvature("data.csv", s, k, g), InvalidInput);
}
