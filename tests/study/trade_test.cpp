// Trade: sensitivities against explicit runs of edited car files, their signs, attribution.
#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <regex>
#include <sstream>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/report/compare_report.hpp"
#include "lapwing/report/trade_report.hpp"
#include "lapwing/study/compare.hpp"
#include "lapwing/study/trade.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {

std::string read(const std::string& path) {
  std::ifstream in(path);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

Car load_text(const std::string& text, const std::string& name) {
  const std::string path = "study_test_" + name + ".yaml";
  std::ofstream(path) << text;
  Car c = load_car(path);
  std::remove(path.c_str());
  return c;
}

// Replaces every number in `text` matched by `pattern` (group 1 the number) by number * f.
std::string scale_numbers(const std::string& text, const std::regex& pattern, double f) {
  std::string out;
  auto begin = std::sregex_iterator(text.begin(), text.end(), pattern);
  std::size_t at = 0;
  for (auto it = begin; it != std::sregex_iterator(); ++it) {
    const auto& m = *it;
    out += text.substr(at, static_cast<std::size_t>(m.position(1)) - at);
    std::ostringstream os;
    os.precision(17);
    os << std::stod(m.str(1)) * f;
    out += os.str();
    at = static_cast<std::size_t>(m.position(1) + m.length(1));
  }
  return out + text.substr(at);
}

double lap_of(const Car& car, const std::string& config, const Circuit& c) {
  return run_lap(car.configured(static_cast<std::size_t>(car.config_index(config))), c)
      .summary.lap_time_s;
}

}  // namespace

TEST_CASE("sensitivities equal two explicit runs of the car file edited by +-step (1e-9)") {
  const std::string text = read(test::source_path("cars/pellion-fr2.yaml"));
  const Car car = load_text(text, "base");
  const std::size_t high = static_cast<std::size_t>(car.config_index("high"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const double h = 0.02;
  const Trade t = trade(car, {high}, circuits, TradeOptions{h, 3, 0.15}, 2);
  REQUIRE(t.sensitivities.size() == 1);
  const Sensitivity& s = t.sensitivities.front();
  // The edits a person would make in the file.
  struct Edit {
    std::regex pattern;
    double nominal, got;
  };
  const Edit edits[] = {
      {std::regex(R"(high: +\{cda: [0-9.]+ m2, cla: ([0-9.]+))"), 4.3, s.dt_dcla_s_per_m2},
      {std::regex(R"(high: +\{cda: ([0-9.]+))"), 1.38, s.dt_dcda_s_per_m2},
      {std::regex(R"(\nmass: ([0-9.]+))"), 640.0, s.dt_dmass_s_per_kg},
      // Power: every torque value of the curve, one at a time (power per percent: x = 100 %).
      {std::regex(R"(torque: \[([0-9.]+))"), 100.0, s.dt_dpower_s_per_percent},
  };
  auto edited = [&](const Edit& e, double f) {
    std::string out = scale_numbers(text, e.pattern, f);
    if (&e == &edits[3])
      for (const char* value : {"390", "420", "395", "350"})
        out = scale_numbers(out, std::regex(std::string(", (") + value + ")(?=[,\\]])"), f);
    return out;
  };
  for (const Edit& e : edits) {
    const Car up = load_text(edited(e, 1 + h), "up");
    const Car down = load_text(edited(e, 1 - h), "down");
    const double explicit_rate =
        (lap_of(up, "high", circuits[0]) - lap_of(down, "high", circuits[0])) / (2 * h * e.nominal);
    CAPTURE(e.nominal);
    CHECK(explicit_rate != 0.0);
    CHECK(near(e.got, explicit_rate, 1e-9));
  }
}

TEST_CASE("signs: downforce pays on the tight track, drag and mass cost everywhere, power pays") {
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml"),
                                      test::bundled_circuit("tracks/saltmere-flats.yaml"),
                                      test::bundled_circuit("tracks/cairnholt.yaml")};
  const Trade t = trade(car, {1}, circuits, TradeOptions{0.02, 3, 0.15}, 0);
  for (const Sensitivity& s : t.sensitivities) {
    CAPTURE(circuits[s.track].track.name);
    CHECK(s.dt_dcda_s_per_m2 > 0.0);
    CHECK(s.dt_dmass_s_per_kg > 0.0);
    CHECK(s.dt_dpower_s_per_percent < 0.0);
    if (s.track == 0) CHECK(s.dt_dcla_s_per_m2 < 0.0);  // Brannock Park: tight and slow
  }
  // Common practice (REFERENCES, facts of the trade): drag weighs most where straights are
  // long, so one m2 of downforce may cost less drag at the fast track than at the tight one.
  REQUIRE(
      (t.sensitivities[0].breakeven_dcda_per_dcla && t.sensitivities[1].breakeven_dcda_per_dcla));
  CHECK(*t.sensitivities[1].breakeven_dcda_per_dcla < *t.sensitivities[0].breakeven_dcda_per_dcla);
}

TEST_CASE("no exchange rate where more drag does not cost: the skid pad's drag moment") {
  // On the skid pad more CdA is faster for the Pellion FR-2 (its drag, acting above the ground,
  // moves load onto the rear axle that limits it: tester's finding, with drag_height 0 the
  // sensitivity turns positive). Downforce and drag then both help: no exchange rate (the ratio
  // read -4.8 m2, meaningless), null in trade.json and "-" in the table.
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/skidpad.yaml")};
  const Trade t = trade(car, {1}, circuits, TradeOptions{0.02, 3, 0.15}, 0);
  REQUIRE(t.sensitivities.size() == 1);
  const Sensitivity& s = t.sensitivities[0];
  CHECK(s.dt_dcda_s_per_m2 < 0.0);
  CHECK(s.dt_dcla_s_per_m2 < 0.0);
  CHECK_FALSE(s.breakeven_dcda_per_dcla);
  CHECK(trade_json(car, t, circuits).find("\"breakeven_dcda_per_dcla\": null") !=
        std::string::npos);
}

TEST_CASE("attribution: ClA and CdA terms plus the residual make the lap-time difference") {
  const std::string configs =
      "    a: {cda: 1.2, cla: 3.6, balance: 0.42}\n"
      "    b: {cda: 1.2, cla: 3.672, balance: 0.42}\n"  // +2 % ClA only
      "    c: {cda: 1.26, cla: 3.6, balance: 0.42}\n";  // +5 % CdA only
  std::string text = read(test::source_path("cars/pellion-fr2.yaml"));
  text = text.substr(0, text.find("  configs:")) + "  configs:\n" + configs;
  const Car car = load_text(text, "attr");
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/cairnholt.yaml")};
  const Trade t = trade(car, {0}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  REQUIRE(t.attributions.size() == 3);
  for (const Attribution& a : t.attributions) {
    // The total is the difference of the two laps run on their own.
    const double ta = run_lap(car.configured(a.a), circuits[0]).summary.lap_time_s;
    const double tb = run_lap(car.configured(a.b), circuits[0]).summary.lap_time_s;
    CHECK(near(a.total_s, tb - ta, 1e-12));
    CHECK(near(a.from_cla_s + a.from_cda_s + a.residual_s, a.total_s, 1e-12, 1e-15));
  }
  // A change of ClA alone is explained by the ClA term to second order: 2 % of ClA leaves a
  // residual of a few percent at most.
  const Attribution& ab = t.attributions[0];
  CHECK(ab.from_cda_s == 0.0);
  CHECK(std::abs(ab.residual_s) < 0.05 * std::abs(ab.total_s));
  const Attribution& ac = t.attributions[1];
  CHECK(ac.from_cla_s == 0.0);
  CHECK(std::abs(ac.residual_s) < 0.05 * std::abs(ac.total_s));
}

TEST_CASE("attribution takes a speed table's ClA at the lap's operating point, not its first row") {
  // b is a speed table whose first row (0 m/s) has ClA 1.0 but which holds ClA 3.8 from
  // 10 m/s up; the lap never drops to 10 m/s, so b flies exactly as the constant config c
  // (ClA 3.8). Its operating point is ClA 3.8, and a -> b splits as a -> c does. Taking the
  // first row instead would give a ClA change of -2.6 m2 and flip the sign of the ClA term.
  const std::string configs =
      "    a: {cda: 1.2, cla: 3.6, balance: 0.42}\n"
      "    b: {speed_table: {speed: [0, 10, 200], cda: [1.2, 1.2, 1.2], cla: [1.0, 3.8, 3.8],"
      " balance: [0.42, 0.42, 0.42]}}\n"
      "    c: {cda: 1.2, cla: 3.8, balance: 0.42}\n";
  std::string text = read(test::source_path("cars/pellion-fr2.yaml"));
  text = text.substr(0, text.find("  configs:")) + "  configs:\n" + configs;
  const Car car = load_text(text, "op");
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const LapRun rb = run_lap(car.configured(1), circuits[0]);
  // The lap stays clear of the rows below 10 m/s (with the envelope's row spacing to spare).
  REQUIRE(rb.summary.min_speed_mps > 12.0);
  const Trade t = trade(car, {0}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  REQUIRE(t.operating.size() == 3);
  // Tolerance: 0.5 rho C is stored and read back as C (two roundings): 1e-12.
  CHECK(near(t.operating[1].cla_m2, 3.8, 1e-12));
  CHECK(near(t.operating[1].cda_m2, 1.2, 1e-12));
  CHECK(t.operating[2].cla_m2 == 3.8);  // a constant config: its value itself
  REQUIRE(t.attributions.size() == 3);
  const Attribution& ab = t.attributions[0];  // a -> b
  const Attribution& ac = t.attributions[1];  // a -> c
  REQUIRE((ab.b == 1 && ac.b == 2));
  CHECK(near(ab.delta_cla_m2, 0.2, 1e-9));
  // b and c fly the same lap; the steady limits' root finder (36 bits, ~1e-11 of a speed)
  // may stop at other points of the two envelopes' rows: 1e-9 s on a 65 s lap.
  CHECK(near(ab.total_s, ac.total_s, 0.0, 1e-9));
  CHECK(near(ab.from_cla_s, ac.from_cla_s, 1e-9, 1e-15));
  // More downforce pays at this tight circuit: both terms negative.
  CHECK(ab.from_cla_s < 0.0);
  CHECK(ab.total_s < 0.0);
}

TEST_CASE("trade prints no shares of a total under 0.05 s and flags a split the residual rules") {
  const std::string configs =
      "    a: {cda: 1.2, cla: 3.6, balance: 0.42}\n"
      "    b: {cda: 1.2, cla: 3.601, balance: 0.42}\n"  // a thousandth of a m2: ~1 ms
      "    c: {cda: 1.2, cla: 3.96, balance: 0.42}\n"   // +10 % ClA: ~0.5 s, first order holds
      "    d: {cda: 1.2, cla: 3.6, balance: 0.42, mass: 700 kg}\n";  // no aero change at all
  std::string text = read(test::source_path("cars/pellion-fr2.yaml"));
  text = text.substr(0, text.find("  configs:")) + "  configs:\n" + configs;
  const Car car = load_text(text, "shares");
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const Trade t = trade(car, {0}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  REQUIRE(t.attributions.size() == 6);
  const Attribution& ab = t.attributions[0];
  const Attribution& ac = t.attributions[1];
  const Attribution& ad = t.attributions[2];
  REQUIRE(std::abs(ab.total_s) < attribution_share_min_total_s);
  REQUIRE(std::abs(ac.total_s) > attribution_share_min_total_s);
  // d differs from a by mass alone: ClA and CdA explain none of it, the residual is the total.
  CHECK(ad.from_cla_s == 0.0);
  CHECK(ad.from_cda_s == 0.0);
  CHECK(ad.residual_s == ad.total_s);
  CHECK_FALSE(ad.first_order_reliable);
  CHECK(ac.first_order_reliable);
  // The terminal: one line per pair from a; shares only where the total is 0.05 s or more, and
  // the flag in words.
  const std::string table = trade_table(car, t, circuits);
  auto line_of = [&](const std::string& change) {
    const std::size_t at = table.find(change);
    REQUIRE(at != std::string::npos);
    return table.substr(at, table.find('\n', at) - at);
  };
  CHECK(line_of("a -> b").find('%') == std::string::npos);
  CHECK(line_of("a -> c").find('%') != std::string::npos);
  CHECK(line_of("a -> c").find("not reliable") == std::string::npos);
  CHECK(line_of("a -> d").find("first-order split not reliable for this pair") !=
        std::string::npos);
  // Only the changes to or from the traded config (a) are printed, and the caption says so
  // and where the rest are (README, "Commands"); trade.json holds all six pairs.
  CHECK(table.find("b -> c") == std::string::npos);
  CHECK(table.find("c -> d") == std::string::npos);
  CHECK(table.find("the changes to or from a traded config, every pair in trade.json") !=
        std::string::npos);
  const std::string all = trade_json(car, t, circuits);
  CHECK(all.find("\"from\": \"b\",\n      \"to\": \"c\"") != std::string::npos);
  // trade.json: the same flag as a boolean and the words.
  const std::string json = trade_json(car, t, circuits);
  CHECK(json.find("\"first_order_reliable\": false") != std::string::npos);
  CHECK(json.find("\"note\": \"first-order split not reliable for this pair\"") !=
        std::string::npos);
}

TEST_CASE("a car without aero still has aero sensitivities (zero areas move by the step in m2)") {
  const Car car = load_car(test::source_path("tests/data/no-aero-car.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const Trade t = trade(car, {0}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  const Sensitivity& s = t.sensitivities.front();
  CHECK(std::isfinite(s.dt_dcla_s_per_m2));
  CHECK(std::isfinite(s.dt_dcda_s_per_m2));
  CHECK(s.dt_dcla_s_per_m2 < 0.0);
  CHECK(s.dt_dcda_s_per_m2 > 0.0);
  // Against two explicit runs with +-0.02 m2 of ClA (1e-9). -0.02 m2 is lift, outside a car
  // file's range: the run takes the car unchecked, as the trade does.
  const ConfiguredCar base = car.configured(0);
  auto lap = [&](const ConfiguredCar& c) {
    const Envelope env(Envelope::Unchecked{}, c, circuits[0].air);
    LapSolver solver;
    return solve_speed_only(env, circuits[0], solver).lap_time_s;
  };
  const double up = lap(shifted(base, Knob::cla, 0.02));
  const double down = lap(shifted(base, Knob::cla, -0.02));
  CHECK(near(s.dt_dcla_s_per_m2, (up - down) / 0.04, 1e-9));
  for (double v : t.grids.front().lap_time_s) CHECK(std::isfinite(v));
  // The grid's axes (README, "Commands"): no negative ClA or CdA, which no car has (the axes
  // once ran -0.2 to 0.2 m2 here, 56 of 81 nodes negative); from 0 up to at least the span.
  const TradeGrid& g = t.grids.front();
  for (const auto* axis : {&g.cla_m2, &g.cda_m2}) {
    CHECK(axis->front() == 0.0);
    CHECK(axis->back() >= 0.15);
    for (double v : *axis) CHECK(v >= 0.0);
  }
}

TEST_CASE("an area of a square millimetre or less trades as none (moved in m2, not scaled)") {
  // A robustness campaign's: a config with a subnormal CdA (or ClA) was scaled to the grid's
  // other configs by their area over it, which overflowed, and the trade stopped in the solver.
  Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  for (double& cda : car.configs[0].cda_m2) cda = 5e-324;
  CHECK(zero_area(car.configs[0], Knob::cda));
  CHECK_FALSE(zero_area(car.configs[0], Knob::cla));
  car.configs[0].cda_m2.front() = 2e-6;  // two square millimetres: an area to scale
  CHECK_FALSE(zero_area(car.configs[0], Knob::cda));
  for (double& cla : car.configs[1].cla_m2) cla = 1e-300;
  CHECK(zero_area(car.configs[1], Knob::cla));
  car.configs[0].cda_m2.front() = 5e-324;
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const Trade t = trade(car, {0, 1}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  for (const Sensitivity& s : t.sensitivities) {
    CHECK(std::isfinite(s.dt_dcla_s_per_m2));
    CHECK(std::isfinite(s.dt_dcda_s_per_m2));
  }
  for (const TradeGrid& g : t.grids)
    for (double v : g.lap_time_s) CHECK(std::isfinite(v));
}

TEST_CASE("trade options out of range are a typed error, not a failure inside the root finder") {
  // Issue 11: TradeOptions{grid_points = 1} divided by grid_points - 1 = 0.
  CHECK(test::describe(TradeOptions{}.validate()) == "none");
  CHECK(test::describe(TradeOptions{0.02, 1, 0.15}.validate()) ==
        "grid_points: value 1 is out of range: must be [3, 41]");
  CHECK(test::describe(TradeOptions{0.0, 9, 0.15}.validate()) ==
        "step: value 0 is out of range: must be [0.001, 0.5]");
  // Issue 19, finding 12: a step of 1e-300 leaves x (1 + step) == x and every sensitivity 0.
  CHECK(test::describe(TradeOptions{1e-300, 9, 0.15}.validate()) ==
        "step: value 1e-300 is out of range: must be [0.001, 0.5]");
  CHECK(test::describe(TradeOptions{1e-3, 9, 0.15}.validate()) == "none");
  CHECK(test::describe(TradeOptions{0.02, 9, 0.95}.validate()) ==
        "grid_span: value 0.95 is out of range: must be (0, 0.9]");
  const Car car = test::plain_car();
  const std::vector<Circuit> circuits{lay_out(test::circle_track(50.0, 0.5), make_air(AirSpec{}))};
  try {
    trade(car, {0}, circuits, TradeOptions{0.02, 1, 0.15}, 1);
    FAIL("expected an InvalidInput");
  } catch (const InvalidInput& e) {
    CHECK(std::string(e.what()) ==
          "trade options: error: value 1 is out of range: must be [3, 41] (grid_points)");
  }
  CHECK_THROWS_AS(trade(car, {}, circuits, TradeOptions{}, 1), InvalidInput);
  Car heavy = car;
  heavy.mass_kg = 2e5;
  CHECK_THROWS_AS(trade(heavy, {0}, circuits, TradeOptions{}, 1), InvalidInput);
}

TEST_CASE("the trade grid spans every config of the car with a margin, so each can be marked") {
  // Issue 17: a +-15 % grid around one config left most of the car's configs off the map.
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml")};
  const std::size_t traded = 1;  // medium
  const Trade t = trade(car, {traded}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  const TradeGrid& g = t.grids.front();
  REQUIRE(g.cla_m2.size() == 3);
  REQUIRE(t.operating.size() == car.configs.size());
  REQUIRE(t.own_lap_time_s.size() == car.configs.size());
  double lo = 1e9, hi = -1e9;
  for (const auto& op : t.operating) {
    CHECK(op.cla_m2 > g.cla_m2.front());
    CHECK(op.cla_m2 < g.cla_m2.back());
    CHECK(op.cda_m2 > g.cda_m2.front());
    CHECK(op.cda_m2 < g.cda_m2.back());
    lo = std::min(lo, op.cla_m2);
    hi = std::max(hi, op.cla_m2);
  }
  // The configs' ClA range (2.9 .. 4.3 m2, wider than +-15 % of medium's 3.6) plus 10 % of the
  // range each side.
  CHECK(near(g.cla_m2.front(), lo - grid_margin * (hi - lo), 1e-12));
  CHECK(near(g.cla_m2.back(), hi + grid_margin * (hi - lo), 1e-12));
  // A node is the traded config with its areas scaled there: the same lap as an explicit run
  // (same solver, same inputs: to round-off).
  const ConfiguredCar base = car.configured(traded);
  const ConfiguredCar node =
      scaled(scaled(base, Knob::cla, g.cla_m2[2] / 3.6), Knob::cda, g.cda_m2[0] / 1.20);
  CHECK(near(g.lap_time_s[2 * 3 + 0], run_lap(node, circuits[0]).summary.lap_time_s, 1e-12));
  // Each config's own lap time comes with its operating point.
  CHECK(near(t.own_lap_time_s[traded], t.sensitivities.front().lap_time_s, 0.0));
}

TEST_CASE("a closed lap that ends above its start warns in every lap: run, compare and trade") {
  // A circle of R 50 m climbing 1 % all the way: its end is 0.01 x 2 pi 50 = 3.14 m above its
  // start (closed form), over max(1 m, 0.1 % of its 314 m): the track's warning (path/mesh.hpp,
  // track_warnings) is each lap's first, in the lap summary (run's text and summary.json),
  // compare's table and trade's table and trade.json.
  Track track = test::circle_track(50.0, 0.5);
  track.segments = {test::arc(50.0, units::pi, true), test::arc(50.0, units::pi, true)};
  for (Segment& s : track.segments) s.grade = 0.01;
  const std::vector<Circuit> circuits{lay_out(track, make_air(track.air))};
  const Car car = test::plain_car();
  const std::string warning = "the closed lap ends 3.14 m above its start";
  const LapSummary s = run_lap(test::configured(car), circuits.front()).summary;
  REQUIRE_FALSE(s.warnings.empty());
  CHECK(s.warnings.front().rfind(warning, 0) == 0);
  const Comparison c = compare(car, {0}, circuits, 1);
  CHECK(compare_table(car, c, circuits).find("warning: " + warning) != std::string::npos);
  const Trade t = trade(car, {0}, circuits, TradeOptions{0.02, 3, 0.15}, 1);
  CHECK(trade_table(car, t, circuits).find("warning: circle: " + warning) != std::string::npos);
  CHECK(trade_json(car, t, circuits).find("\"warnings\": [\n        \"" + warning) !=
        std::string::npos);
  // Level: none of them warns.
  for (Segment& seg : track.segments) seg.grade = 0.0;
  const std::vector<Circuit> level{lay_out(track, make_air(track.air))};
  CHECK(run_lap(test::configured(car), level.front()).summary.warnings.empty());
  CHECK(trade_table(car, trade(car, {0}, level, TradeOptions{0.02, 3, 0.15}, 1), level)
            .find("warning") == std::string::npos);
}

TEST_CASE("trade carries each config's own lap's warnings, as run gives them") {
  // The point mass on Cairnholt: every config's rear axle reads beyond its grip (the point
  // mass's warning, summary.cpp), and the speed table's config runs below its first row. A trade
  // stands on those laps (its perturbed laps are them moved by the step), so it says what run
  // says of each: in its text for every config, in trade.json beside the traded one's figures.
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  car.model = VehicleModel::point_mass;
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/cairnholt.yaml")};
  const std::size_t table = static_cast<std::size_t>(car.config_index("medium_table"));
  const Trade t = trade(car, {table}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  REQUIRE(t.own_warnings.size() == car.configs.size());
  const std::string text = trade_table(car, t, circuits);
  const std::string json = trade_json(car, t, circuits);
  std::size_t warned = 0;
  for (std::size_t c = 0; c < car.configs.size(); ++c) {
    const LapSummary s = run_lap(car.configured(c), circuits.front()).summary;
    const std::size_t from_track = track_warnings(circuits.front().track).size();
    const std::vector<std::string> own(s.warnings.begin() + static_cast<std::ptrdiff_t>(from_track),
                                       s.warnings.end());
    CHECK(t.own_warnings[c] == own);
    for (const std::string& w : own) {
      CHECK(text.find("warning: cairnholt, " + car.configs[c].name + ": " + w) !=
            std::string::npos);
      if (c == table) CHECK(json.find("\"" + w + "\"") != std::string::npos);
    }
    warned += !own.empty();
  }
  CHECK(warned == car.configs.size());
  CHECK(t.own_warnings[table].size() >= 2);  // the table's range and the axle beyond its grip
}

TEST_CASE("the trade grid keeps a straight-line trim's car within the file's rules") {
  // high_trim: ClA 4.3 m2 and a trim of -0.9 m2 on the straights. A grid of span 90 % reached
  // down to ClA 0, where the trimmed ClA is below 0: the trade failed with the car file's error
  // at 0 km/h and named no grid (a helper's finding). Its ClA axis now starts where the trimmed
  // rows stay at 0 or above, 0.9 m2 (4.3 f - 0.9 >= 0, closed form), and the trade runs.
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const std::size_t trim = static_cast<std::size_t>(car.config_index("high_trim"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/skidpad.yaml")};
  const Trade t = trade(car, {trim}, circuits, TradeOptions{0.02, 3, 0.9}, 2);
  REQUIRE(t.grids.size() == 1);
  CHECK(near(t.grids[0].cla_m2.front(), 0.9, 1e-12));
  for (double lap : t.grids[0].lap_time_s) CHECK(std::isfinite(lap));
}
