// Track data files: every bad CSV in tests/data/bad-csv/ gives its error with file, line and
// column; unread columns are named in notes; the surveyed Brannock Park against its segment twin.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/track_data.hpp"
#include "lapwing/study/circuit.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;
using lapwing::test::Noise;

namespace {

std::string points_csv(const std::vector<double>& x, const std::vector<double>& y) {
  std::ostringstream os;
  os.precision(12);
  os << "x_m,y_m\n";
  for (std::size_t i = 0; i < x.size(); ++i) os << x[i] << "," << y[i] << "\n";
  return os.str();
}

}  // namespace

TEST_CASE("every bad CSV gives its error with file, line and column") {
  const std::filesystem::path dir = test::source_path("tests/data/bad-csv");
  int seen = 0;
  for (const auto& entry : std::filesystem::directory_iterator(dir)) {
    const std::string file = entry.path().string();
    std::ifstream in(file);
    std::string first;
    std::getline(in, first);
    const std::string expect = first.substr(std::string("# expect: ").size());
    CAPTURE(file);
    try {
      if (entry.path().filename().string().rfind("curvature-", 0) == 0)
        import_curvature(file);
      else
        import_centerline(file, false, CenterlineOptions{});
      FAIL("no error");
    } catch (const InputError& e) {
      const std::string what = e.what();
      CHECK(what.find(expect) != std::string::npos);
      CHECK(what.rfind(file + ":", 0) == 0);
      CHECK(e.mark().line > 0);
    }
    ++seen;
  }
  CHECK(seen >= 10);
}

TEST_CASE("the surveyed Brannock Park has its segment twin's corners and apex speeds") {
  const Track twin = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Track survey = load_track(test::source_path("tracks/brannock-park-survey.yaml"));
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(0).car();
  const LapRun a = run_lap(test::configured(car), lay_out(twin, make_air(twin.air)));
  const LapRun b = run_lap(test::configured(car), lay_out(survey, make_air(survey.air)));
  REQUIRE(a.summary.corners.size() == b.summary.corners.size());
  // Where a corner starts within 5 m (measured worst 3.6 m). Apex speeds: the fit leaves some
  // of the noise in the curvature and the apex is the slowest point, so the survey's apexes are
  // slower, never faster: measured 1 to 8 % (README, "Tracks from data", the smoothing choice).
  for (std::size_t i = 0; i < a.summary.corners.size(); ++i) {
    const auto& ca = a.summary.corners[i];
    const auto& cb = b.summary.corners[i];
    CHECK(std::abs(ca.start_m - cb.start_m) < 5.0);
    CHECK(cb.apex_mps <= ca.apex_mps * 1.01);
    CHECK(cb.apex_mps >= ca.apex_mps * 0.90);
  }
  // And the lap (README, "Tracks from data", the measured example): within 0.1 % with
  // smoothing auto, which chooses about the 20 m once tuned by hand (measured 20.2 m, 0.03 %).
  CHECK(survey.profile->smoothing.automatic);
  CHECK(near(survey.profile->smoothing_m, 20.0, 0.05));
  // That table was measured with the point mass, before the axle model became the default
  // (issue 12): its laps stay within 0.1 % (measured 0.03 %).
  Car point = car;
  point.model = VehicleModel::point_mass;
  const LapRun pa = run_lap(test::configured(point), lay_out(twin, make_air(twin.air)));
  const LapRun pb = run_lap(test::configured(point), lay_out(survey, make_air(survey.air)));
  CHECK(near(pb.summary.lap_time_s, pa.summary.lap_time_s, 1e-3));
  // The axle model (the default) drives out of corners on the rear axle's grip, where what
  // curvature noise the fit leaves costs drive (the ellipse's Fx left is concave in F_y, so
  // wiggles about the mean cost more than they give): the survey is slower, measured 0.36 %
  // (80.889 s against 80.595 s; 0.48 % without roll geometry), held to 0.5 %.
  CHECK(b.summary.lap_time_s > a.summary.lap_time_s);
  CHECK(near(b.summary.lap_time_s, a.summary.lap_time_s, 5e-3));
}

TEST_CASE("a centerline with 0.5 m of noise laps within 3 % of the clean one (smoothing auto)") {
  // Brannock Park's segment layout sampled every 2 m, once clean and once with Gaussian noise of
  // 0.5 m rms on x and y (a coarse GPS survey). With smoothing auto, GCV chooses the strength for
  // each, from the data alone. Issue 13's target: the noisy lap within 3 % of the clean one
  // (measured: 0.4 to 0.6 % fast, both cars; at the old fixed 20 m another draw of the same
  // noise lapped 30 % slow with 88 corners, the Caldra GT).
  const Track twin = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Circuit c = lay_out(twin, make_air(twin.air));
  Noise noise;
  std::vector<double> x, y, nx, ny;
  for (std::size_t i = 0; i + 1 < c.mesh.size(); i += 4) {
    x.push_back(c.mesh.x_m[i]);
    y.push_back(c.mesh.y_m[i]);
    nx.push_back(c.mesh.x_m[i] + 0.5 * noise.gauss());
    ny.push_back(c.mesh.y_m[i] + 0.5 * noise.gauss());
  }
  const std::string clean_csv = test::scratch_file("import_clean_2m.csv", points_csv(x, y));
  const std::string noisy_csv = test::scratch_file("import_noisy_2m.csv", points_csv(nx, ny));
  Track clean = twin, noisy = twin;
  clean.segments.clear();
  noisy.segments.clear();
  clean.width_m.reset();
  noisy.width_m.reset();
  clean.profile = import_centerline(clean_csv, true, CenterlineOptions{});
  noisy.profile = import_centerline(noisy_csv, true, CenterlineOptions{});
  CHECK(noisy.profile->smoothing.automatic);
  // GCV's noise estimate: the 0.5 m put in, within 5 % (1370 points x 2: a standard error of
  // about 1.4 %).
  CHECK(near(noisy.profile->smoothing.noise_rms, 0.5, 0.05));
  CHECK(noisy.profile->smoothing_m > clean.profile->smoothing_m);  // noisier: smoothed more
  for (const char* file : {"cars/pellion-fr2.yaml", "cars/caldra-gt.yaml"}) {
    const ConfiguredCar car = load_car(test::source_path(file)).configured(0);
    const LapRun a = run_lap(car, lay_out(clean, make_air(twin.air)));
    const LapRun b = run_lap(car, lay_out(noisy, make_air(twin.air)));
    CAPTURE(file);
    CHECK(near(b.summary.lap_time_s, a.summary.lap_time_s, 0.03));
    // ... and the noise makes no extra corners.
    CHECK(b.summary.corners.size() == a.summary.corners.size());
  }
}

TEST_CASE("columns a data file has but lapwing does not read are named in a note") {
  std::ostringstream os;
  os << "x_m,y_m,width_m\n";
  for (int i = 0; i < 20; ++i) os << 10 * i << ",0,12\n";
  const std::string f = test::scratch_file("import_extra_column.csv", os.str());
  const PathProfile p = import_centerline(f, false, CenterlineOptions{});
  REQUIRE(p.notes.size() == 1);
  CHECK(p.notes[0].find("column 'width_m' not used") != std::string::npos);

  std::ostringstream k;
  k << "distance_m,curvature_1pm,speed_kph,bank_deg\n";
  for (int i = 0; i < 20; ++i) k << 10 * i << ",0.01,100,2\n";
  const std::string g = test::scratch_file("import_extra_column_k.csv", k.str());
  const PathProfile q = import_curvature(g);
  REQUIRE(q.notes.size() == 1);
  CHECK(q.notes[0].find("column 'speed_kph' not used") != std::string::npos);
  // bank_deg is read, in rad, one per row (+ helping a left turn).
  REQUIRE(q.bank_rad.size() == 20);
  CHECK(q.bank_rad[5] == doctest::Approx(2 * units::deg));

  // Only the columns read: no note.
  std::ostringstream plain;
  plain << "x_m,y_m\n";
  for (int i = 0; i < 20; ++i) plain << 10 * i << ",0\n";
  const std::string h = test::scratch_file("import_no_extra.csv", plain.str());
  CHECK(import_centerline(h, false, CenterlineOptions{}).notes.empty());
}

TEST_CASE("a hole in a centerline's points is a dropout warning naming its lines (the log rule)") {
  // A ring of radius 50 m, a point every 2 deg (chords 2 R sin(1 deg) = 1.745 m, the median),
  // closed. Rows 100 to 129 of 180 left out: the points either side, 62 deg apart, are
  // 2 R sin(31 deg) = 51.5 m apart (chord, closed form), over max(10 m, 4 x 1.745 m): a warning
  // naming the lines (header on line 1: point i is on line i + 2). The same rule as a log's rows
  // (README, "Tracks from data"); the ring whole, or with one point missing (3.5 m), has none.
  const double radius = 50.0;
  auto ring = [&](int skip_from, int skip_to) {
    std::vector<double> x, y;
    for (int i = 0; i < 180; ++i) {
      if (i >= skip_from && i < skip_to) continue;
      const double a = 2 * units::pi * i / 180;
      x.push_back(radius * std::sin(a));
      y.push_back(radius * (1 - std::cos(a)));
    }
    return test::scratch_file("ring_dropout.csv", points_csv(x, y));
  };
  {
    const std::string f = ring(100, 130);
    const PathProfile p = import_centerline(f, true, CenterlineOptions{});
    REQUIRE(p.warnings.size() == 1);
    const double chord = 2 * radius * std::sin(31 * units::pi / 180);
    CHECK(near(chord, 51.5, 0.0, 0.05));
    CHECK(p.warnings[0] ==
          f + ": points 51.5 m apart from line 101 to line 102 (the median is 1.75 "
              "m): a dropout (over 10 m and 4 times the median); the track across it is the fit's "
              "guess, not the road: add the missing points");
  }
  CHECK(import_centerline(ring(0, 0), true, CenterlineOptions{}).warnings.empty());
  CHECK(import_centerline(ring(50, 51), true, CenterlineOptions{}).warnings.empty());
  // Two holes: the widest named, the other counted.
  {
    std::vector<double> x, y;
    for (int i = 0; i < 180; ++i) {
      if ((i >= 20 && i < 30) || (i >= 100 && i < 130)) continue;
      const double a = 2 * units::pi * i / 180;
      x.push_back(radius * std::sin(a));
      y.push_back(radius * (1 - std::cos(a)));
    }
    const PathProfile p = import_centerline(
        test::scratch_file("ring_dropout.csv", points_csv(x, y)), true, CenterlineOptions{});
    REQUIRE(p.warnings.size() == 1);
    CHECK(p.warnings[0].find("51.5 m apart from line 91 to line 92") != std::string::npos);
    CHECK(p.warnings[0].find("(and 1 more such gap)") != std::string::npos);
  }
}
