// Aero data forms reduced to the coefficients the solver uses: each form that stands for a
// constant configuration gives that configuration's lap; the lever rule; ride heights at speed.
#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <string>

#include "lapwing/base/units.hpp"
#include "lapwing/model/aero.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {

// The bundled formula car with its configs replaced by `configs` (YAML text, indented 4).
Car car_with(const std::string& configs, const std::string& name) {
  std::ifstream in(test::source_path("cars/pellion-fr2.yaml"));
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  text = text.substr(0, text.find("  configs:")) + "  configs:\n" + configs;
  const std::string path = "aero_test_" + name + ".yaml";
  std::ofstream(path) << text;
  Car car = load_car(path);
  std::remove(path.c_str());
  return car;
}

double lap_time(const Car& car, std::size_t config, const std::string& track_file) {
  const Track track = load_track(test::source_path(track_file));
  const Envelope env(car.configured(config), make_air(track.air));
  return solve_lap(env, build_mesh(track, track.mesh_m)).lap_time_s;
}

}  // namespace

TEST_CASE("lever rule on a hand-worked two-part example") {
  // L = 3 m. Front wing 1000 N at x = -0.5 m: (3 + 0.5) / 3 = 7/6 of it on the front axle,
  // i.e. 1166.67 N front and -166.67 N rear. Rear wing 2000 N at x = 3.5 m: (3 - 3.5) / 3 =
  // -1/6 on the front, -333.33 N. Front axle 833.33 N of 3000 N: balance 0.27778.
  // Drag 200 N at z = 0.2 and 600 N at z = 1.0: height (40 + 600) / 800 = 0.8 m.
  // q = 0.5 * 1.2 * 40^2 = 960 Pa: CdA = 800 / 960, ClA = 3000 / 960.
  const std::vector<AeroPart> parts{{"front wing", 200.0, 1000.0, -0.5, 0.2},
                                    {"rear wing", 600.0, 2000.0, 3.5, 1.0}};
  const PartsReduction r = reduce_parts(parts, 40.0, 1.2, 3.0);
  CHECK(near(r.balance, 2.5 / 9.0, 1e-12));
  CHECK(near(r.drag_height_m, 0.8, 1e-12));
  CHECK(near(r.cda_m2, 800.0 / 960.0, 1e-12));
  CHECK(near(r.cla_m2, 3000.0 / 960.0, 1e-12));
}

TEST_CASE(
    "a parts table, a flat speed table and a flat map equal to a constant config give its lap "
    "(1e-9)") {
  // Parts at 50 m/s, 1.225 kg/m3 (q = 1531.25 Pa) summing to CdA 1.2, ClA 3.6, balance 0.42
  // (lever rule: 0.42 of 5512.5 N on the front axle), drag height 0.42 m.
  const std::string configs =
      "    constant: {cda: 1.2, cla: 3.6, balance: 0.42, drag_height: 0.42}\n"
      "    parts:\n"
      "      forces:\n"
      "        speed: 50 m/s\n"
      "        density: 1.225\n"
      "        parts:\n"
      "          - {name: a, drag: 918.75 N, downforce: 2315.25 N, x: 0 m, z: 0.42 m}\n"
      "          - {name: b, drag: 918.75 N, downforce: 3197.25 N, x: 2.9 m, z: 0.42 m}\n"
      "    table:\n"
      "      speed_table: {speed: [20, 50, 90], cda: [1.2, 1.2, 1.2], cla: [3.6, 3.6, 3.6],\n"
      "                    balance: [0.42, 0.42, 0.42]}\n"
      "      drag_height: 0.42\n"
      "    flat_map:\n"
      "      ride_height_map:\n"
      "        front: [0.01, 0.05]\n"
      "        rear: [0.03, 0.09]\n"
      "        cda: [[1.2, 1.2], [1.2, 1.2]]\n"
      "        cla: [[3.6, 3.6], [3.6, 3.6]]\n"
      "        balance: [[0.42, 0.42], [0.42, 0.42]]\n"
      "      static_ride_height: {front: 0.03, rear: 0.06}\n"
      "      heave_stiffness: {front: 200 N/mm, rear: 250 N/mm}\n"
      "      drag_height: 0.42\n";
  const Car car = car_with(configs, "forms");
  REQUIRE(car.configs.size() == 4);
  CHECK(car.configs[1].form == AeroConfig::Form::forces);
  CHECK(near(car.configs[1].cda_m2.front(), 1.2, 1e-12));
  CHECK(near(car.configs[1].balance.front(), 0.42, 1e-12));
  CHECK(near(*car.configs[1].drag_height_m, 0.42, 1e-12));
  for (const char* track : {"tracks/brannock-park.yaml", "tracks/cairnholt.yaml"}) {
    const double reference = lap_time(car, 0, track);
    for (std::size_t c = 1; c < 4; ++c) {
      CAPTURE(track);
      CAPTURE(car.configs[c].name);
      CHECK(near(lap_time(car, c, track), reference, 1e-9));
    }
  }
}

TEST_CASE("very stiff springs hold the map at its static point") {
  const std::string configs =
      "    stiff:\n"
      "      ride_height_map:\n"
      "        front: [0.0, 0.1]\n"
      "        rear: [0.0, 0.2]\n"
      "        cda: [[1.3, 1.1], [1.2, 1.0]]\n"
      "        cla: [[5.0, 4.0], [3.0, 2.0]]\n"
      "        balance: [[0.46, 0.44], [0.42, 0.40]]\n"
      "      static_ride_height: {front: 0.03, rear: 0.06}\n"
      "      heave_stiffness: {front: 1000000 N/mm, rear: 1000000 N/mm}\n";
  const Car car = car_with(configs, "stiff");
  const Envelope env(car.configured(0), make_air(AirSpec{}));
  const MapCoefficients at_rest = map_coefficients(*car.configs[0].map, 0.03, 0.06);
  for (double v : {0.0, 40.0, 80.0}) {
    const AeroPoint p = env.aero_point(v);
    // Deflection at 80 m/s is below 20 um (load < 20 kN over 1e9 N/m); the map's slope is at
    // most 20 m2/m, so the coefficients move by less than 4e-4 m2.
    CHECK(near(p.cla_m2, at_rest.cla_m2, 0.0, 4e-4));
    CHECK(near(p.cda_m2, at_rest.cda_m2, 0.0, 4e-4));
    CHECK(near(p.balance, at_rest.balance, 0.0, 1e-4));
  }
}

TEST_CASE("a map whose ClA rises as the front drops: faster steady circle, matching bisection") {
  // ClA = 5 - 20 h_f (rear-independent), balance 0.5, no drag. Front axle aero load
  // F_f = q ClA / 2, so h_f = h0 - q (5 - 20 h_f) / (2 k); the steady circle speed on radius R
  // solves v^2 (1 - mu rho ClA(v) R / (2 m)) = mu g R (REFERENCES, steady circle with downforce).
  const double h0 = 0.05, k = 2e5, radius = 60.0;
  const std::string configs =
      "    ground_effect:\n"
      "      ride_height_map:\n"
      "        front: [0.0, 0.1]\n"
      "        rear: [0.0, 0.2]\n"
      "        cda: [[0, 0], [0, 0]]\n"
      "        cla: [[5.0, 5.0], [3.0, 3.0]]\n"
      "        balance: [[0.5, 0.5], [0.5, 0.5]]\n"
      "      static_ride_height: {front: 0.05, rear: 0.1}\n"
      "      heave_stiffness: {front: 200 N/mm, rear: 200 N/mm}\n";
  Car car = car_with(configs, "ground");
  // The closed form above is the point mass's (the whole car's tyres as one, mu (W + DF)): the
  // axle model, the default since issue 12, and the file's roll geometry are cleared.
  car.model = VehicleModel::point_mass;
  car.roll.reset();
  car.tyres.load_sensitivity = 0.0;
  car.tyres.rolling_resistance = 0.0;
  car.drag_height_m = 0.0;
  const Air air = make_air(AirSpec{});
  const double rho = air.density_kg_m3, mu = car.tyres.mu_lat, m = car.mass_kg;
  auto cla_at = [&](double v) {
    const double q = 0.5 * rho * v * v;
    const double hf = (h0 - q * 5.0 / (2 * k)) / (1.0 - q * 20.0 / (2 * k));
    return 5.0 - 20.0 * hf;
  };
  auto excess = [&](double v) {
    return v * v * (1.0 - mu * rho * cla_at(v) * radius / (2 * m)) - mu * units::g0 * radius;
  };
  double lo = 1.0, hi = 80.0;  // excess(lo) < 0 < excess(hi)
  REQUIRE(excess(lo) < 0.0);
  REQUIRE(excess(hi) > 0.0);
  for (int i = 0; i < 200; ++i) {
    const double mid = 0.5 * (lo + hi);
    (excess(mid) < 0.0 ? lo : hi) = mid;
  }
  const double v_bisect = 0.5 * (lo + hi);
  const double cla_static = 5.0 - 20.0 * h0;
  const double v_static =
      std::sqrt(mu * units::g0 * radius / (1.0 - mu * rho * cla_static * radius / (2 * m)));

  const Envelope env(car.configured(0), air);
  const Mesh mesh = build_mesh(test::circle_track(radius, 0.5), 0.5);
  const Lap lap = solve_lap(env, mesh);
  const double v = lap.speed_mps[mesh.size() / 2];
  CHECK(v > v_static * 1.005);
  // The envelope holds the map's solution every 0.5 m/s, linear between: 1e-4.
  CHECK(near(v, v_bisect, 1e-4));
}

TEST_CASE("a map's ride heights fall with speed as the springs deflect") {
  RideHeightMap map;
  map.front_m = {0.0, 0.1};
  map.rear_m = {0.0, 0.2};
  map.cda_m2 = MapGrid(2, 2, 1.0);
  map.cla_m2 = MapGrid(2, 2, 4.0);
  map.balance = MapGrid(2, 2, 0.4);
  map.static_front_m = 0.04;
  map.static_rear_m = 0.08;
  map.stiffness_front_npm = 3e5;
  map.stiffness_rear_npm = 4e5;
  // Constant coefficients: h = h0 - F / k exactly, with the drag moment D z / L off the front.
  const double v = 70.0, rho = 1.2, z = 0.4, wb = 2.9, q = 0.5 * rho * v * v;
  const AeroPoint p = solve_ride_heights(map, v, rho, z, wb, 0.04, 0.08);
  // To the solver's tolerance on the residual, 1e-10 m.
  CHECK(near(p.front_ride_m, 0.04 - (q * 4.0 * 0.4 - q * 1.0 * z / wb) / 3e5, 0.0, 1e-9));
  CHECK(near(p.rear_ride_m, 0.08 - (q * 4.0 * 0.6 + q * 1.0 * z / wb) / 4e5, 0.0, 1e-9));
  CHECK_FALSE(p.off_map);
  CHECK_FALSE(p.grounded);
  // Soft enough springs ground the front.
  map.stiffness_front_npm = 2e4;
  CHECK(solve_ride_heights(map, v, rho, z, wb, 0.04, 0.08).grounded);
}

TEST_CASE("a map whose cells change steeply: its ride heights found at every speed") {
  // Rough but valid data (a fuzz campaign's 3 x 2 map: ClA 3.1 to 6.7 m2 between neighbouring
  // cells, soft rear springs): Newton over the whole map cycled across the kinks between cells
  // and refused the car at 84.6 km/h (residual 3.4e-5 m) on one track while `check` passed it.
  // The heights at each speed from the last speed's (as the Envelope takes them), held to their
  // definition h = h0 - F(h) / k, F the axle loads of the map's coefficients at h with the drag
  // moment D z / L off the front (the closed form of the test above, at each answer).
  RideHeightMap map;
  map.front_m = {0.0234, 0.0254, 0.0274};
  map.rear_m = {0.0562, 0.0662};
  map.cda_m2 = MapGrid(3, 2, 0.0);
  map.cla_m2 = MapGrid(3, 2, 0.0);
  map.balance = MapGrid(3, 2, 0.0);
  const double cda[3][2] = {{1.472, 1.512}, {1.173, 1.135}, {1.238, 1.419}};
  const double cla[3][2] = {{6.656, 3.066}, {3.169, 4.572}, {4.964, 3.453}};
  const double bal[3][2] = {{0.481, 0.333}, {0.397, 0.551}, {0.568, 0.461}};
  for (std::size_t i = 0; i < 3; ++i)
    for (std::size_t j = 0; j < 2; ++j) {
      map.cda_m2(i, j) = cda[i][j];
      map.cla_m2(i, j) = cla[i][j];
      map.balance(i, j) = bal[i][j];
    }
  map.static_front_m = 0.0259;
  map.static_rear_m = 0.0744;
  map.stiffness_front_npm = 4e5;
  map.stiffness_rear_npm = 5e4;
  REQUIRE(test::describe(map.validate()) == "none");
  const double z = 0.42, wb = 2.9;
  std::size_t solved = 0;
  // The bundled tracks' air (ISO 2533 at 0, 85, 480 and 600 m) and two speed grids (0.5 m/s,
  // and the Envelope's for a 394 km/h top: 219 steps).
  for (const double rho : {1.2250, 1.2150, 1.1661, 1.1515})
    for (const double dv : {0.5, 394.0 / 3.6 / 219.0}) {
      double hf = map.static_front_m, hr = map.static_rear_m;
      for (std::size_t k = 1; k <= 219; ++k) {
        const double v = static_cast<double>(k) * dv;
        CAPTURE(rho);
        CAPTURE(v);
        AeroPoint p{};
        REQUIRE_NOTHROW(p = solve_ride_heights(map, v, rho, z, wb, hf, hr));
        hf = p.front_ride_m;
        hr = p.rear_ride_m;
        const MapCoefficients c = map_coefficients(map, hf, hr);
        const double q = 0.5 * rho * v * v;
        const double front = q * c.cla_m2 * c.balance - q * c.cda_m2 * z / wb;
        const double rear = q * c.cla_m2 * (1.0 - c.balance) + q * c.cda_m2 * z / wb;
        // The solver's tolerance on the residual, 1e-10 m, and the rounding of the loads.
        CHECK(std::abs(hf - (map.static_front_m - front / map.stiffness_front_npm)) <= 1e-9);
        CHECK(std::abs(hr - (map.static_rear_m - rear / map.stiffness_rear_npm)) <= 1e-9);
        ++solved;
      }
    }
  CHECK(solved == 8 * 219);
}

TEST_CASE("straight-line trim: less drag on straights is faster on a fast lap, and is reported") {
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const std::size_t plain = static_cast<std::size_t>(car.config_index("high"));
  const std::size_t trim = static_cast<std::size_t>(car.config_index("high_trim"));
  const Track track = load_track(test::source_path("tracks/saltmere-flats.yaml"));
  const Mesh mesh = build_mesh(track, track.mesh_m);
  const Envelope a(car.configured(plain), make_air(track.air));
  const Envelope b(car.configured(trim), make_air(track.air));
  const Lap la = solve_lap(a, mesh), lb = solve_lap(b, mesh);
  CHECK(lb.lap_time_s < la.lap_time_s);
  CHECK(b.top_speed_level_mps() > a.top_speed_level_mps());
  std::size_t trimmed = 0;
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    if (!lb.trimmed[i]) continue;
    ++trimmed;
    // Trim only on straight enough pieces under drive.
    CHECK(std::abs(mesh.curvature_1pm[i]) < 0.002);
    CHECK(lb.phase[i] != Phase::brake);
  }
  CHECK(trimmed > mesh.size() / 4);
}

namespace {
// A 2 x 2 ride-height map in range.
RideHeightMap small_map() {
  RideHeightMap m;
  m.front_m = {0.0, 0.1};
  m.rear_m = {0.0, 0.2};
  m.cda_m2 = MapGrid(2, 2, 1.2);
  m.cla_m2 = MapGrid(2, 2, 3.5);
  m.balance = MapGrid(2, 2, 0.42);
  m.static_front_m = 0.03;
  m.static_rear_m = 0.06;
  m.stiffness_front_npm = 4e5;
  m.stiffness_rear_npm = 4.5e5;
  return m;
}
}  // namespace

TEST_CASE("a ride-height map names its first bad axis, grid or spring (README, \"Car\")") {
  CHECK(test::describe(small_map().validate()) == "none");
  struct Case {
    void (*spoil)(RideHeightMap&);
    const char* want;
  };
  const Case cases[] = {
      {[](RideHeightMap& m) { m.front_m[1] = 1.5; },
       "ride_height_map.front[1]: value 1.5 is out of range: must be [-0.5, 1] in SI units"},
      {[](RideHeightMap& m) { m.rear_m = {0.1}; },
       "ride_height_map.rear: a map needs at least 2 points per axis"},
      {[](RideHeightMap& m) {
         m.front_m = {0.1, 0.0};
       },
       "ride_height_map.front: values must be strictly increasing (item 1: 0 after 0.1)"},
      {[](RideHeightMap& m) { m.cla_m2 = MapGrid(3, 2, 3.5); },
       "ride_height_map.cla: rows differ from front: expected 2, got 3"},
      {[](RideHeightMap& m) { m.balance = MapGrid(2, 1, 0.4); },
       "ride_height_map.balance: columns differ from rear: expected 2, got 1"},
      {[](RideHeightMap& m) { m.cda_m2(1, 0) = 25.0; },
       "ride_height_map.cda[1][0]: value 25 is out of range: must be [0, 20]"},
      {[](RideHeightMap& m) { m.static_rear_m = 0.0; },
       "static_ride_height.rear: value 0 is out of range: must be (0, 1] in SI units"},
      {[](RideHeightMap& m) { m.stiffness_front_npm = -4e5; },
       "heave_stiffness.front: value -400000 is out of range: must be (0, 1000000000] in SI "
       "units"},
  };
  for (const Case& c : cases) {
    RideHeightMap m = small_map();
    c.spoil(m);
    CHECK(test::describe(m.validate()) == c.want);
  }
}

TEST_CASE("a parts table names a bad part value, then net lift") {
  PartsTable t{50.0, 1.225, {{"front wing", 250.0, 1700.0, -0.65, 0.15}}};
  CHECK(test::describe(t.validate()) == "none");
  t.parts.push_back({"floor", 1000.0, 2700.0, 1.9, 3.5});
  CHECK(test::describe(t.validate()) ==
        "parts[1].z: value 3.5 is out of range: must be [0, 3] in SI units");
  t.parts[1].z_m = 0.35;
  t.parts[1].downforce_n = -5000.0;  // more lift than the wing's downforce
  CHECK(test::describe(t.validate()) ==
        "parts: the parts' downforce sums to -3300.000000 N: net lift is not modelled");
  t.speed_mps = 0.0;
  CHECK(test::describe(t.validate()) ==
        "speed: value 0 is out of range: must be (0, 200] in SI units");
}

TEST_CASE("an aero config names its first bad value by the key of its form") {
  AeroConfig c;
  c.name = "x";
  c.cda_m2 = {1.2};
  c.cla_m2 = {3.5};
  c.balance = {0.42};
  CHECK(test::describe(c.validate()) == "none");
  c.cla_m2 = {31.0};
  CHECK(test::describe(c.validate()) ==
        "cla: value 31 is out of range: must be [0, 30] in SI units");
  // A speed table: rows checked against the speeds.
  AeroConfig t = c;
  t.form = AeroConfig::Form::speed_table;
  t.speed_mps = {20.0, 40.0, 60.0};
  t.cda_m2 = {1.2, 1.2, 1.2};
  t.cla_m2 = {3.5, 3.5};
  t.balance = {0.42, 0.42, 0.42};
  CHECK(test::describe(t.validate()) ==
        "speed_table.cla: size differs from speed: expected 3, got 2");
  t.cla_m2.push_back(3.5);
  t.balance[2] = 1.2;
  CHECK(test::describe(t.validate()) ==
        "speed_table.balance[2]: value 1.2 is out of range: must be [0, 1]");
  // A row beyond the top of a lap's tables (250 m/s) is never read: refused, where 1e308 m/s
  // once read "inf km/h" in check's note and 1e307 a 31-digit number (a fuzz campaign).
  t.balance[2] = 0.42;
  t.speed_mps = {20.0, 250.0};
  t.cda_m2 = t.cla_m2 = t.balance = {1.0, 1.0};
  CHECK(test::describe(t.validate()) == "none");
  t.speed_mps[1] = 1e308;
  CHECK(test::describe(t.validate()) ==
        "speed_table.speed[1]: value 1e+308 is out of range: must be [0, 250] in SI units");
  // Reduced from parts: the parts' words.
  AeroConfig f = c;
  f.form = AeroConfig::Form::forces;
  f.cla_m2 = {3.5};
  f.balance = {1.2};
  CHECK(test::describe(f.validate()) ==
        "forces.parts: the parts put 120.000000 % of the downforce on the front axle: outside "
        "0..100 %");
  // A map config: its map's rules.
  AeroConfig m = c;
  m.form = AeroConfig::Form::ride_height_map;
  m.cla_m2 = {3.5};
  m.map = small_map();
  CHECK(test::describe(m.validate()) == "none");
  m.map->static_front_m = 2.0;
  CHECK(test::describe(m.validate()) ==
        "static_ride_height.front: value 2 is out of range: must be (0, 1] in SI units");
  // A straight-line trim: its own ranges, then the rows it makes.
  AeroConfig s = c;
  s.cla_m2 = {3.5};
  s.trim = StraightTrim{-0.3, -0.4, 0.0, 0.002};
  CHECK(test::describe(s.validate()) == "none");
  s.trim->below_curvature_1pm = 0.0;
  CHECK(test::describe(s.validate()) ==
        "straight_trim.below_curvature: value 0 is out of range: must be (0, 1]");
  s.trim->below_curvature_1pm = 0.002;
  s.trim->dcda_m2 = -1.5;
  CHECK(test::describe(s.validate()) ==
        "straight_trim: straight_trim takes CdA, ClA or balance out of range (CdA -0.300000 m2, "
        "ClA 3.100000 m2, balance 0.420000)");
}

TEST_CASE("a family blends its configs linearly between the measured settings") {
  // Three flap settings, constant coefficients: at 12 deg, halfway between 7 and 17 deg, each
  // coefficient is the mean of theirs (x = (1 - t) x_a + t x_b with t = (12 - 7) / (17 - 7)).
  const Car car = car_with(
      "    flap7: {cda: 1.10 m2, cla: 3.2 m2, balance: 0.40}\n"
      "    flap17: {cda: 1.30 m2, cla: 4.0 m2, balance: 0.44}\n"
      "    flap22: {cda: 1.42 m2, cla: 4.2 m2, balance: 0.45}\n",
      "family");
  AeroFamily fam{
      "front_flap", {7 * units::deg, 17 * units::deg, 22 * units::deg}, {0, 1, 2}, 12 * units::deg};
  CHECK_FALSE(fam.validate());
  AeroConfig c = family_config(fam, car.configs, car.wheelbase_m);
  CHECK(c.name == "front_flap");
  CHECK(near(c.cda_m2.front(), 1.20, 1e-12));
  CHECK(near(c.cla_m2.front(), 3.6, 1e-12));
  CHECK(near(c.balance.front(), 0.42, 1e-12));
  // At a measured setting the family is that config exactly (t = 0 or 1).
  fam.at_rad = 17 * units::deg;
  c = family_config(fam, car.configs, car.wheelbase_m);
  CHECK(c.cla_m2.front() == 4.0);
  CHECK(c.balance.front() == 0.44);
  fam.at_rad = 22 * units::deg;
  CHECK(family_config(fam, car.configs, car.wheelbase_m).cda_m2.front() == 1.42);
  fam.at_rad = 23 * units::deg;
  CHECK(test::describe(fam.validate()).rfind("at: value", 0) == 0);
  fam.at_rad = 12 * units::deg;
  fam.setting_rad = {7 * units::deg, 17 * units::deg, 17 * units::deg};
  CHECK(test::describe(fam.validate()).find("strictly increasing") != std::string::npos);
}

TEST_CASE("a parts family blends each part, so the balance follows the parts' positions") {
  // Two tables at the same speed and density: the blend at t = 1/2 is the reduction of the
  // parts' mean forces and positions (lever rule, as in the hand-worked example above), not the
  // mean of the two balances.
  const Car car = car_with(
      "    a:\n      forces:\n        speed: 40 m/s\n        density: 1.2\n        parts:\n"
      "          - {drag: 200 N, downforce: 1000 N, x: -0.5 m, z: 0.2 m}\n"
      "          - {drag: 600 N, downforce: 2000 N, x: 3.5 m, z: 1.0 m}\n"
      "    b:\n      forces:\n        speed: 40 m/s\n        density: 1.2\n        parts:\n"
      "          - {drag: 300 N, downforce: 2000 N, x: -0.7 m, z: 0.2 m}\n"
      "          - {drag: 600 N, downforce: 2000 N, x: 3.5 m, z: 1.0 m}\n",
      "parts_family");
  REQUIRE_FALSE(blend_mismatch(car.configs[0], car.configs[1]));
  const AeroConfig c = blend(car.configs[0], car.configs[1], 0.5, car.wheelbase_m);
  const std::vector<AeroPart> mean{{"", 250.0, 1500.0, -0.6, 0.2}, {"", 600.0, 2000.0, 3.5, 1.0}};
  const PartsReduction r = reduce_parts(mean, 40.0, 1.2, car.wheelbase_m);
  CHECK(near(c.balance.front(), r.balance, 1e-12));
  CHECK(near(c.cla_m2.front(), r.cla_m2, 1e-12));
  CHECK(near(*c.drag_height_m, r.drag_height_m, 1e-12));
  const double mean_balance =
      0.5 * (car.configs[0].balance.front() + car.configs[1].balance.front());
  CHECK(std::abs(c.balance.front() - mean_balance) > 1e-3);
}

TEST_CASE("a parts family blends each part with its namesake, in any order the configs list them") {
  // The same two parts in the opposite order: every blend is the parts' own reduction (the
  // configs are one car), where pairing by position blended the front wing with the diffuser.
  const Car car = car_with(
      "    a:\n      forces:\n        speed: 40 m/s\n        density: 1.2\n        parts:\n"
      "          - {name: front wing, drag: 200 N, downforce: 1000 N, x: -0.5 m, z: 0.2 m}\n"
      "          - {name: diffuser, drag: 600 N, downforce: 2000 N, x: 3.5 m, z: 1.0 m}\n"
      "    b:\n      forces:\n        speed: 40 m/s\n        density: 1.2\n        parts:\n"
      "          - {name: diffuser, drag: 600 N, downforce: 2000 N, x: 3.5 m, z: 1.0 m}\n"
      "          - {name: front wing, drag: 200 N, downforce: 1000 N, x: -0.5 m, z: 0.2 m}\n"
      "    c:\n      forces:\n        speed: 40 m/s\n        density: 1.2\n        parts:\n"
      "          - {name: front wing, drag: 200 N, downforce: 1000 N, x: -0.5 m, z: 0.2 m}\n"
      "          - {name: beam wing, drag: 600 N, downforce: 2000 N, x: 3.5 m, z: 1.0 m}\n",
      "parts_order");
  REQUIRE_FALSE(blend_mismatch(car.configs[0], car.configs[1]));
  for (const double t : {0.0, 0.3, 0.5, 1.0}) {
    const AeroConfig c = blend(car.configs[0], car.configs[1], t, car.wheelbase_m);
    CHECK(near(c.balance.front(), car.configs[0].balance.front(), 1e-12));
    CHECK(near(c.cla_m2.front(), car.configs[0].cla_m2.front(), 1e-12));
    CHECK(near(*c.drag_height_m, *car.configs[0].drag_height_m, 1e-12));
  }
  // Configs that name different parts do not blend.
  const auto why = blend_mismatch(car.configs[0], car.configs[2]);
  REQUIRE(why);
  CHECK(why->find("name different parts") != std::string::npos);
}

TEST_CASE("configs of different forms do not blend") {
  const Car car = car_with(
      "    a: {cda: 1.1 m2, cla: 3.2 m2, balance: 0.40}\n"
      "    b:\n      speed_table:\n        speed: [100 km/h, 200 km/h]\n        cda: [1.2, 1.2]\n"
      "        cla: [3.5, 3.5]\n        balance: [0.42, 0.42]\n",
      "mismatch");
  const auto why = blend_mismatch(car.configs[0], car.configs[1]);
  REQUIRE(why);
  CHECK(why->find("one form") != std::string::npos);
}
