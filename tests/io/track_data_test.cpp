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

namespace {

std::string write(const std::string& name, const std::string& text) {
  std::ofstream(name) << text;
  return name;
}

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
  CHECK(near(b.summary.lap_time_s, a.summary.lap_time_s, 1e-3));
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
  const std::string clean_csv = write("import_clean_2m.csv", points_csv(x, y));
  const std::string noisy_csv = write("import_noisy_2m.csv", points_csv(nx, ny));
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
  std::remove(clean_csv.c_str());
  std::remove(noisy_csv.c_str());
}

TEST_CASE("columns a data file has but lapwing does not read are named in a note") {
  std::ostringstream os;
  os << "x_m,y_m,width_m\n";
  for (int i = 0; i < 20; ++i) os << 10 * i << ",0,12\n";
  const std::string f = write("import_extra_column.csv", os.str());
  const PathProfile p = import_centerline(f, false, CenterlineOptions{});
  REQUIRE(p.notes.size() == 1);
  CHECK(p.notes[0].find("column 'width_m' not used") != std::string::npos);
  std::remove(f.c_str());

  std::ostringstream k;
  k << "distance_m,curvature_1pm,speed_kph,bank_deg\n";
  for (int i = 0; i < 20; ++i) k << 10 * i << ",0.01,100,2\n";
  const std::string g = write("import_extra_column_k.csv", k.str());
  const PathProfile q = import_curvature(g);
  REQUIRE(q.notes.size() == 1);
  CHECK(q.notes[0].find("column 'speed_kph' not used") != std::string::npos);
  CHECK(q.has_bank);
  std::remove(g.c_str());

  // Only the columns read: no note.
  std::ostringstream plain;
  plain << "x_m,y_m\n";
  for (int i = 0; i < 20; ++i) plain << 10 * i << ",0\n";
  const std::string h = write("import_no_extra.csv", plain.str());
  CHECK(import_centerline(h, false, CenterlineOptions{}).notes.empty());
  std::remove(h.c_str());
}
