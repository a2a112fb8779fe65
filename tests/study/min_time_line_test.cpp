// The minimum-time refinement (Kapania, Subosits & Gerdes, J. Dyn. Sys. Meas. Control 138 (2016)
// 091005): never slower than the minimum-curvature line it starts from, each accepted pass
// faster than the one before, and it stops once a pass gains less than 0.01 s.
#include <doctest/doctest.h>

#include "lapwing/io/car_file.hpp"
#include "lapwing/path/racing_line.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/min_time_line.hpp"
#include "test_support.hpp"

using namespace lapwing;

TEST_CASE(
    "the minimum-time refinement laps faster than the minimum-curvature line it starts "
    "from") {
  // Brannock Park 12 m wide, the Pellion FR-2 (first config). The minimum-curvature line is not
  // the minimum-time line (REFERENCES.md: the gap can reach a few per cent); the refinement
  // measured 1.1 % here. It must gain at least its own stopping step, 0.01 s.
  Track t = load_track(test::source_path("tracks/brannock-park.yaml"));
  t.width_m = 12.0;
  const ConfiguredCar car = load_car(test::source_path("cars/pellion-fr2.yaml")).configured(0);
  const Air air = make_air(t.air);
  const MinTimeLine m = min_time_line(t, air, car, LineSpec{});
  CHECK(m.lap_s < m.min_curvature_lap_s - min_time_gain_s);
  REQUIRE(m.laps_s.size() >= 2);
  CHECK(m.laps_s.front() == m.min_curvature_lap_s);
  // Accepted passes only make it faster; the last pass gained less than 0.01 s (or none).
  for (std::size_t k = 1; k + 1 < m.laps_s.size(); ++k) CHECK(m.laps_s[k] < m.laps_s[k - 1]);
  const std::size_t k = m.laps_s.size() - 1;
  CHECK((m.laps_s[k - 1] - m.laps_s[k] < min_time_gain_s || m.passes == min_time_max_passes));
  // The line it returns laps in the time it reports.
  Track lined = t;
  lined.line_path = m.line;
  CHECK(run_lap(car, lay_out(lined, air)).summary.lap_time_s == m.lap_s);
}
