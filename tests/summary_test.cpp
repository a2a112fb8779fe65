// The lap summary: sectors, corners, time shares, all consistent with the traces.
#include <doctest/doctest.h>

#include <numeric>

#include "lapwing/summary.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("sector times add up to the lap; corners hold their apex; shares are fractions") {
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(1);
  const Track track = load_track(test::source_path("tracks/saltmere-flats.yaml"));
  const Envelope env(car, make_air(track.air));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const Lap lap = solve_lap(env, mesh);
  const auto spans = find_corners(mesh);
  const LapSummary s = summarize(lap, mesh, track, spans, env);
  REQUIRE(s.sectors_s.size() == 3);
  CHECK(near(std::accumulate(s.sectors_s.begin(), s.sectors_s.end(), 0.0), s.lap_time_s, 1e-12));
  CHECK(s.corners.size() == spans.size());
  for (const auto& c : s.corners) {
    CHECK(c.start_m <= c.apex_m);
    CHECK(c.apex_m <= c.end_m);
    CHECK(c.apex_mps <= c.entry_mps);
    CHECK(c.apex_mps <= c.exit_mps);
    CHECK(c.time_s > 0.0);
  }
  CHECK(s.full_throttle_fraction > 0.0);
  CHECK(s.braking_fraction > 0.0);
  CHECK(s.full_throttle_fraction + s.braking_fraction <= 1.0);
  CHECK(s.top_speed_mps >= s.min_speed_mps);
  // Time at a distance interpolates the trace.
  CHECK(near(time_at(lap, mesh, mesh.s_m[100]), lap.time_s[100], 1e-12));
}

TEST_CASE(
    "a lone point on the steady limit between braking and drive takes no time in the shares") {
  // The car only touches its limit there (the apex of a corner without an arc): counted as its
  // own phase it took a whole step's time, whatever the step (issue 10, item 3).
  const Car car = test::plain_car();
  const Track track = test::straight_track(10.0, 1.0, 10.0);
  const Envelope env(car, make_air(track.air));
  const Mesh mesh = build_mesh(track, 1.0);
  REQUIRE(mesh.size() == 11);
  Lap lap = solve_lap(env, mesh, track.start_speed_mps);
  for (std::size_t i = 0; i < 11; ++i) {
    lap.time_s[i] = static_cast<double>(i);  // 1 s per interval
    lap.phase[i] = i < 5 ? Phase::brake : (i == 5 ? Phase::corner : Phase::accelerate);
  }
  lap.lap_time_s = 10.0;
  const LapSummary s = summarize(lap, mesh, track, {}, env);
  CHECK(s.braking_fraction == doctest::Approx(0.5).epsilon(1e-12));
  CHECK(s.full_throttle_fraction == doctest::Approx(0.5).epsilon(1e-12));
  // Two points on the limit are a stretch of it: the interval between them counts as corner,
  // and the intervals on either side half: braking 4.5 s, drive 3.5 s.
  lap.phase[6] = Phase::corner;
  const LapSummary t = summarize(lap, mesh, track, {}, env);
  CHECK(t.braking_fraction == doctest::Approx(0.45).epsilon(1e-12));
  CHECK(t.full_throttle_fraction == doctest::Approx(0.35).epsilon(1e-12));
}
