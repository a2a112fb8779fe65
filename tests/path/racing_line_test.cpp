// The minimum-curvature line (Braghin et al., Computers & Structures 86 (2008); Heilmeier et al.,
// Vehicle System Dynamics 58 (2020)) against closed forms: on a ring of constant width the
// minimum-curvature closed path is the circle on the outer bound (REFERENCES.md, racing line);
// through a 90 deg corner between straights the line uses the full width, edge to apex to edge
// (common practice). The linearisation's derivatives against central finite differences.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/box_qp.hpp"
#include "lapwing/path/racing_line.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE(
    "the curvature of three points matches the circle through them, and its derivatives "
    "match finite differences") {
  // Three points on a circle of radius 40 m, 1 m apart along it (d = 1/40 rad between them):
  // with a = p2 - p1, b = p1 - p0 the formula is 8 (b x a) / |a + b|^3, and for points on a
  // circle b x a = |a| |b| |a + b| / (2 r) (the circle through three points), |a| = 2 r sin(d/2),
  // |a + b| = 2 r sin d, so kappa = 1 / (r cos^2(d/2)): the circle's curvature to (d/2)^2.
  const double r = 40.0, d = 1.0 / r;
  const double x[3] = {r * std::sin(-d), 0.0, r * std::sin(d)};
  const double y[3] = {r - r * std::cos(-d), 0.0, r - r * std::cos(d)};
  const LocalCurvature l = local_curvature(x[0], x[1], x[2], y[0], y[1], y[2]);
  CHECK(near(l.kappa, 1.0 / (r * std::pow(std::cos(d / 2), 2)), 1e-12));
  // Central differences with step 1e-6 m: truncation error ~ h^2 kappa''' ~ 1e-12, round-off
  // ~ 1e-16 kappa / h ~ 1e-12: compare to 1e-7 of the largest derivative.
  const double h = 1e-6;
  double scale = 0.0;
  for (int k = 0; k < 3; ++k) scale = std::max({scale, std::abs(l.d_dx[k]), std::abs(l.d_dy[k])});
  for (int k = 0; k < 3; ++k) {
    double xp[3] = {x[0], x[1], x[2]}, xm[3] = {x[0], x[1], x[2]};
    xp[k] += h, xm[k] -= h;
    const double fd_x = (local_curvature(xp[0], xp[1], xp[2], y[0], y[1], y[2]).kappa -
                         local_curvature(xm[0], xm[1], xm[2], y[0], y[1], y[2]).kappa) /
                        (2 * h);
    double yp[3] = {y[0], y[1], y[2]}, ym[3] = {y[0], y[1], y[2]};
    yp[k] += h, ym[k] -= h;
    const double fd_y = (local_curvature(x[0], x[1], x[2], yp[0], yp[1], yp[2]).kappa -
                         local_curvature(x[0], x[1], x[2], ym[0], ym[1], ym[2]).kappa) /
                        (2 * h);
    CAPTURE(k);
    CHECK(near(l.d_dx[k], fd_x, 0.0, 1e-7 * scale));
    CHECK(near(l.d_dy[k], fd_y, 0.0, 1e-7 * scale));
  }
}

TEST_CASE("a box QP with a diagonal Hessian is solved by clamping -g/h (closed form)") {
  // minimise sum h_i x_i^2 / 2 + g_i x_i on [lo, hi]: each coordinate alone, x_i = clamp(-g_i /
  // h_i, lo_i, hi_i).
  const int n = 6;
  Eigen::SparseMatrix<double> h(n, n);
  Eigen::VectorXd g(n), lo(n), hi(n);
  const double hv[n] = {1.0, 2.0, 0.5, 4.0, 1.0, 3.0}, gv[n] = {-3.0, 1.0, 0.2, -8.0, 0.0, 9.0};
  for (int i = 0; i < n; ++i) {
    h.insert(i, i) = hv[i];
    g[i] = gv[i];
    lo[i] = -1.0;
    hi[i] = 1.5;
  }
  const BoxQpResult r = solve_box_qp(h, g, lo, hi, Eigen::VectorXd::Zero(n), 1e-12);
  CHECK(r.converged);
  for (int i = 0; i < n; ++i) CHECK(near(r.x[i], std::clamp(-gv[i] / hv[i], -1.0, 1.5), 1e-12));
}

TEST_CASE("a banded box QP ends at a point that meets the KKT conditions") {
  // H = D2'D2 + 0.01 I (second differences: the racing line's kind of matrix), g pulling the
  // middle outward against the bounds. At the optimum (KKT for simple bounds): the gradient
  // Hx + g is zero where x is inside the box, >= 0 at a lower bound, <= 0 at an upper one.
  const int n = 60;
  std::vector<Eigen::Triplet<double>> t;
  for (int i = 0; i + 2 < n; ++i)
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b)
        t.emplace_back(i + a, i + b, (a == 1 ? -2.0 : 1.0) * (b == 1 ? -2.0 : 1.0));
  for (int i = 0; i < n; ++i) t.emplace_back(i, i, 0.01);
  Eigen::SparseMatrix<double> h(n, n);
  h.setFromTriplets(t.begin(), t.end());
  Eigen::VectorXd g(n), lo = Eigen::VectorXd::Constant(n, -1.0),
                        hi = Eigen::VectorXd::Constant(n, 1.0);
  for (int i = 0; i < n; ++i) g[i] = -std::sin(units::pi * i / (n - 1)) + 0.3 * std::cos(0.7 * i);
  const BoxQpResult r = solve_box_qp(h, g, lo, hi, Eigen::VectorXd::Zero(n), 1e-12);
  CHECK(r.converged);
  const Eigen::VectorXd grad = h * r.x + g;
  int at_bound = 0;
  for (int i = 0; i < n; ++i) {
    CAPTURE(i);
    // 1e-9: the solve's step tolerance times the Hessian's largest entries (16).
    if (r.x[i] <= lo[i] + 1e-12) {
      CHECK(grad[i] >= -1e-9);
      ++at_bound;
    } else if (r.x[i] >= hi[i] - 1e-12) {
      CHECK(grad[i] <= 1e-9);
      ++at_bound;
    } else {
      CHECK(std::abs(grad[i]) <= 1e-9);
    }
  }
  CHECK(at_bound > 0);  // the bounds were active: the test exercised them
}

namespace {
Track ring(double radius_m, double width_m) {
  Track t = test::circle_track(radius_m, 0.5);
  t.width_m = width_m;
  return t;
}
}  // namespace

TEST_CASE("on a ring of constant width the line is the circle on the outer bound") {
  // Centerline radius 50 m, 10 m wide, a 2 m car with 0.5 m margins: the line may go 3.5 m
  // either side, and the closed form says the circle of radius 53.5 m (REFERENCES.md). The
  // left normal of a left-hand circle points to its centre, so the outer bound is alpha = -3.5.
  // The same on a ring of 2 km, where the gain of the outer circle is small (the sum of
  // curvatures squared falls by 3.5 / 2003.5 of itself) but real: the first, heavily damped
  // step moved the line by under 1 cm there, and the solve stopped on the centerline as if
  // converged (a helper's finding on tracks of radii above 500 m).
  const double width = 10.0;
  for (const double radius : {50.0, 2000.0}) {
    CAPTURE(radius);
    const LineReference ref = line_reference(ring(radius, width));
    LineOptions o;
    const RacingLine line = min_curvature_line(ref, o);
    CHECK(line.converged);
    const double outer = radius + width / 2 - o.vehicle_width_m / 2 - o.margin_m;
    for (std::size_t i = 0; i < ref.size(); ++i) {
      CAPTURE(i);
      // The solve stops when no offset moves by 1 cm; on the bound it is exact.
      CHECK(near(line.offset_m[i], -(outer - radius), 0.0, 0.01));
      CHECK(near(std::hypot(line.x_m[i], line.y_m[i] - radius), outer, 0.0, 0.01));
      // Curvature of points about 1 m apart on a circle: 1 / (R cos^2(d/2)) (see above), d/2 =
      // 0.5 / 53.5 rad adding 9e-5; to the offsets' 1 cm (2e-4 of R).
      CHECK(near(line.curvature_1pm[i], 1.0 / outer, 3e-4));
    }
    // Laid out, the line's length is 2 pi R (points on the circle joined by chords: the chord's
    // shortfall is (h / R)^2 / 24 = 1.4e-5 of it).
    const PathProfile p = line_profile(ref, line);
    CHECK(near(p.s_m.back(), 2 * units::pi * outer, 1e-4));
    // Widths measured from the line: 1.5 m + half the car to the outer edge.
    CHECK(near(p.width_right_m[7], width / 2 - (outer - radius), 0.0, 0.01));
  }
}

TEST_CASE("through a 90 deg corner between straights the line goes edge to apex to edge") {
  // An open track: 200 m straight, a left arc of 30 m radius through 90 deg, 200 m straight;
  // 12 m wide, so the line may go 4.5 m either side. The minimum-curvature line comes in on the
  // outside edge (right, alpha = -4.5), touches the inside edge at the apex (alpha = +4.5) and
  // goes out to the outside edge again (common practice; Braghin et al. 2008 fig. 6 shows the
  // same). The arc's middle is at 200 + 30 pi / 4 = 223.6 m.
  Track t = test::straight_track(200.0, 0.5, 0.0);
  t.segments = {test::straight(200.0), test::arc(30.0, units::pi / 2, true), test::straight(200.0)};
  t.width_m = 12.0;
  const LineReference ref = line_reference(t);
  const RacingLine line = min_curvature_line(ref, LineOptions{});
  CHECK(line.converged);
  auto offset_at = [&](double s) {
    return line.offset_m[static_cast<std::size_t>(std::lround(s / ref.spacing_m))];
  };
  const double apex = 200.0 + 30.0 * units::pi / 4;
  // 1 cm: the solve's tolerance.
  CHECK(near(offset_at(120.0), -4.5, 0.0, 0.01));                                // entry, outside
  CHECK(near(offset_at(apex), 4.5, 0.0, 0.01));                                  // apex, inside
  CHECK(near(offset_at(200.0 + 30.0 * units::pi / 2 + 80.0), -4.5, 0.0, 0.01));  // exit, outside
  // The line's tightest radius is well above the centreline's 30 m: what the width buys.
  double kmax = 0.0;
  for (double k : line.curvature_1pm) kmax = std::max(kmax, std::abs(k));
  CHECK(1.0 / kmax > 40.0);
}

namespace {
std::string buf_metres(double v) {
  char b[48];
  std::snprintf(b, sizeof b, "%.1f", v);
  return b;
}
}  // namespace

TEST_CASE("a track narrower than the vehicle and its margins, or without widths, has no line") {
  try {
    line_reference(test::circle_track(50.0, 0.5));
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.message().find("needs the track's widths") != std::string::npos);
    CHECK(e.violation().where() == "line");
    CHECK(e.subject() == "circle.yaml");
  }
  // 2.9 m wide: less than 2 m of car and 0.5 m each side.
  const LineReference ref = line_reference(ring(50.0, 2.9));
  try {
    min_curvature_line(ref, LineOptions{});
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.message().find("2.90 m wide at 0.0 m") != std::string::npos);
    CHECK(e.violation().where() == "width");  // the track's width, where the file gives it
  }
  // A segment's own width, where that segment is the narrowest: the error is at its key (a
  // helper's finding: it named "line", a key no track file has, at 1:1).
  {
    Track two = test::circle_track(50.0, 0.5);
    two.width_m = 10.0;
    two.segments = {test::arc(50.0, units::pi, true), test::arc(50.0, units::pi, true)};
    two.segments[1].width_m = 2.5;
    try {
      min_curvature_line(line_reference(two), LineOptions{});
      FAIL("expected an InvalidInput");
    } catch (const InvalidInput& e) {
      CHECK(e.violation().where() == "segments[1].width");
      CHECK(e.message().find("2.50 m wide at") != std::string::npos);
    }
  }
  // Narrower further on: the error names the narrowest point, not the first too narrow (a
  // made-up reference: 2.9 m everywhere but 2.5 m at the 10th point).
  LineReference narrowing = ref;
  narrowing.width_left_m[10] = narrowing.width_right_m[10] = 1.25;
  try {
    min_curvature_line(narrowing, LineOptions{});
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.message().find("2.50 m wide at " + std::string(buf_metres(narrowing.s_m[10])) +
                           " m, its narrowest") != std::string::npos);
  }
}

TEST_CASE("weights steer the line: where they are zero the curvature costs nothing") {
  // The ring again, with the sum weighted on half of it only. The weighted half still goes to
  // the outer bound; the unweighted half need not: its curvature is free, so the solve leaves
  // the sum no higher than the uniform line's on the weighted half.
  const LineReference ref = line_reference(ring(50.0, 10.0));
  LineOptions o;
  o.weights.assign(ref.size(), 1.0);
  for (std::size_t i = ref.size() / 2; i < ref.size(); ++i) o.weights[i] = 0.0;
  const RacingLine weighted = min_curvature_line(ref, o);
  const RacingLine uniform = min_curvature_line(ref, LineOptions{});
  double half_w = 0.0, half_u = 0.0;
  for (std::size_t i = 0; i < ref.size() / 2; ++i) {
    half_w += weighted.curvature_1pm[i] * weighted.curvature_1pm[i];
    half_u += uniform.curvature_1pm[i] * uniform.curvature_1pm[i];
  }
  CHECK(half_w <= half_u * (1 + 1e-9));
  CHECK(near(weighted.objective, half_w, 1e-9));
}
