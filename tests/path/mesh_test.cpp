// Track layout against geometry: circle (length 2 pi R, curvature 1/R), and the clothoid
// against the Fresnel integrals (Abramowitz & Stegun, Table 7.7; NIST DLMF ch. 7).
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/mesh.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("a circle: length 2 pi R, curvature 1/R, every point R from the centre") {
  const double radius = 50.0;
  const Mesh m = build_mesh(test::circle_track(radius, 0.5), 0.5);
  CHECK(near(m.length_m, 2 * units::pi * radius, 1e-14));
  CHECK(near(m.s_m.back(), m.length_m, 1e-14));
  for (std::size_t i = 0; i < m.size(); i += 37) {
    CHECK(near(m.curvature_1pm[i], 1.0 / radius, 1e-14));
    // A left turn from the origin heading +x has its centre at (0, R).
    CHECK(near(std::hypot(m.x_m[i], m.y_m[i] - radius), radius, 1e-12));
    CHECK(near(m.heading_rad[i], m.s_m[i] / radius, 1e-12, 1e-12));
  }
  const Closure c = closure(test::circle_track(radius, 0.5));
  CHECK(c.position_gap_m < 1e-9);
  CHECK(std::abs(c.heading_gap_rad) < 1e-12);
}

TEST_CASE("a clothoid's end point is A sqrt(pi) (C(t), S(t)) (A&S Table 7.7)") {
  // kappa(s) = s / A^2 with A sqrt(pi) = 100 m, so t = s / 100 m; from 0 to 1/R over L = 100 t.
  const double a_sqrt_pi = 100.0, a2 = a_sqrt_pi * a_sqrt_pi / units::pi;
  struct Row {
    double t, c, s;
  };
  for (const Row& r : {Row{0.5, 0.4923442, 0.0647324}, Row{1.0, 0.7798934, 0.4382591}}) {
    const double length = a_sqrt_pi * r.t;
    Track t = test::straight_track(length, 0.5, 0.0);
    t.segments = {test::clothoid(length, 0.0, length / a2)};
    const Mesh m = build_mesh(t, 0.5);
    CAPTURE(r.t);
    // Table values have 7 decimals: 1e-7 x 100 m.
    CHECK(near(m.x_m.back(), a_sqrt_pi * r.c, 0.0, 1e-5));
    CHECK(near(m.y_m.back(), a_sqrt_pi * r.s, 0.0, 1e-5));
    // Curvature linear in distance.
    const std::size_t mid = m.size() / 2;
    CHECK(near(m.curvature_1pm[mid], m.s_m[mid] / a2, 1e-12));
  }
}

TEST_CASE("the mesh spacing divides the length; elevation integrates the grade") {
  Track t = test::straight_track(1000.0, 0.3, 0.0);
  t.segments = {test::straight(400.0, 0.05), test::straight(600.0, -0.02)};
  const Mesh m = build_mesh(t, 0.3);
  CHECK(near(m.step_m * static_cast<double>(m.intervals()), 1000.0, 1e-14));
  CHECK(std::abs(m.step_m - 0.3) < 0.3 / static_cast<double>(m.intervals()));
  CHECK(near(m.elevation_m.back(), 400 * 0.05 - 600 * 0.02, 1e-12));
}

TEST_CASE("a closed track that does not close is an error that states the gap") {
  Track t = test::circle_track(50.0, 0.5);
  t.segments = {test::arc(50.0, 1.9 * units::pi, true)};
  try {
    build_mesh(t, 0.5);
    FAIL("expected an InputError");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()).find("does not close") != std::string::npos);
    CHECK(std::string(e.what()).find("m from the start") != std::string::npos);
  }
}
