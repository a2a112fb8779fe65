// Centerline fits against closed-form curvature (circle, ellipse, clothoid), GPS points on the
// WGS-84 ellipsoid (NIMA TR8350.2 constants), elevation into grade; the fit's own rules.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <tuple>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/geodesy.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/path/smoothing.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;
using lapwing::test::Noise;

namespace {

// Profile samples away from the ends of an open path.
template <typename F>
void for_interior(const PathProfile& p, double margin_m, F f) {
  for (std::size_t i = 0; i < p.s_m.size(); ++i)
    if (p.s_m[i] > margin_m && p.s_m[i] < p.s_m.back() - margin_m) f(i);
}

}  // namespace

TEST_CASE("noisy points on a circle give curvature 1/R within 1 %") {
  const double radius = 100.0;
  Noise noise;
  std::vector<double> x, y;
  for (int i = 0; i < 314; ++i) {  // every 2 m, 20 mm of survey noise
    const double t = 2 * units::pi * i / 314.0;
    x.push_back(radius * std::cos(t) + 0.02 * noise.gauss());
    y.push_back(radius * std::sin(t) + 0.02 * noise.gauss());
  }
  // A constant curvature takes any smoothing; 60 m holds this noise (20 mm at 2 m) to 0.5 %
  // everywhere (measured: 12 % at 20 m, 1.7 % at 40 m).
  const PathProfile p = fit_centerline(CenterlinePoints{"circle", x, y, {}, {}, {}}, true,
                                       CenterlineOptions{60.0, 100.0, 1.0});
  double mean = 0.0;
  for (std::size_t i = 0; i + 1 < p.s_m.size(); ++i) {
    CHECK(near(p.curvature_1pm[i], 1.0 / radius, 0.01));
    mean += p.curvature_1pm[i];
  }
  mean /= static_cast<double>(p.s_m.size() - 1);
  CHECK(near(mean, 1.0 / radius, 1e-3));
  CHECK(near(p.s_m.back(), 2 * units::pi * radius, 1e-3));  // circle length 2 pi R
}

TEST_CASE(
    "points on an ellipse match its closed-form curvature ab / (a^2 sin^2 t + b^2 cos^2 t)^(3/2)") {
  const double a = 300.0, b = 180.0;
  std::vector<double> x, y;
  for (int i = 0; i < 1500; ++i) {
    const double t = 2 * units::pi * i / 1500.0;
    x.push_back(a * std::cos(t));
    y.push_back(b * std::sin(t));
  }
  // Points every 0.75 to 1.26 m joined by chords: smoothing over 20 m (measured worst 0.22 %;
  // 1.1 % at 10 m, where the chords' corners begin to show).
  const PathProfile p = fit_centerline(CenterlinePoints{"ellipse", x, y, {}, {}, {}}, true,
                                       CenterlineOptions{20.0, 100.0, 1.0});
  for (std::size_t i = 0; i < p.s_m.size(); i += 7) {
    const double t = std::atan2(p.y_m[i] / b, p.x_m[i] / a);
    const double st = std::sin(t), ct = std::cos(t);
    const double k = a * b / std::pow(a * a * st * st + b * b * ct * ct, 1.5);
    CHECK(near(p.curvature_1pm[i], k, 0.01));
  }
}

TEST_CASE("a closed centerline's fit does not depend on where its coordinates lie") {
  // The same noisy points at the origin and 500 km east and north (projected coordinates can sit
  // that far from their origin): the smoother takes each series' mean out before its transforms
  // (path/smoothing.cpp), so GCV's choice, the length and the curvature agree to rounding
  // relative to the path's swing, not to its place: within 1e-12 relative for the choice and the
  // length, 1e-9 of the largest curvature at every sample (a centred fit's own rounding, some
  // 1e-14 m of position, is magnified by the second difference over a 1 m sample). Before the
  // transform the double-precision factorisation (weak strengths) lost some 7e-7 m of a surveyed
  // lap's length there.
  const double a = 300.0, b = 180.0;
  Noise noise{11};
  std::vector<double> x, y;
  for (int i = 0; i < 900; ++i) {
    const double t = 2 * units::pi * i / 900.0;
    x.push_back(a * std::cos(t) + 0.05 * noise.gauss());
    y.push_back(b * std::sin(t) + 0.05 * noise.gauss());
  }
  std::vector<double> xs = x, ys = y;
  for (auto& v : xs) v += 5e5;
  for (auto& v : ys) v += 5e5;
  const PathProfile p = fit_centerline(CenterlinePoints{"here", x, y, {}, {}, {}}, true, {});
  const PathProfile q = fit_centerline(CenterlinePoints{"far", xs, ys, {}, {}, {}}, true, {});
  REQUIRE(p.s_m.size() == q.s_m.size());
  CHECK(std::abs(p.smoothing_m - q.smoothing_m) <= 1e-12 * p.smoothing_m);
  CHECK(std::abs(p.s_m.back() - q.s_m.back()) <= 1e-12 * p.s_m.back());
  double worst = 0.0, largest = 0.0;
  for (std::size_t i = 0; i < p.s_m.size(); ++i) {
    worst = std::max(worst, std::abs(p.curvature_1pm[i] - q.curvature_1pm[i]));
    largest = std::max(largest, std::abs(p.curvature_1pm[i]));
  }
  CHECK(worst <= 1e-9 * largest);
}

TEST_CASE("points on a clothoid give curvature linear in distance") {
  // The clothoid as the segment layout lays it out (checked against the Fresnel table in
  // mesh_test): curvature from 0 to 1/50 over 200 m.
  Track seg = test::straight_track(1.0, 0.5, 0.0);
  seg.segments = {test::clothoid(200.0, 0.0, 1.0 / 50.0)};
  const Mesh m = build_mesh(seg, 1.0);
  std::vector<double> x(m.x_m.begin(), m.x_m.end()), y(m.y_m.begin(), m.y_m.end());
  const PathProfile p = fit_centerline(CenterlinePoints{"clothoid", x, y, {}, {}, {}}, false,
                                       CenterlineOptions{10.0, 100.0, 1.0});
  for_interior(p, 25.0, [&](std::size_t i) {
    CHECK(near(p.curvature_1pm[i], p.s_m[i] / (50.0 * 200.0), 0.0, 2e-5));
  });
}

TEST_CASE(
    "GPS points on a circle of known radius at 45 deg latitude give that radius within 0.1 %") {
  // East-north circle of radius 200 m about (45 deg N, 7 deg E), taken to latitude and
  // longitude on the WGS-84 ellipsoid (NIMA TR8350.2) by inverting the tangent-plane map:
  // ENU -> ECEF, then ECEF -> geodetic by fixed-point iteration on the latitude.
  const double lat0 = 45.0, lon0 = 7.0, radius = 200.0;
  const auto o = wgs84::to_ecef(lat0, lon0, 0.0);
  const double sl = std::sin(lat0 * units::deg), cl = std::cos(lat0 * units::deg);
  const double so = std::sin(lon0 * units::deg), co = std::cos(lon0 * units::deg);
  std::vector<double> lats, lons;
  for (int i = 0; i < 628; ++i) {
    const double t = 2 * units::pi * i / 628.0;
    const double e = radius * std::cos(t), n = radius * (1.0 + std::sin(t)), u = 0.0;
    const double X = o[0] - so * e - sl * co * n + cl * co * u;
    const double Y = o[1] + co * e - sl * so * n + cl * so * u;
    const double Z = o[2] + cl * n + sl * u;
    const double lon = std::atan2(Y, X), p = std::hypot(X, Y);
    double lat = std::atan2(Z, p * (1 - wgs84::eccentricity_sq)), h = 0.0;
    for (int k = 0; k < 20; ++k) {
      const double nn = wgs84::semi_major_m /
                        std::sqrt(1 - wgs84::eccentricity_sq * std::sin(lat) * std::sin(lat));
      h = p / std::cos(lat) - nn;
      lat = std::atan2(Z, p * (1 - wgs84::eccentricity_sq * nn / (nn + h)));
    }
    lats.push_back(lat / units::deg);
    lons.push_back(lon / units::deg);
  }
  const PathProfile p = fit_centerline(project_wgs84("gps", lats, lons, {}), true,
                                       CenterlineOptions{20.0, 100.0, 1.0});
  double mean = 0.0;
  for (std::size_t i = 0; i + 1 < p.s_m.size(); ++i) mean += p.curvature_1pm[i];
  mean /= static_cast<double>(p.s_m.size() - 1);
  CHECK(near(1.0 / mean, radius, 1e-3));
}

TEST_CASE("a centerline's elevation becomes its grade") {
  // A straight 400 m climbing at 4 %, then level: grade 0.04 then 0 (away from the change, which
  // the 100 m elevation smoothing spreads).
  CenterlinePoints points{"climb", {}, {}, {}, {}, {}};
  for (int i = 0; i <= 800; i += 4) {
    points.x_m.push_back(i);
    points.y_m.push_back(0.0);
    points.z_m.push_back(i <= 400 ? 0.04 * i : 16.0);
  }
  const PathProfile p = fit_centerline(points, false, CenterlineOptions{});
  for (std::size_t i = 0; i < p.s_m.size(); ++i) {
    if (p.s_m[i] > 100 && p.s_m[i] < 300) CHECK(near(p.grade[i], 0.04, 0.0, 1e-3));
    if (p.s_m[i] > 550 && p.s_m[i] < 750) CHECK(near(p.grade[i], 0.0, 0.0, 1e-3));
  }
}

TEST_CASE("the fit's options and points are checked, a stray point named by its index") {
  CHECK(test::describe(CenterlineOptions{}.validate()) == "none");
  CHECK(test::describe(CenterlineOptions{0.0, 100.0, 1.0}.validate()) ==
        "smoothing: value 0 is out of range: must be > 0 in SI units");
  CHECK(test::describe(CenterlineOptions{20.0, 100.0, 0.001}.validate()) ==
        "spacing: value 0.001 is out of range: must be [0.01, 100] in SI units");
  // Twelve points 10 m apart and one 300 km away: the path is over 200 km long.
  CenterlinePoints p{"survey.csv", {}, {}, {}, {}, {}};
  for (int i = 0; i < 12; ++i) {
    p.x_m.push_back(10.0 * i);
    p.y_m.push_back(i == 7 ? 300e3 : 0.0);
  }
  try {
    fit_centerline(p, false, CenterlineOptions{});
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.subject() == "survey.csv");
    CHECK(e.violation().at == "x_m[7]");  // the point after the widest gap
    CHECK(e.message().rfind("the centerline is 600.", 0) == 0);
  }
  // A point near the doubles' top (a robustness campaign's): the sum of the gaps overflows
  // where each gap is finite, and the message said "inf km long ... inf m". Named as the stray
  // point still, its gap as it is; a gap that overflows on its own is said so.
  for (const auto& [y7, y8, at, gap] :
       {std::tuple{1e308, 0.0, "x_m[7]", "this point is 1e+308 m from the one before"},
        std::tuple{-1e308, 1e308, "x_m[8]",
                   "this point is further than a double can hold from the one before"}}) {
    CenterlinePoints q{"survey.csv", {}, {}, {}, {}, {}};
    for (int i = 0; i < 12; ++i) {
      q.x_m.push_back(10.0 * i);
      q.y_m.push_back(i == 7 ? y7 : i == 8 ? y8 : 0.0);
    }
    try {
      fit_centerline(q, false, CenterlineOptions{});
      FAIL("expected an InvalidInput");
    } catch (const InvalidInput& e) {
      CHECK(e.violation().at == at);
      CHECK(e.message() ==
            std::string("the centerline is longer than a double can hold (at most 200 km); ") +
                gap);
    }
  }
  p.x_m.resize(5);
  p.y_m.resize(5);
  CHECK_THROWS_AS(fit_centerline(p, false, CenterlineOptions{}), InvalidInput);
  // A latitude beyond the pole.
  try {
    project_wgs84("gps.csv", {45.0, 95.0}, {7.0, 7.0}, {});
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.violation().at == "lat_deg[1]");
    CHECK(e.message() == "latitude or longitude out of range");
  }
}

// A fit at the 1 m spacing whatever the strength (as `check`'s refits at half and double the
// strength are): lambda up to 1e17. The coarser L / 40 spacing a fit takes by default keeps
// lambda near 4e6 and would not test the solver's precision.
static CenterlineOptions fixed_1m(double smoothing) {
  CenterlineOptions o;
  o.smoothing_m = smoothing;
  o.spacing_m = 1.0;
  o.fixed_spacing = true;
  return o;
}

// Issue 19, finding 5: at strengths of hundreds of metres on 1 m samples the smoother's lambda
// reaches 1e13 to 1e17 (lambda = (2 sin(pi h / L))^-6), where the normal equations
// (I + lambda D'D) f = y, solved as they stand, keep no significant digit.
TEST_CASE("a circle of 1000 m radius keeps its length 2 pi R under a 1000 m smoothing") {
  const double radius = 1000.0;
  const int n = 6283;  // points every 1.00003 m
  std::vector<double> x, y;
  for (int i = 0; i < n; ++i) {
    const double t = 2 * units::pi * i / n;
    x.push_back(radius * std::cos(t) + 250.0);
    y.push_back(radius * std::sin(t) - 400.0);
  }
  for (double smoothing : {100.0, 1000.0, 2000.0, 4000.0}) {
    CAPTURE(smoothing);
    const PathProfile p =
        fit_centerline(CenterlinePoints{"circle", x, y, {}}, true, fixed_1m(smoothing));
    // Closed form: the resampled points are the polygon's vertices (equal chords: the Hermite
    // curve passes through each point, and the samples fall on them), and
    // cos(2 pi i / n) is an eigenvector of the periodic D'D with eigenvalue (2 sin(pi / n))^6,
    // so the fit is the circle of radius R H, H = 1 / (1 + lambda (2 sin(pi / n))^6). Its
    // length is n chords, 2 n R H sin(pi / n), and central differences of a sampled circle give
    // its curvature 1 / (R H) exactly. Round-off alone is left: to 1e-9.
    const double h = 2 * radius * std::sin(units::pi / n);
    const double gain =
        1.0 / (1.0 + smoothing_lambda(h, smoothing, 3) * std::pow(2 * std::sin(units::pi / n), 6));
    CHECK(near(p.s_m.back(), 2 * n * radius * gain * std::sin(units::pi / n), 1e-9));
    for (std::size_t i = 0; i + 1 < p.s_m.size(); i += 97)
      CHECK(near(p.curvature_1pm[i], 1.0 / (radius * gain), 1e-9));
  }
}

TEST_CASE("a straight line of 3000 m stays 3000 m long and straight under strong smoothing") {
  std::vector<double> x, y;
  for (int i = 0; i <= 3000; ++i) {
    x.push_back(0.6 * i + 1200.0);  // away from the origin, heading 53 deg: no help from zeros
    y.push_back(0.8 * i - 700.0);
  }
  for (double smoothing : {1000.0, 2000.0, 4000.0}) {
    CAPTURE(smoothing);
    const PathProfile p =
        fit_centerline(CenterlinePoints{"line", x, y, {}}, false, fixed_1m(smoothing));
    // A line is in the null space of the third difference: the fit returns it unchanged, to
    // round-off (1 mm over 3 km, and 1e-6 1/m of curvature, allow for it).
    CHECK(near(p.s_m.back(), 3000.0, 0.0, 1e-3));
    for (std::size_t i = 0; i < p.s_m.size(); i += 11)
      CHECK(near(p.curvature_1pm[i], 0.0, 0.0, 1e-6));
  }
}

TEST_CASE("a noisy 2000 m line fitted at double the file's largest smoothing stays straight") {
  // What `check` does with a file's 2000 m: it fits at 4000 m too (issue 19, finding 5). 20 mm
  // of survey noise every 2 m.
  Noise noise;
  std::vector<double> x, y;
  for (int i = 0; i <= 1000; ++i) {
    x.push_back(2.0 * i + 0.02 * noise.gauss());
    y.push_back(0.02 * noise.gauss());
  }
  const PathProfile p =
      fit_centerline(CenterlinePoints{"noisy line", x, y, {}}, false, fixed_1m(4000.0));
  // The noise leaves the fit within a few mm of the line: length to 1 cm, curvature below 1e-5
  // 1/m (a radius over 100 km).
  CHECK(near(p.s_m.back(), 2000.0, 0.0, 0.01));
  for (std::size_t i = 0; i < p.s_m.size(); i += 7) CHECK(near(p.curvature_1pm[i], 0.0, 0.0, 1e-5));
}

TEST_CASE("a centerline that runs out and straight back is refused at its cusp (issue 19, 7)") {
  // 200 m out along y = 0 and back on the same line: the fit turns back in a metre or less,
  // where its curvature is 0 / 0 or, with the derivatives changing sign between samples, reads
  // 0. Either way it is tighter than a 1 m radius.
  CenterlinePoints p{"cusp.csv", {}, {}, {}};
  for (int i = 0; i <= 200; ++i) p.x_m.push_back(i), p.y_m.push_back(0.0);
  for (int i = 199; i >= 1; --i) p.x_m.push_back(i), p.y_m.push_back(0.0);
  for (double smoothing : {2.5, 5.0, 20.0}) {
    CAPTURE(smoothing);
    try {
      fit_centerline(p, true, CenterlineOptions{smoothing, 100.0, 1.0});
      FAIL("expected an InvalidInput");
    } catch (const InvalidInput& e) {
      CHECK(e.subject() == "cusp.csv");
      CHECK(e.message().find("turns tighter than a 1 m radius") != std::string::npos);
      // The point named is one of the two ends of the out-and-back: x = 0 or x = 200.
      const std::size_t i = last_index(e.violation().at).value();
      CHECK((p.x_m[i] <= 2.0 || std::abs(p.x_m[i] - 200.0) <= 2.0));
    }
  }
}

TEST_CASE("a centerline steeper than a segment's +-50 % grade is refused at a point of the climb") {
  // 400 m level, then 200 m climbing 60 % (z in feet read as metres would be 3.3 times a real
  // 18 %), then level: the smoothed grade tops 50 % on the climb, which the segment forms refuse
  // (README, "Track": steeper is no road). 45 % is still a road.
  for (const double climb : {0.6, 0.45}) {
    CAPTURE(climb);
    CenterlinePoints points{"steep.csv", {}, {}, {}, {}, {}};
    for (int i = 0; i <= 1000; i += 4) {
      points.x_m.push_back(i);
      points.y_m.push_back(0.0);
      points.z_m.push_back(i <= 400 ? 0.0 : climb * (std::min(i, 600) - 400));
    }
    if (climb < 0.5) {
      const PathProfile p = fit_centerline(points, false, CenterlineOptions{});
      const double steepest = *std::max_element(p.grade.begin(), p.grade.end());
      CHECK(steepest <= 0.5);
      CHECK(steepest > 0.3);  // the smoothing (100 m) leaves most of the climb
      continue;
    }
    try {
      fit_centerline(points, false, CenterlineOptions{});
      FAIL("expected an InvalidInput");
    } catch (const InvalidInput& e) {
      CHECK(e.subject() == "steep.csv");
      CHECK(e.message().find("climbs or falls by more than 50 %") != std::string::npos);
      const std::size_t i = last_index(e.violation().at).value();
      CHECK(e.violation().at.rfind("z_m[", 0) == 0);
      CHECK(points.x_m[i] >= 350.0);  // on the climb, within the smoothing of its ends
      CHECK(points.x_m[i] <= 650.0);
    }
  }
}

TEST_CASE("widths the smoothing widens beyond their survey by over 0.25 m are a note") {
  // A ring of radius 50 m, points every 1 m, 5 m to each edge; at one point the right edge is
  // 1 m from the centerline (a pit wall's nose). A 10 m smoothing averages that point with
  // its neighbours, so the track there reads wider than surveyed by some metres: the line
  // (track line) is bounded by the smoothed width, and the note gives the place and both
  // figures. Without the narrowing no edge moves out and there is no note.
  auto ring = [](bool pinch) {
    CenterlinePoints p{"ring", {}, {}, {}, {}, {}};
    for (int i = 0; i < 314; ++i) {
      const double t = 2 * units::pi * i / 314.0;
      p.x_m.push_back(50.0 * std::cos(t));
      p.y_m.push_back(50.0 * std::sin(t));
      p.width_left_m.push_back(5.0);
      p.width_right_m.push_back(pinch && i == 100 ? 1.0 : 5.0);
    }
    return fit_centerline(p, true, CenterlineOptions{10.0, 100.0, 1.0});
  };
  const PathProfile pinched = ring(true);
  const auto note = std::find_if(pinched.notes.begin(), pinched.notes.end(), [](const auto& n) {
    return n.rfind("the widths are smoothed over 10.0 m", 0) == 0;
  });
  REQUIRE(note != pinched.notes.end());
  CHECK(note->find("the right edge is 1.00 m from the centerline as surveyed") !=
        std::string::npos);
  // Where: point 100 of 314 on a 314.16 m ring, 100.05 m along (to the 0.1 m printed).
  CHECK(note->find("at 100.0 m along the points") != std::string::npos);
  // The smoothed width there is the note's other figure, and the excess the gap between them.
  const std::size_t at = static_cast<std::size_t>(std::lround(100.05 / (pinched.s_m[1])));
  CHECK(pinched.width_right_m[at] - 1.0 > 0.25);
  const PathProfile plain = ring(false);
  CHECK(std::none_of(plain.notes.begin(), plain.notes.end(), [](const auto& n) {
    return n.find("widths are smoothed") != std::string::npos;
  }));
}
