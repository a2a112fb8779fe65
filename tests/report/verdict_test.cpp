// The verdict per track: winner, margin over the runner-up, where it is made, and the balance
// window's result.
#include <doctest/doctest.h>

#include "lapwing/report/verdict.hpp"
#include "lapwing/study/compare.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {
// A per-track result by hand: lap times and the runner-up's split, so that the sentence's
// numbers are known.
Comparison::PerTrack by_hand(const std::vector<double>& laps) {
  Comparison::PerTrack pt;
  for (double t : laps) {
    Comparison::Entry e;
    e.run.summary.lap_time_s = t;
    pt.entries.push_back(e);
  }
  pt.best = 0;
  for (std::size_t k = 1; k < laps.size(); ++k)
    if (laps[k] < laps[pt.best]) pt.best = k;
  pt.runner_up = pt.best;
  for (std::size_t k = 0; k < laps.size(); ++k)
    if (k != pt.best && (pt.runner_up == pt.best || laps[k] < laps[pt.runner_up])) pt.runner_up = k;
  pt.margin_s = laps.size() > 1 ? laps[pt.runner_up] - laps[pt.best] : 0.0;
  for (auto& e : pt.entries) e.delta_to_best_s = e.run.summary.lap_time_s - laps[pt.best];
  return pt;
}
}  // namespace

TEST_CASE("the verdict names the winner, the runner-up, the margin and where it is made") {
  Comparison::PerTrack pt = by_hand({64.5, 64.2, 65.0});
  // The runner-up (a, 0.3 s behind) loses 0.2 s in corners and 0.15 s braking, gains 0.05 s on
  // the straights: +0.2 + 0.15 - 0.05 = 0.3, the margin.
  pt.entries[0].split = TimeSplit{0.2, 0.15, -0.05};
  CHECK(verdict_sentence(pt, {"a", "b", "c"}) ==
        "b wins by 0.300 s over a: +0.200 s in corners, +0.150 s under braking, -0.050 s on "
        "straights");
  // A margin that rounds to zero at the printed precision is a tie.
  Comparison::PerTrack tie = by_hand({64.2, 64.2004});
  CHECK(verdict_sentence(tie, {"a", "b"}).rfind("a ties with b: ", 0) == 0);
  Comparison::PerTrack one = by_hand({64.25});
  CHECK(verdict_sentence(one, {"a"}) == "a: 64.250 s (the only config)");
}

TEST_CASE("the balance verdict gives the winner's result first, then who passes and who fails") {
  Comparison::PerTrack pt = by_hand({64.5, 64.2, 65.0});
  CHECK(balance_verdict(pt, {"a", "b", "c"}).empty());  // no window on the car
  const BalanceWindow w{0.38, 0.46, 150.0 / 3.6};
  BalanceWindowResult pass;
  pass.window = w;
  pass.time_s = 3.0;
  pass.margin = 0.012;
  pass.worst_at_m = 1234.0;
  pass.worst_speed_mps = 180.0 / 3.6;
  pass.worst_phase = Phase::brake;
  pass.worst_corner = 6;
  BalanceWindowResult fail = pass;
  fail.pass = false;
  fail.margin = 0.0;
  fail.worst_excursion = -0.017;
  fail.worst_corner = 0;
  fail.next_corner = 3;
  pt.entries[0].run.summary.balance.window = fail;
  pt.entries[1].run.summary.balance.window = pass;
  BalanceWindowResult none;
  none.window = w;
  pt.entries[2].run.summary.balance.window = none;
  CHECK(balance_verdict(pt, {"a", "b", "c"}) ==
        "balance window 38.0-46.0 % front above 150 km/h, > 0.5 g lateral: b passes, 1.2 points "
        "to spare at 1234 m (corner 6, brake, 180 km/h); failing: a (1.7 below, straight to 3); "
        "not reaching it: c");
}

TEST_CASE("in a real comparison the verdict's three parts add up to the margin") {
  // split_delta classifies every interval once (study/compare.hpp), so the parts of the
  // runner-up's delta sum to it: to round-off (1e-9 s).
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const Comparison c = compare(car, {0, 1}, circuits, 2);
  const auto& pt = c.tracks.front();
  REQUIRE(pt.runner_up != pt.best);
  const TimeSplit& s = pt.entries[pt.runner_up].split;
  CHECK(test::near(s.corners_s + s.braking_s + s.straights_s, pt.margin_s, 0.0, 1e-9));
  const std::string v = verdict_sentence(pt, car.config_names());
  CHECK(v.find(car.configs[pt.best].name + " wins by ") == 0);
  CHECK(v.find(" over " + car.configs[pt.runner_up].name + ": ") != std::string::npos);
}
