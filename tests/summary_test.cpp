// The lap summary: sectors, corners, time shares, all consistent with the traces.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
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

TEST_CASE("the limiting axle is front, rear or both within the neutral band, beside its value") {
  // The band is +-0.02 of usage (summary.hpp): its edges are "both", just past them an axle.
  CHECK(limiting_axle(0.0) == "both");
  CHECK(limiting_axle(axle_neutral_band) == "both");
  CHECK(limiting_axle(-axle_neutral_band) == "both");
  CHECK(limiting_axle(0.0201) == "front");
  CHECK(limiting_axle(-0.0201) == "rear");
  // On a lap each corner's labels are read from the trace's balance_index at the same points.
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml")).configured(0);
  const Track track = load_track(test::source_path("tracks/brannock-park.yaml"));
  const Envelope env(car, make_air(track.air));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const Lap lap = solve_lap(env, mesh);
  const LapSummary s = summarize(lap, mesh, track, find_corners(mesh), env);
  REQUIRE(!s.corners.empty());
  int both = 0;
  for (const auto& c : s.corners) {
    const auto at = [&](double s_m) {
      return static_cast<std::size_t>(std::llround(s_m / mesh.step_m));
    };
    CHECK(c.apex_balance_index == lap.front_usage[at(c.apex_m)] - lap.rear_usage[at(c.apex_m)]);
    CHECK(c.entry_balance_index == lap.front_usage[at(c.start_m)] - lap.rear_usage[at(c.start_m)]);
    CHECK(c.entry_axle == limiting_axle(c.entry_balance_index));
    CHECK(c.apex_axle == limiting_axle(c.apex_balance_index));
    CHECK(c.exit_axle == limiting_axle(c.exit_balance_index));
    both += c.apex_axle == "both";
  }
  // The sports car's apexes on this track sit near neutral: some fall inside the band (what the
  // old two-way label called "front" or "rear" on a coin toss of 0.001).
  CHECK(both > 0);
  // Front-limited corners are those whose apex the front axle limits beyond the band.
  for (const auto& c : s.corners) {
    const auto& ids = s.balance.front_limited_corners;
    const bool listed = std::find(ids.begin(), ids.end(), c.id) != ids.end();
    CHECK(listed == (c.apex_axle == "front"));
  }
}
