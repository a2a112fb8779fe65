// Track layout against geometry: circle (length 2 pi R, curvature 1/R), and the clothoid
// against the Fresnel integrals (Abramowitz & Stegun, Table 7.7; NIST DLMF ch. 7).
#include <doctest/doctest.h>

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/curvature_profile.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/path/racing_line.hpp"
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

TEST_CASE("a clothoid's points against adaptive Gauss-Kronrod quadrature (Boost.Math)") {
  // x(s) = int_0^s cos theta, y(s) = int_0^s sin theta with theta = k0 u + (k1 - k0) u^2 / (2 L):
  // Boost's adaptive 61-point Gauss-Kronrod rule to 1e-14 relative as the reference. A gentle
  // clothoid (every step's turn within the mesh's series, |psi| <= 0.1 rad) and a tight one
  // (from 1/40 to 1/1.2 m, where the steps turn by more and the mesh takes sin and cos).
  struct Case {
    double length, k0, k1;
  };
  for (const Case& c : {Case{60.0, 0.0, 1.0 / 45.0}, Case{25.0, 1.0 / 40.0, 1.0 / 1.2}}) {
    Track t = test::straight_track(c.length, 0.5, 0.0);
    t.segments = {test::clothoid(c.length, c.k0, c.k1)};
    const Mesh m = build_mesh(t, 0.5);
    const auto theta = [&](double u) { return c.k0 * u + (c.k1 - c.k0) * u * u / (2 * c.length); };
    using boost::math::quadrature::gauss_kronrod;
    CAPTURE(c.k1);
    for (std::size_t i : {m.size() / 3, m.size() - 1}) {
      const double s = m.s_m[i];
      const double x = gauss_kronrod<double, 61>::integrate(
          [&](double u) { return std::cos(theta(u)); }, 0.0, s, 15, 1e-14);
      const double y = gauss_kronrod<double, 61>::integrate(
          [&](double u) { return std::sin(theta(u)); }, 0.0, s, 15, 1e-14);
      // Round-off of a walk of 2 s steps: 1e-12 m over tens of metres.
      CHECK(near(m.x_m[i], x, 0.0, 1e-12 * s));
      CHECK(near(m.y_m[i], y, 0.0, 1e-12 * s));
      CHECK(near(m.heading_rad[i], theta(s), 1e-14, 1e-14));
    }
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
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.violation().field == "segments");
    CHECK(e.subject() == "circle.yaml");
    CHECK(std::string(e.what()).find("does not close") != std::string::npos);
    CHECK(std::string(e.what()).find("m from the start") != std::string::npos);
  }
}

namespace {
// A closed track from a centerline's points (default smoothing).
Track centerline_track(const std::vector<double>& x, const std::vector<double>& y) {
  Track t = test::circle_track(100.0, 0.5);
  t.file = "centerline.yaml";
  t.segments.clear();
  t.profile = fit_centerline(CenterlinePoints{"gap circle", x, y, {}}, true, CenterlineOptions{});
  return t;
}
}  // namespace

TEST_CASE(
    "a closed centerline reports its data's gap and refuses one over max(3 spacings, 0.5 %)") {
  const double radius = 100.0;
  // 40 points on a circle: spacing 2 R sin(pi / 40) = 15.69 m, and the last point is that far
  // from the first (chord of the circle, closed form). 3 spacings (47 m) is the tolerance here,
  // not 0.5 % of the 628 m length (3.1 m): the fit bridges one spacing as it bridges any other.
  {
    std::vector<double> x, y;
    for (int i = 0; i < 40; ++i) {
      x.push_back(radius * std::cos(2 * units::pi * i / 40));
      y.push_back(radius * std::sin(2 * units::pi * i / 40));
    }
    const Track t = centerline_track(x, y);
    const double chord = 2 * radius * std::sin(units::pi / 40);
    CHECK(near(closure(t).position_gap_m, chord, 1e-9));
    CHECK(near(t.profile->point_spacing_m, chord, 1e-9));
    CHECK(near(closure_position_tolerance_m(t), 3 * chord, 1e-9));
    CHECK_NOTHROW(build_mesh(t, 0.5));
  }
  // The same circle every 1.96 m (320 points round) with its last quarter missing: the last
  // point is R sqrt(2) = 141.4 m from the first, over max(3 x 1.96 m, 0.5 % of the length): an
  // error stating the gap, at the track's `centerline` key.
  {
    std::vector<double> x, y;
    const int n = 320;
    for (int i = 0; i <= 3 * n / 4; ++i) {
      x.push_back(radius * std::cos(2 * units::pi * i / n));
      y.push_back(radius * std::sin(2 * units::pi * i / n));
    }
    const Track t = centerline_track(x, y);
    const double gap = std::hypot(x.back() - x.front(), y.back() - y.front());
    CHECK(near(gap, radius * std::sqrt(2.0), 1e-9));  // 3/4 of a turn: the chord R sqrt(2)
    CHECK(near(closure(t).position_gap_m, gap, 1e-12));
    // The error names the last data point by its index (a loader names its file and line).
    try {
      build_mesh(t, 0.5);
      FAIL("expected an InvalidInput");
    } catch (const InvalidInput& e) {
      const std::string what = e.what();
      CAPTURE(what);
      CHECK(e.subject() == "centerline.yaml");
      CHECK(e.violation().field == "centerline");
      CHECK(e.violation().point == "centerline.points[240]");
      CHECK(what.rfind("centerline.yaml: error: closed centerline does not close: its last point "
                       "(data point 241 of gap circle) is 141.4 m from its first",
                       0) == 0);
      CHECK(what.find("(centerline)") != std::string::npos);
    }
  }
}

TEST_CASE("a mesh laid out on two threads is the mesh on one, bit for bit") {
  // build_mesh lays a track of segments out in two halves of its points, each walked from its
  // segments' starts; on two threads or one the halves are the same (STYLE: outputs the same
  // whatever the number of threads). Cairnholt has grades and banks; at 0.1 m both are long
  // enough for the automatic choice to take two threads on a two-core machine.
  for (const char* file : {"tracks/brannock-park.yaml", "tracks/cairnholt.yaml"}) {
    const Track track = load_track(test::source_path(file));
    const Mesh one = build_mesh(track, 0.1, 1), two = build_mesh(track, 0.1, 2),
               automatic = build_mesh(track, 0.1);
    REQUIRE(one.size() >= 20000);
    for (const Mesh* m : {&two, &automatic}) {
      CHECK(m->s_m == one.s_m);
      CHECK(m->x_m == one.x_m);
      CHECK(m->y_m == one.y_m);
      CHECK(m->heading_rad == one.heading_rad);
      CHECK(m->curvature_1pm == one.curvature_1pm);
      CHECK(m->elevation_m == one.elevation_m);
      CHECK(m->grade == one.grade);
      CHECK(m->bank_rad == one.bank_rad);
      CHECK(m->trim_zone == one.trim_zone);
      CHECK(m->width_left_m == one.width_left_m);
    }
  }
}

namespace {
// A closed circle of radius R in two half arcs climbing at grades g1 and g2: its end is
// (g1 + g2) pi R above its start (elevation integrates the grade over the plan distance).
Track climbing_circle(double radius, double g1, double g2) {
  Track t = test::circle_track(radius, 0.5);
  t.segments = {test::arc(radius, units::pi, true), test::arc(radius, units::pi, true)};
  t.segments[0].grade = g1;
  t.segments[1].grade = g2;
  return t;
}
bool has(const std::vector<std::string>& texts, const std::string& part) {
  for (const auto& t : texts)
    if (t.find(part) != std::string::npos) return true;
  return false;
}
}  // namespace

TEST_CASE("a mesh coarser than 2 m, beyond the convergence tables, is warned of") {
  // A robustness campaign's: a 10 m mesh (allowed, up to 10 m) read an apex of Brannock Park at
  // half its grip limit and lap times a percent off either way, with no warning.
  Track t = climbing_circle(50.0, 0.0, 0.0);
  t.mesh_m = 2.0;
  CHECK(track_warnings(t).empty());
  t.mesh_m = 2.5;
  const auto w = track_warnings(t);
  REQUIRE(w.size() == 1);
  CHECK(w[0] ==
        "the mesh step, 2.5 m, is coarser than 2 m, the coarsest whose convergence lapwing shows: "
        "lap times can be off by a percent and a tight corner's speed by far more; give a mesh "
        "of 2 m or finer");
}

TEST_CASE("a closed lap whose end is above its start warns beyond max(1 m, 0.1 % of the length)") {
  // Closed form: gap = (g1 + g2) pi R. R 50 m (length 314 m: the 1 m floor rules): 1 % up all
  // the way ends 3.14 m above, 1 % down 3.14 m below; up then down ends level; 0.3 % up all
  // the way ends 0.94 m above, under the floor.
  {
    const Track t = climbing_circle(50.0, 0.01, 0.01);
    CHECK(near(closure(t).elevation_gap_m, 0.02 * units::pi * 50.0, 1e-9));
    CHECK(near(closure_elevation_tolerance_m(t), 1.0, 1e-15));
    const auto w = track_warnings(t);
    REQUIRE(w.size() == 1);
    CHECK(w[0].rfind("the closed lap ends 3.14 m above its start (tolerance max(1 m, 0.1 % of the "
                     "length) = 1.00 m): every lap climbs that much net",
                     0) == 0);
    CHECK(w[0].find("a grade typed with the wrong sign") != std::string::npos);
  }
  CHECK(has(track_warnings(climbing_circle(50.0, -0.01, -0.01)), "3.14 m below its start"));
  CHECK(track_warnings(climbing_circle(50.0, 0.01, -0.01)).empty());
  CHECK(track_warnings(climbing_circle(50.0, 0.003, 0.003)).empty());  // 0.94 m
  // R 1000 m (length 6283 m: 0.1 % is 6.28 m, over the floor): 0.09 % all the way ends 5.65 m
  // above (no warning), 0.11 % 6.91 m above (a warning).
  {
    const Track t = climbing_circle(1000.0, 0.0011, 0.0011);
    CHECK(near(closure_elevation_tolerance_m(t), 0.001 * 2 * units::pi * 1000.0, 1e-12));
    CHECK(has(track_warnings(t), "6.91 m above its start"));
    CHECK(track_warnings(climbing_circle(1000.0, 0.0009, 0.0009)).empty());
  }
  // An open track rises as it may: no warning.
  Track open = climbing_circle(50.0, 0.01, 0.01);
  open.closed = false;
  CHECK(track_warnings(open).empty());
}

TEST_CASE("a segment track's end elevation is the sum of grade x length, clothoids and all") {
  // Closed form: the end is sum(g_k L_k) above the start. Lengths and grades in powers of two,
  // exact in binary: a straight of 64 m at 1/32 (2 m), a clothoid of 32 m at 1/16 (2 m), a
  // level arc, and a last straight of 16 m at 1/8 (2 m): 6 m. The last straight is reached as
  // the length less the segments before it, which carry the arc's inexact length: 1e-12 m.
  Track t = test::circle_track(50.0, 0.5);
  t.segments = {test::straight(64.0, 1.0 / 32), test::clothoid(32.0, 0.0, 1.0 / 50.0),
                test::arc(50.0, units::pi / 2, true), test::straight(16.0, 1.0 / 8)};
  t.segments[1].grade = 1.0 / 16;
  CHECK(near(closure(t).elevation_gap_m, 6.0, 1e-12));
  // The warning reads the same gap without walking the positions (they do not close here, and
  // need not: only the elevation is warned of).
  CHECK(has(track_warnings(t), "the closed lap ends 6.00 m above its start"));
  t.segments[3].grade = -1.0 / 8;  // 2 m up, 2 m up, 2 m down: 2 m
  CHECK(near(closure(t).elevation_gap_m, 2.0, 1e-12));
  CHECK(has(track_warnings(t), "the closed lap ends 2.00 m above its start"));
}

namespace {
// A closed stadium as a curvature profile, rows about 0.5 m apart: a straight of `first` m, a
// half circle of radius R, a straight of `second` m, a half circle, a last row. Each half
// circle's rows span pi R - h, and the rows either side of it are h away at zero curvature, so
// that the ramps between rows (curvature is linear between them) add h / 2R each: each half turns
// pi exactly. With equal straights the second half is the first turned by pi, and the profile
// closes; a second straight d shorter moves every point after it by d along it, so the end
// misses the start by d (closed form).
Track stadium_profile(double first, double second, double radius) {
  const double h = 0.5;
  std::vector<double> s, k;
  auto run = [&](double length, double curvature) {
    const auto steps = static_cast<std::size_t>(std::ceil(length / h));
    const double from = s.empty() ? 0.0 : s.back() + h;
    for (std::size_t i = 0; i <= steps; ++i) {
      s.push_back(from + length * static_cast<double>(i) / static_cast<double>(steps));
      k.push_back(curvature);
    }
  };
  run(first, 0.0);
  run(units::pi * radius - h, 1.0 / radius);
  run(second, 0.0);
  run(units::pi * radius - h, 1.0 / radius);
  s.push_back(s.back() + h);
  k.push_back(0.0);
  Track t = test::circle_track(radius, 0.5);
  t.segments.clear();
  t.profile = profile_from_curvature("stadium.csv", s, k, {});
  return t;
}
}  // namespace

TEST_CASE(
    "a closed curvature profile whose end misses its start warns beyond 0.5 % of the length") {
  // Straights of 100 m, R 50 m (with the four 0.5 m ramps and the last row: 515.2 m). The
  // second straight cut by 20 m (a truncated export) leaves a 20 m gap, over 0.5 % of the 495.2 m
  // (2.48 m): a warning stating it; cut by 2 m, within 0.5 % of 513.2 m (2.57 m): none; uncut:
  // none.
  {
    const Track t = stadium_profile(100.0, 80.0, 50.0);
    CHECK(near(closure(t).position_gap_m, 20.0, 0.0, 1e-6));
    CHECK(std::abs(closure(t).heading_gap_rad) < 1e-9);
    const auto w = track_warnings(t);
    REQUIRE(w.size() == 1);
    CHECK(w[0].rfind("the closed curvature profile's end is 20.0 m from its start (tolerance "
                     "0.5 % of the length = 2.5 m)",
                     0) == 0);
    CHECK(w[0].find("rows missing at an end") != std::string::npos);
  }
  CHECK(near(closure(stadium_profile(100.0, 100.0, 50.0)).position_gap_m, 0.0, 0.0, 1e-6));
  CHECK(track_warnings(stadium_profile(100.0, 100.0, 50.0)).empty());
  CHECK(track_warnings(stadium_profile(100.0, 98.0, 50.0)).empty());
}

TEST_CASE("a mesh laid out without positions is the same mesh for a lap, bit for bit") {
  // MeshPositions::left_out skips the positions (an arc's sine and cosine, a clothoid's
  // quadrature) and keeps everything a lap reads: what the solver and the summary see is the
  // same bit for bit, so a study without a map or trace laps as it did (docs/performance.md,
  // "Positions only where they are drawn"). Every bundled track (segments with clothoids, grades
  // and banks, a surveyed centerline, trim zones, widths), and Cairnholt in a wind, whose head wind
  // needs the headings.
  std::vector<Track> tracks;
  for (const char* file :
       {"tracks/brannock-park.yaml", "tracks/brannock-park-survey.yaml", "tracks/cairnholt.yaml",
        "tracks/saltmere-flats.yaml", "tracks/skidpad.yaml", "tracks/acceleration.yaml",
        "tests/data/sprint-wiggle.yaml"})
    tracks.push_back(load_track(test::source_path(file)));
  Track windy = tracks[2];
  windy.wind = Wind{6.0, 1.0};
  for (std::size_t k = 0; k < windy.segments.size(); k += 3)
    windy.segments[k].bank_rad = 5.0 * units::deg;  // banked here and there too
  tracks.push_back(windy);
  // The lapped forms read in a wind too: a fitted centerline (headings integrated from the
  // curvature) and a racing line laid over a segment track (line_path, trim zones and bank read
  // where the line passes).
  Track survey_wind = tracks[1];
  survey_wind.wind = Wind{5.0, 3.5};
  tracks.push_back(survey_wind);
  Track lined = tracks[0];
  lined.wind = Wind{7.0, -2.0};
  lined.line = LineSpec{};
  lined.trim_zones = {TrimZone{10.0, 250.0}};
  lay_racing_line(lined);
  tracks.push_back(lined);
  for (const Track& track : tracks) {
    CAPTURE(track.name);
    const bool wind = track.wind.has_value();
    for (unsigned threads : {1u, 2u}) {
      const Mesh full = build_mesh(track, track.mesh_m, threads);
      const Mesh bare = build_mesh(track, track.mesh_m, threads, MeshPositions::left_out);
      CHECK(full.has_positions());
      CHECK_FALSE(bare.has_positions());
      CHECK(bare.x_m.empty());
      CHECK(bare.y_m.empty());
      // Headings only where the wind needs them, and then the same.
      CHECK(bare.heading_rad == (wind ? full.heading_rad : std::vector<double>{}));
      CHECK(bare.closed == full.closed);
      CHECK(bare.length_m == full.length_m);
      CHECK(bare.step_m == full.step_m);
      CHECK(bare.s_m == full.s_m);
      CHECK(bare.curvature_1pm == full.curvature_1pm);
      CHECK(bare.grade == full.grade);
      CHECK(bare.elevation_m == full.elevation_m);
      CHECK(bare.bank_rad == full.bank_rad);
      CHECK(bare.head_wind_mps == full.head_wind_mps);
      CHECK(bare.trim_zone == full.trim_zone);
      CHECK(bare.width_left_m == full.width_left_m);
      CHECK(bare.width_right_m == full.width_right_m);
    }
  }
  // The cases the list is for are in it: a graded track, and one banked in a wind.
  CHECK_FALSE(build_mesh(tracks[2], 1.0).grade.empty());
  const Mesh banked = build_mesh(windy, 1.0, 1, MeshPositions::left_out);
  CHECK_FALSE(banked.bank_rad.empty());
  CHECK_FALSE(banked.head_wind_mps.empty());
}

TEST_CASE("what reads positions refuses a mesh laid out without them") {
  const Track track = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Mesh bare = build_mesh(track, 1.0, 1, MeshPositions::left_out);
  CHECK_THROWS_AS(require_positions(bare, "a trace"), std::logic_error);
  CHECK_NOTHROW(require_positions(build_mesh(track, 1.0, 1), "a trace"));
}
