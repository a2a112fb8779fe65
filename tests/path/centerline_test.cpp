// Centerline fits against closed-form curvature (circle, ellipse, clothoid), GPS points on the
// WGS-84 ellipsoid (NIMA TR8350.2 constants), elevation into grade; the fit's own rules.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/geodesy.hpp"
#include "lapwing/path/mesh.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {

// Deterministic Gaussian noise (a 64-bit LCG and Box-Muller): the same points every run.
struct Noise {
  std::uint64_t state = 0x9E3779B97F4A7C15ull;
  double uniform() {
    state = state * 6364136223846793005ull + 1442695040888963407ull;
    return (static_cast<double>(state >> 11) + 0.5) / 9007199254740992.0;
  }
  double gauss() {
    const double u1 = uniform(), u2 = uniform();
    return std::sqrt(-2 * std::log(u1)) * std::cos(2 * units::pi * u2);
  }
};

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
