// Correlation with a logged lap: the log a known car makes, shifted, stretched and noisy, is
// aligned back and matched to within its noise; a different car is not.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/study/correlate.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {

// Brannock Park (bundled, segments) on a 1 m mesh: the laps of these tests stay fast.
Circuit brannock() {
  Track t = load_track(test::source_path("tracks/brannock-park.yaml"));
  t.mesh_m = 1.0;
  return lay_out(t, make_air(t.air));
}

ConfiguredCar medium() {
  return load_car(test::source_path("cars/pellion-fr2.yaml")).configured(1);
}

// A logged lap made from a solved one: every `every` mesh points, at log distance
// d = stretch s + offset_m, with Gaussian noise of noise_kph on the speed.
LoggedSpeed log_of(const Lap& lap, const Mesh& mesh, double offset_m, double stretch,
                   double noise_kph, std::size_t every = 2) {
  LoggedSpeed l;
  l.source = "test log";
  test::Noise noise;
  for (std::size_t i = 0; i < mesh.size(); i += every) {
    l.distance_m.push_back(stretch * mesh.s_m[i] + offset_m);
    l.speed_mps.push_back(lap.speed_mps[i] + noise_kph * noise.gauss() * units::kph);
  }
  return l;
}

}  // namespace

TEST_CASE("a car's own log, 7 m off and noisy, correlates within its noise") {
  const Circuit c = brannock();
  const LapRun run = run_lap(medium(), c);
  const LoggedSpeed log = log_of(run.lap, c.mesh, 7.0, 1.0, 0.5);
  const Correlation k = correlate(run.lap, c, log);
  // The offset to within the grid's last step and the noise's pull (0.1 m); the scale to 0.05 %
  // (0.6 m over the lap).
  CHECK(near(k.alignment.offset_m, 7.0, 0.0, 0.1));
  CHECK(near(k.alignment.scale, 1.0, 0.0, 5e-4));
  CHECK(k.coverage == doctest::Approx(1.0));
  // The RMS of the noise alone is 0.5 km/h; the bound is 1 km/h.
  CHECK(units::to_kph(k.rms_speed_error_mps) < 1.0);
  CHECK(units::to_kph(k.rms_speed_error_mps) > 0.3);  // the noise is there: not a trivial zero
  // Lap times agree to the noise's effect on 1/v (zero mean to first order): 0.05 s of ~60 s.
  CHECK(near(k.lap_time_sim_s, run.summary.lap_time_s, 1e-9));
  CHECK(near(k.lap_time_log_s, k.lap_time_sim_s, 0.0, 0.05));
  // Sectors add up to the lap; corners all covered, their errors within the noise.
  double sim = 0.0, logged = 0.0;
  for (const SectorError& s : k.sectors) sim += s.sim_s, logged += s.log_s;
  CHECK(near(sim, k.lap_time_sim_s, 1e-9));
  CHECK(near(logged, k.lap_time_log_s, 1e-9));
  REQUIRE(k.corners.size() == c.corners.size());
  for (const CornerError& e : k.corners) {
    // Smoothed over 5 m (about 3 log rows), the noise of an apex falls to ~0.3 km/h: 1 km/h.
    CHECK(std::abs(units::to_kph(e.sim_apex_mps - e.log_apex_mps)) < 1.0);
    // Braking points: the same trace, the same smoothing; but a peak's place moves by the
    // noise over the speed's slope there (0.3 km/h over ~0.3 km/h per m of a car still
    // accelerating at 0.5 g near 200 km/h, before braking): a few metres; 8 m.
    if (e.braking_error_m()) CHECK(std::abs(*e.braking_error_m()) <= 8.0);
  }
  CHECK(k.peaks.size() == correlate_peaks);
}

TEST_CASE("a log whose distance reads 1 % long is scaled back") {
  const Circuit c = brannock();
  const LapRun run = run_lap(medium(), c);
  const LoggedSpeed log = log_of(run.lap, c.mesh, 30.0, 1.01, 0.5);
  const Alignment a = align_log(log, c.mesh, run.lap.speed_mps);
  // s = scale (d - offset) with d = 1.01 s + 30: scale 1 / 1.01, offset 30 m.
  CHECK(near(a.scale, 1.0 / 1.01, 0.0, 5e-4));
  CHECK(near(a.offset_m, 30.0, 0.0, 1.0));
  const Correlation k = correlate(run.lap, c, log, a);
  CHECK(units::to_kph(k.rms_speed_error_mps) < 1.0);
}

TEST_CASE("another car's lap does not correlate within the noise, and the time delta says so") {
  const Circuit c = brannock();
  const LapRun truth = run_lap(medium(), c);
  const LoggedSpeed log = log_of(truth.lap, c.mesh, 7.0, 1.0, 0.5);
  // 10 % less grip: slower in every corner.
  const ConfiguredCar slower = medium().changed([](Car& k, AeroConfig&) {
    k.tyres.mu_lat *= 0.9;
    k.tyres.mu_long *= 0.9;
  });
  const LapRun run = run_lap(slower, c);
  const Correlation k = correlate(run.lap, c, log);
  CHECK(units::to_kph(k.rms_speed_error_mps) > 3.0);
  CHECK(k.lap_time_sim_s > k.lap_time_log_s + 1.0);
  // The running delta ends at the lap-time difference.
  CHECK(near(k.time_delta_s.back(), k.lap_time_sim_s - k.lap_time_log_s, 1e-9));
  // The slower car is slower at every apex.
  for (const CornerError& e : k.corners) CHECK(e.sim_apex_mps < e.log_apex_mps);
}

TEST_CASE("a log in the wrong unit or too short for the track is refused at a row") {
  const Circuit c = brannock();
  const LapRun run = run_lap(medium(), c);
  LoggedSpeed log = log_of(run.lap, c.mesh, 7.0, 1.0, 0.0);
  // Speeds in m/s read as km/h: 3.6 times too slow.
  LoggedSpeed slow = log;
  for (double& v : slow.speed_mps) v /= 3.6;
  try {
    (void)align_log(slow, c.mesh, run.lap.speed_mps);
    FAIL("no error");
  } catch (const InvalidInput& e) {
    CHECK(std::string(e.what()).find("--speed-unit") != std::string::npos);
    CHECK(e.violation().where().rfind("speed_mps[", 0) == 0);
  }
  // Half a lap.
  LoggedSpeed half = log;
  half.distance_m.resize(half.distance_m.size() / 2);
  half.speed_mps.resize(half.distance_m.size());
  try {
    (void)align_log(half, c.mesh, run.lap.speed_mps);
    FAIL("no error");
  } catch (const InvalidInput& e) {
    CHECK(std::string(e.what()).find("covers") != std::string::npos);
    CHECK(e.violation().where() ==
          "distance_m[" + std::to_string(half.distance_m.size() - 1) + "]");
  }
}

TEST_CASE("a log sampled in time with mph read as km/h is refused, its ratio told the right way") {
  // A log sampled every 0.1 s holds more rows in the slow corners than the fast straights: by
  // row, its median speed reads well below the lap's. The check compares both by distance, so
  // a log in mph read as km/h (1.609 times too fast: 1 mi = 1.609344 km, NIST SP 811) stands out
  // against the 1.45 bound, and one 1.609 times too slow says 0.62, not 1.61.
  const Circuit c = brannock();
  const LapRun run = run_lap(medium(), c);
  LoggedSpeed timed;
  timed.source = "timed log";
  double t_next = 0.0;
  for (std::size_t i = 0; i < c.mesh.size(); ++i) {
    if (run.lap.time_s[i] < t_next) continue;
    timed.distance_m.push_back(c.mesh.s_m[i]);
    timed.speed_mps.push_back(run.lap.speed_mps[i]);
    t_next += 0.1;
  }
  // The log as it is aligns (the check passes by distance).
  CHECK_NOTHROW((void)align_log(timed, c.mesh, run.lap.speed_mps));
  for (const double factor : {1.609344, 1.0 / 1.609344}) {
    LoggedSpeed wrong = timed;
    for (double& v : wrong.speed_mps) v *= factor;
    CAPTURE(factor);
    try {
      (void)align_log(wrong, c.mesh, run.lap.speed_mps);
      FAIL("no error");
    } catch (const InvalidInput& e) {
      const std::string what = e.what();
      CHECK(what.find(factor > 1.0 ? "is 1.61 times the simulated lap's"
                                   : "is 0.62 times the simulated lap's") != std::string::npos);
    }
  }
}
