#include "test_support.hpp"

#include <stdlib.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <stdexcept>

#include "lapwing/base/units.hpp"
#include "lapwing/io/track_file.hpp"

namespace lapwing::test {

const Air sea_level = make_air(AirSpec{});

bool near(double a, double b, double rel, double abs) {
  return std::abs(a - b) <= rel * std::max(std::abs(a), std::abs(b)) + abs;
}

std::string describe(const std::optional<Violation>& v) {
  if (!v) return "none";
  return v->field + ": " + v->message();
}

std::string source_path(const std::string& relative) {
  return std::string(LAPWING_SOURCE_DIR) + "/" + relative;
}

namespace {
// The scratch folder, removed at exit.
struct Scratch {
  std::filesystem::path dir;
  Scratch() {
    std::string pattern = (std::filesystem::temp_directory_path() / "lapwing-test-XXXXXX").string();
    if (!::mkdtemp(pattern.data())) throw std::runtime_error("cannot make a scratch folder");
    dir = pattern;
  }
  ~Scratch() {
    std::error_code ec;
    std::filesystem::remove_all(dir, ec);
  }
};
}  // namespace

std::string scratch_dir() {
  static const Scratch scratch;
  return scratch.dir.string();
}

std::string scratch_file(const std::string& name, const std::string& text) {
  const std::string path = scratch_dir() + "/" + name;
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out << text;
  if (!out) throw std::runtime_error("cannot write " + path);
  return path;
}

ConfiguredCar pellion_medium() {
  return load_car(source_path("cars/pellion-fr2.yaml")).configured(1);
}

Circuit bundled_circuit(const std::string& relative) {
  const Track t = load_track(source_path(relative));
  return lay_out(t, make_air(t.air));
}

ConfiguredCar configured(Car car) {
  if (car.configs.size() != 1) throw std::invalid_argument("test::configured: not one config");
  AeroConfig& a = car.configs.front();
  a.mass_kg = a.inertia_factor = a.cg_height_m = a.front_weight = a.drag_height_m = std::nullopt;
  return ConfiguredCar(car, 0);
}

Car plain_car(double mass_kg, double mu, double power_w) {
  Car c;
  c.name = "test car";
  c.file = "test.yaml";
  c.mass_kg = mass_kg;
  c.inertia_factor = 0.0;
  c.cg_height_m = 0.3;
  c.wheelbase_m = 2.8;
  c.front_weight = 0.45;
  c.tyres = Tyres{mu, mu, 1500.0, 0.0, 2.0, 0.3, 0.0};
  c.powertrain.ideal = true;
  c.powertrain.constant_power_w = power_w;
  c.powertrain.efficiency = 1.0;
  c.brake_front_bias = 0.6;
  c.drag_height_m = 0.0;
  c.model = VehicleModel::point_mass;  // the closed forms' model (the library's default is axle)
  AeroConfig a;
  a.name = "none";
  a.cda_m2 = {0.0};
  a.cla_m2 = {0.0};
  a.balance = {0.45};
  c.configs = {a};
  return c;
}

Car constant_force_car(double mass_kg, double force_n, double mu) {
  Car c = plain_car(mass_kg, mu);
  Powertrain& p = c.powertrain;
  p.ideal = false;
  p.constant_power_w = 0.0;
  const double radius = c.tyres.rolling_radius_m, ratio = 3.0;
  // F = T * ratio * efficiency / r, so a flat torque T = F r / ratio gives F at every speed.
  p.engine_radps = {1000 * units::rpm, 40000 * units::rpm};
  p.torque_nm = {force_n * radius / ratio, force_n * radius / ratio};
  p.rev_limit_radps = p.engine_radps.back();
  p.gears = {1.0};
  p.final_drive = ratio;
  p.shift_time_s = 0.0;
  return c;
}

Segment straight(double length_m, double grade) {
  return Segment{Segment::Kind::straight, length_m, 0.0, 0.0, grade};
}

Segment arc(double radius_m, double angle_rad, bool left) {
  const double k = (left ? 1.0 : -1.0) / radius_m;
  return Segment{Segment::Kind::arc, radius_m * angle_rad, k, k, 0.0};
}

Segment clothoid(double length_m, double from_curvature, double to_curvature) {
  return Segment{Segment::Kind::clothoid, length_m, from_curvature, to_curvature, 0.0};
}

Track circle_track(double radius_m, double mesh_m) {
  Track t;
  t.name = "circle";
  t.file = "circle.yaml";
  t.id = "circle";
  t.closed = true;
  t.mesh_m = mesh_m;
  t.segments = {arc(radius_m, 2 * units::pi, true)};
  t.sectors_m = {0.0};
  return t;
}

Track straight_track(double length_m, double mesh_m, double start_speed_mps) {
  Track t;
  t.name = "straight";
  t.file = "straight.yaml";
  t.id = "straight";
  t.closed = false;
  t.start_speed_mps = start_speed_mps;
  t.mesh_m = mesh_m;
  t.segments = {straight(length_m)};
  t.sectors_m = {0.0};
  return t;
}

}  // namespace lapwing::test
