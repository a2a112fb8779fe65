// The data-quality verdict: its stated thresholds (README, "Tracks from data"), and the bundled
// survey and segment tracks judged by them.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/io/car_file.hpp"
#include "lapwing/path/curvature_profile.hpp"
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

TEST_CASE("a centerline made from other data reads no better than that data's verdict") {
  // `track line` writes its source's verdict as `centerline: {source_verdict}`: the line's own
  // points are 1 m apart and clean (good by the thresholds above), and without it a poor source
  // came back good (the tester's survey with a 34 m hole: poor, its line good). The verdict is
  // the worse of the two; a better source verdict does not lift a worse one.
  Circuit c = test::bundled_circuit("tracks/brannock-park-survey.yaml");
  const ConfiguredCar car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(0);
  const SmoothingVariants v = smoothing_variants(c);
  const double lap = run_lap(car, c).summary.lap_time_s;
  REQUIRE(assess_track(c, v, car, "low_drag", lap).verdict == Verdict::good);
  REQUIRE_FALSE(assess_track(c, v, car, "low_drag", lap).source_verdict);
  for (const auto& [given, expected] :
       {std::pair{"good", Verdict::good}, std::pair{"usable", Verdict::usable},
        std::pair{"poor", Verdict::poor}}) {
    c.track.profile->source_verdict = given;
    const std::string verdict = given;  // a copy: clang 14's lambdas (CAPTURE) take no binding
    CAPTURE(verdict);
    const TrackQuality q = assess_track(c, v, car, "low_drag", lap);
    REQUIRE(q.source_verdict);
    CHECK(*q.source_verdict == expected);
    CHECK(q.verdict == expected);
    CHECK(q.spread);  // the data's own figures are still measured
    // Without a car (track line without --car): the spacing and the source verdict.
    CHECK(assess_track_data(c).verdict == expected);
    CHECK_FALSE(assess_track_data(c).spread);
  }
  // A source verdict better than the data's own changes nothing: a circle of R 100 m as a
  // curvature profile with rows 12.08 m apart (2 pi R / 52) is poor by its spacing (over 10 m),
  // and stays poor with a good source.
  {
    std::vector<double> s, k;
    for (int i = 0; i <= 52; ++i) {
      s.push_back(2 * 3.14159265358979323846 * 100.0 * i / 52);
      k.push_back(0.01);
    }
    Track t = test::circle_track(100.0, 0.5);
    t.segments.clear();
    t.profile = profile_from_curvature("circle.csv", s, k, {});
    t.profile->source_verdict = "good";
    const TrackQuality q = assess_track_data(lay_out(t, make_air(t.air)));
    CHECK(near(*q.spacing_m, 12.08, 0.0, 0.005));
    CHECK(q.source_verdict == Verdict::good);
    CHECK(q.verdict == Verdict::poor);
  }
  CHECK_FALSE(verdict_named("fair"));
}
