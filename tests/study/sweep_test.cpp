// The sweep's sets, designs and shards, and its run: what it stores does not depend on the thread
// count, shards partition the points, points a sink holds are skipped, and each row holds the
// lap against the car's balance window.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <optional>
#include <set>
#include <tuple>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/solve/summary.hpp"
#include "lapwing/study/sweep.hpp"
#include "test_support.hpp"

using namespace lapwing;

TEST_CASE("a range with units gives count values from start to stop, ends as typed") {
  const SweepSet s = parse_set("mass=620kg:680kg:4");
  CHECK(s.key == "mass");
  CHECK(s.range);
  CHECK(s.unit == "kg");
  const std::vector<SetValue> v = grid_values(s);
  REQUIRE(v.size() == 4);
  // Evenly spaced: 620 + 60 i / 3 (closed form of the grid's spacing).
  CHECK(*v[0].number == 620.0);
  CHECK(*v[1].number == 640.0);
  CHECK(*v[2].number == 660.0);
  CHECK(*v[3].number == 680.0);
  CHECK(v[1].text == "640 kg");
}

TEST_CASE("a list keeps each value's unit, and a word stays a word") {
  const SweepSet s = parse_set("aero.configs.medium.cla = 3.0 m2, 3.5 m2,axle");
  CHECK(s.key == "aero.configs.medium.cla");
  const std::vector<SetValue> v = grid_values(s);
  REQUIRE(v.size() == 3);
  CHECK(v[0].text == "3 m2");
  CHECK(v[1].text == "3.5 m2");
  CHECK_FALSE(v[2].number);
  CHECK(v[2].text == "axle");
}

TEST_CASE("bad sets, designs and shards are refused with the text given") {
  auto message = [](auto f) {
    try {
      f();
    } catch (const InvalidInput& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  CHECK(message([] { parse_set("mass"); }).find("expected KEY=VALUES") != std::string::npos);
  CHECK(message([] { parse_set("mass=600kg:0.7t:3"); }).find("one unit") != std::string::npos);
  CHECK(message([] { parse_set("mass=600:700:0"); }).find("whole number") != std::string::npos);
  CHECK(message([] { parse_set("mass=600,,700"); }).find("empty value") != std::string::npos);
  // A list's numbers in one unit, as a range's ends: its column holds them as typed (700 kg
  // and 1550 lb would read 700 and 1550 there), and a number without a unit is in the key's.
  CHECK(message([] { parse_set("mass=700kg,1550lb"); }).find("one unit ('kg' and 'lb'") !=
        std::string::npos);
  CHECK(message([] { parse_set("mass=700,710kg"); }).find("one unit ('' and 'kg'") !=
        std::string::npos);
  CHECK(message([] { parse_set("model=axle,point-mass"); }) == "no error");
  CHECK(message([] { parse_set("mass=700 kg,axle,710kg"); }) == "no error");
  CHECK(message([] { parse_design("lhs"); }).find("number of points") != std::string::npos);
  CHECK(message([] { parse_design("random:4"); }).find("grid, lhs:N") != std::string::npos);
  CHECK(message([] { parse_shard("5/4"); }).find("1 <= K <= N") != std::string::npos);
  CHECK(message([] {
          SweepPlan({parse_set("mass=1:2")}, parse_design("grid"));
        }).find("needs a count") != std::string::npos);
  CHECK(message([] {
          SweepPlan({parse_set("mass=1,2")}, parse_design("lhs:3"));
        }).find("samples ranges") != std::string::npos);
  CHECK(message([] {
          SweepPlan({parse_set("mass=1,2"), parse_set("mass=3")}, {});
        }).find("set twice") != std::string::npos);
}

TEST_CASE("the grid is the full factorial, the last set varying fastest") {
  const SweepPlan plan({parse_set("a=1,2,3"), parse_set("b=10:20:2")}, {});
  REQUIRE(plan.points() == 6);
  std::set<std::pair<double, double>> seen;
  for (std::size_t p = 0; p < plan.points(); ++p)
    seen.insert({*plan.value(p, 0).number, *plan.value(p, 1).number});
  CHECK(seen.size() == 6);  // every combination once
  CHECK(*plan.value(0, 1).number == 10.0);
  CHECK(*plan.value(1, 1).number == 20.0);
  CHECK(*plan.value(1, 0).number == 1.0);
  CHECK(*plan.value(2, 0).number == 2.0);
}

TEST_CASE("a Latin hypercube puts one point in each stratum of every dimension") {
  // The defining property (McKay, Beckman and Conover 1979): with n points, each of the n
  // intervals [i/n, (i+1)/n) of each dimension holds exactly one point.
  const std::size_t n = 50, dims = 3;
  const std::vector<double> x = latin_hypercube(n, dims, lhs_seed);
  for (std::size_t d = 0; d < dims; ++d) {
    std::vector<int> count(n, 0);
    for (std::size_t i = 0; i < n; ++i) {
      const double v = x[i * dims + d];
      REQUIRE(v >= 0.0);
      REQUIRE(v < 1.0);
      ++count[static_cast<std::size_t>(v * n)];
    }
    CHECK(std::all_of(count.begin(), count.end(), [](int c) { return c == 1; }));
  }
  CHECK(latin_hypercube(n, dims, lhs_seed) == x);      // a fixed seed: the same study again
  CHECK(latin_hypercube(n, dims, lhs_seed + 1) != x);  // and the seed matters
}

TEST_CASE("the Sobol points form a (0, m, 2)-net in base 2 in their first two dimensions") {
  // Sobol (1967); Niederreiter, "Random Number Generation and Quasi-Monte Carlo Methods" (1992):
  // the first 2^m points (the origin included) of the two-dimensional Sobol sequence put exactly
  // one point in every elementary box [i/2^a, (i+1)/2^a) x [j/2^(m-a), (j+1)/2^(m-a)).
  const int m = 6;
  const std::size_t n = std::size_t{1} << m;
  std::vector<double> x = sobol_points(n - 1, 2);
  x.insert(x.begin(), {0.0, 0.0});  // the origin, which the sweep leaves out
  CHECK(x[2] == 0.5);               // the first point after the origin is the centre
  CHECK(x[3] == 0.5);
  for (int a = 0; a <= m; ++a) {
    std::map<std::pair<long, long>, int> boxes;
    for (std::size_t i = 0; i < n; ++i)
      ++boxes[{std::lround(std::floor(x[2 * i] * (1 << a))),
               std::lround(std::floor(x[2 * i + 1] * (1 << (m - a))))}];
    CHECK(boxes.size() == n);  // n points in n distinct boxes: one each
  }
}

namespace {

// A sink in memory: rows by (point, track, config).
struct MemorySink : SweepSink {
  std::map<std::tuple<std::size_t, std::size_t, std::size_t>, double> rows;
  std::vector<std::size_t> commit_order;
  std::set<std::size_t> held;
  bool has(std::size_t point) const override { return held.count(point) > 0; }
  void commit(const std::vector<SweepRow>& r) override {
    for (const auto& row : r) {
      rows[{row.point, row.track, row.config}] = row.ok ? row.lap_time_s : -1.0;
      if (commit_order.empty() || commit_order.back() != row.point)
        commit_order.push_back(row.point);
    }
  }
};

struct Fixture {
  Circuit circuit = lay_out(test::circle_track(60.0, 2.0), make_air(AirSpec{}));
  SweepPlan plan{{parse_set("mass=500:700:5"), parse_set("mu=1.2,1.5")}, {}};
  Car at(std::size_t p) const {
    return test::plain_car(*plan.value(p, 0).number, *plan.value(p, 1).number);
  }
  MemorySink run(unsigned threads, Shard shard = {}, std::set<std::size_t> held = {}) const {
    MemorySink sink;
    sink.held = std::move(held);
    lapwing::SweepOptions o;
    o.threads = threads;
    o.shard = shard;
    o.points_per_commit = 3;
    run_sweep(
        plan, {circuit}, {test::plain_car().configs.front().name},
        [&](std::size_t p) { return at(p); }, sink, o);
    return sink;
  }
};

}  // namespace

TEST_CASE("a sweep stores the same rows in the same order on one thread or several") {
  const Fixture f;
  const MemorySink one = f.run(1), three = f.run(3);
  REQUIRE(one.rows.size() == 10);
  CHECK(one.rows == three.rows);
  CHECK(one.commit_order == three.commit_order);
  CHECK(std::is_sorted(one.commit_order.begin(), one.commit_order.end()));
  // The lap is the circle's steady corner: v = sqrt(mu g R), t = 2 pi R / v (closed form of the
  // point mass on a flat circle; the plain car has no downforce). A heavier car is not slower
  // there (mass cancels), a grippier one is faster.
  const double t12 = one.rows.at({0, 0, 0}), t15 = one.rows.at({1, 0, 0});
  CHECK(test::near(t12, 2 * units::pi * 60.0 / std::sqrt(1.2 * units::g0 * 60.0), 2e-3));
  CHECK(t15 < t12);
  CHECK(test::near(one.rows.at({2, 0, 0}), t12, 1e-9));  // 550 kg at mu 1.2: the same time
}

TEST_CASE("shards partition the points, and held points are skipped") {
  const Fixture f;
  const MemorySink all = f.run(2);
  std::map<std::tuple<std::size_t, std::size_t, std::size_t>, double> joined;
  for (std::size_t k = 1; k <= 3; ++k) {
    const MemorySink part = f.run(2, Shard{k, 3});
    for (const auto& [key, t] : part.rows) CHECK(joined.emplace(key, t).second);  // no overlap
  }
  CHECK(joined == all.rows);
  const MemorySink rest = f.run(1, {}, {0, 1, 2, 3});
  CHECK(rest.rows.size() == 6);
  CHECK(rest.rows.count({0, 0, 0}) == 0);
}

namespace {
// The window's result of each row of a one-point sweep round the 60 m circle (mu 1.2).
std::vector<std::optional<WindowResult>> window_rows(std::optional<BalanceWindow> window) {
  struct Sink : SweepSink {
    std::vector<std::optional<WindowResult>> got;
    bool has(std::size_t) const override { return false; }
    void commit(const std::vector<SweepRow>& r) override {
      for (const auto& row : r) got.push_back(row.window);
    }
  } sink;
  const Circuit circuit = lay_out(test::circle_track(60.0, 2.0), make_air(AirSpec{}));
  const SweepPlan plan({parse_set("mass=600")}, {});
  run_sweep(plan, {circuit}, {test::plain_car().configs.front().name},
            [&](std::size_t) {
              Car c = test::plain_car(600.0, 1.2);
              c.balance_window = window;
              return c;
            },
            sink, {});
  return sink.got;
}
}  // namespace

TEST_CASE("each row holds the lap against the car's balance window: pass, fail, not reached") {
  // On a flat circle the lap is the steady corner: v = sqrt(mu g R) = sqrt(1.2 g0 60 m) = 95.8
  // km/h, 1.2 g lateral (closed form of the point mass), no longitudinal acceleration, and the
  // plain car has no drag or downforce, so the front axle carries its static share, 0.45, all
  // lap (axle loads: moments about the rear contact patch, no transfer without ax or drag).
  const auto at = [](double lo, double hi, double above_kph) {
    return window_rows(BalanceWindow{lo, hi, above_kph * units::kph});
  };
  CHECK(at(0.40, 0.50, 50.0) == std::vector<std::optional<WindowResult>>{WindowResult::pass});
  CHECK(at(0.46, 0.60, 50.0) == std::vector<std::optional<WindowResult>>{WindowResult::fail});
  CHECK(at(0.30, 0.44, 50.0) == std::vector<std::optional<WindowResult>>{WindowResult::fail});
  // Never above 100 km/h: the window's conditions are not met, nothing is tested.
  CHECK(at(0.40, 0.50, 100.0) ==
        std::vector<std::optional<WindowResult>>{WindowResult::not_reached});
  // No window: no result (a NULL in the store).
  CHECK(window_rows(std::nullopt) == std::vector<std::optional<WindowResult>>{std::nullopt});
}

TEST_CASE("an ok row's message holds the warnings run gives its lap from its speeds") {
  // The Pellion FR-2's speed-table config on Brannock Park: its table begins at 100 km/h and
  // the lap's hairpins are slower, so run warns that the first row's values are held below it
  // (summary.cpp, lap_range_warnings). A sweep's row of the same car says the same in its
  // message; a config of constant coefficients has none.
  struct Sink : SweepSink {
    std::vector<SweepRow> got;
    bool has(std::size_t) const override { return false; }
    void commit(const std::vector<SweepRow>& r) override {
      got.insert(got.end(), r.begin(), r.end());
    }
  } sink;
  const Circuit circuit = test::bundled_circuit("tracks/brannock-park.yaml");
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const SweepPlan plan({parse_set("mass=640kg")}, {});
  run_sweep(plan, {circuit}, {"medium_table", "medium"}, [&](std::size_t) { return car; }, sink,
            {});
  REQUIRE(sink.got.size() == 2);
  for (const SweepRow& row : sink.got) {
    REQUIRE(row.ok);
    const std::size_t c =
        static_cast<std::size_t>(car.config_index(row.config == 0 ? "medium_table" : "medium"));
    const LapSummary s = run_lap(car.configured(c), circuit).summary;
    std::string want;
    for (std::size_t k = track_warnings(circuit.track).size(); k < s.warnings.size(); ++k)
      want += (want.empty() ? "" : "; ") + s.warnings[k];
    CHECK(row.message == want);
  }
  CHECK(sink.got[0].message.find("below the speed table's first row") != std::string::npos);
  CHECK(sink.got[1].message.empty());
}
