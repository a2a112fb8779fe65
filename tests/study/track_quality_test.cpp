// The data-quality verdict: its stated thresholds (README, "Tracks from data"), and the bundled
// survey and segment tracks judged by them.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/io/car_file.hpp"
#include "lapwing/study/track_quality.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("the verdict's thresholds: good to 5 m and 1 %, usable to 10 m and 2 %, else poor") {
  CHECK(verdict_of(2.0, 0.005) == Verdict::good);
  CHECK(verdict_of(5.0, 0.01) == Verdict::good);  // the bounds belong to the better verdict
  CHECK(verdict_of(5.1, 0.0) == Verdict::usable);
  CHECK(verdict_of(1.0, 0.011) == Verdict::usable);
  CHECK(verdict_of(10.0, 0.02) == Verdict::usable);
  CHECK(verdict_of(10.5, 0.0) == Verdict::poor);
  CHECK(verdict_of(1.0, 0.021) == Verdict::poor);
  CHECK(verdict_of(std::nullopt, std::nullopt) == Verdict::good);  // segments: exact
}

TEST_CASE("the bundled survey is good; its variants are half and double the strength") {
  const Circuit c = test::bundled_circuit("tracks/brannock-park-survey.yaml");
  const ConfiguredCar car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(0);
  const SmoothingVariants v = smoothing_variants(c);
  REQUIRE(v.half);
  REQUIRE(v.twice);
  // Third differences: lambda ~ L^6, so half and double lambda are the length x 2^(-+1/6).
  const double length = c.track.profile->smoothing_m;
  CHECK(near(v.half_length_m, length * std::pow(2.0, -1.0 / 6), 1e-12));
  CHECK(near(v.double_length_m, length * std::pow(2.0, 1.0 / 6), 1e-12));
  const double lap = run_lap(car, c).summary.lap_time_s;
  const TrackQuality q = assess_track(c, v, car, "low_drag", lap);
  CHECK(q.verdict == Verdict::good);
  REQUIRE(q.spread);
  // More smoothing rounds the corners: the lap at double strength is the faster.
  CHECK(*q.lap_double_s < lap);
  CHECK(*q.lap_half_s > lap);
  CHECK(near(*q.spread, (*q.lap_half_s - *q.lap_double_s) / lap, 1e-15));
  // The survey's noise, 50 mm (tools/make-survey), as GCV estimates it: within 10 %.
  REQUIRE(q.noise_m);
  CHECK(q.noise_estimated);
  CHECK(near(*q.noise_m, 0.05, 0.1));
  CHECK(near(*q.spacing_m, 2.0, 0.01));
}

TEST_CASE("a segment track is exact: good, with no variants") {
  const Circuit c = test::bundled_circuit("tracks/brannock-park.yaml");
  const SmoothingVariants v = smoothing_variants(c);
  CHECK_FALSE(v.half);
  const ConfiguredCar car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(0);
  const TrackQuality q = assess_track(c, v, car, "low_drag", 1.0);
  CHECK(q.segments);
  CHECK(q.verdict == Verdict::good);
  CHECK_FALSE(q.spread);
}
