// Compare: deltas against single runs, the splits add up, and thread-count independence.
#include <doctest/doctest.h>

#include "lapwing/base/error.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/study/compare.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE(
    "compare: deltas are differences of single runs; the split adds up; threads do not matter") {
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml"),
                                      test::bundled_circuit("tracks/saltmere-flats.yaml")};
  const Comparison one = compare(car, {0, 1}, circuits, 1);
  const Comparison two = compare(car, {0, 1}, circuits, 2);
  for (std::size_t t = 0; t < circuits.size(); ++t) {
    const auto& pt = one.tracks[t];
    const double best = run_lap(car.configured(pt.best), circuits[t]).summary.lap_time_s;
    for (std::size_t c = 0; c < 2; ++c) {
      const auto& e = pt.entries[c];
      const double lap = run_lap(car.configured(c), circuits[t]).summary.lap_time_s;
      // A study's lap takes its sweeps in two phases, run_lap's side by side: the two agree to
      // some 1e-14 of the lap (README, "Commands", on threads; 6.1e-15 at most over the bundled
      // laps), so the delta is the difference of the lone laps to 1e-12 of the lap, not of the
      // delta.
      CHECK(near(e.delta_to_best_s, lap - best, 0.0, 1e-12 * lap));
      // And to the bit the difference of the study's own laps.
      CHECK(e.delta_to_best_s ==
            e.run.summary.lap_time_s - pt.entries[pt.best].run.summary.lap_time_s);
      const double split = e.split.corners_s + e.split.braking_s + e.split.straights_s;
      CHECK(near(split, e.delta_to_best_s, 1e-9, 1e-12));
      double pieces = 0.0;
      for (const auto& p : e.pieces) pieces += p.delta_s;
      CHECK(near(pieces, e.delta_to_best_s, 1e-9, 1e-12));
      // Identical with one thread or two.
      CHECK(two.tracks[t].entries[c].run.summary.lap_time_s == e.run.summary.lap_time_s);
    }
    const std::vector<double> d = delta_trace(pt.entries[0].run.lap, pt.entries[1].run.lap);
    CHECK(near(d.back(),
               pt.entries[1].run.summary.lap_time_s - pt.entries[0].run.summary.lap_time_s, 1e-12,
               1e-15));
  }
}

TEST_CASE("compare refuses a bad car or config list before solving any lap") {
  const std::vector<Circuit> circuits{lay_out(test::circle_track(50.0, 0.5), make_air(AirSpec{}))};
  Car car = test::plain_car();
  try {
    compare(car, {0, 3}, circuits, 1);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(std::string(e.what()) ==
          "compare: error: config index 3 is not one of the car's (it has 1) (configs)");
  }
  car.front_weight = 0.0;
  try {
    compare(car, {0}, circuits, 1);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.subject() == "test.yaml");
    CHECK(e.violation().field == "front_weight");
  }
}
