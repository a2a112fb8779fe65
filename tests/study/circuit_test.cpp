// A lap round a circuit: an open track's start speed the car cannot hold is the track's typed
// error (named by its key, no file position); a bad car is refused before it is solved.
#include <doctest/doctest.h>

#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/study/circuit.hpp"
#include "test_support.hpp"

using namespace lapwing;

TEST_CASE("an open track's start speed above the car's steady limit is the track's error") {
  // A 20 m radius at the start: mu g R bounds the steady speed (sqrt(1.5 x 9.81 x 20) = 17.2
  // m/s for the plain car without aero, Milliken), far below 100 m/s.
  Track t = test::straight_track(100.0, 0.5, 100.0);
  t.segments = {test::arc(20.0, units::pi / 2, true), test::straight(100.0)};
  const Circuit c = lay_out(t, make_air(t.air));
  try {
    run_lap(test::configured(test::plain_car()), c);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(e.subject() == "straight.yaml");
    CHECK(e.violation().field == "start_speed");
    CHECK(e.message().rfind("start_speed 360.0 km/h is more than the car can hold at the start (",
                            0) == 0);
  }
}

TEST_CASE("run_lap refuses a car that breaks a rule, naming the car") {
  Car car = test::plain_car();
  car.tyres.mu_lat = 0.0;
  const Circuit c = lay_out(test::circle_track(50.0, 0.5), make_air(AirSpec{}));
  try {
    run_lap(test::configured(car), c);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(std::string(e.what()) ==
          "test.yaml: error: value 0 is out of range: must be (0, 3] (tyres.mu_lat)");
  }
}

TEST_CASE("config indices must name the car's configs, once each") {
  const Car car = test::plain_car();
  CHECK(test::describe(configs_violation(car, {0})) == "none");
  CHECK(test::describe(configs_violation(car, {})) == "configs: at least one config is needed");
  CHECK(test::describe(configs_violation(car, {1})) ==
        "configs: config index 1 is not one of the car's (it has 1)");
  CHECK(test::describe(configs_violation(car, {0, 0})) == "configs: config index 0 is given twice");
}

#if defined(__linux__)
#include <sched.h>

TEST_CASE("a lone lap takes one thread where the process may run on one processor only") {
  // The second thread's hand-over spins (base/halves.hpp): with the process held to one
  // processor (taskset, a cpuset, a batch job's one core) two threads share it and each pass
  // pays the spin (lapwing_bench, Brannock Park, taskset -c 0: one lap on 2 threads 472 ns a
  // point against 104 on 1). The expected count is the affinity mask set here: one processor.
  cpu_set_t saved;
  CPU_ZERO(&saved);
  REQUIRE(sched_getaffinity(0, sizeof saved, &saved) == 0);
  int first = -1;
  for (int c = 0; c < CPU_SETSIZE && first < 0; ++c)
    if (CPU_ISSET(c, &saved)) first = c;
  REQUIRE(first >= 0);
  cpu_set_t one;
  CPU_ZERO(&one);
  CPU_SET(first, &one);
  REQUIRE(sched_setaffinity(0, sizeof one, &one) == 0);
  const unsigned threads = lone_lap_threads();
  REQUIRE(sched_setaffinity(0, sizeof saved, &saved) == 0);
  CHECK(threads == 1);
}
#endif
