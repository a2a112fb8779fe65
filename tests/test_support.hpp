// Helpers shared by the tests: simple cars and tracks built in code (so that a closed form's
// assumptions are visible in the test), and the tolerance rule.
#pragma once

#include <cmath>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/violation.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing::test {

/// Deterministic Gaussian noise (a 64-bit linear congruential generator with Knuth's MMIX
/// constants, and the Box-Muller transform): the same samples every run, on every machine.
struct Noise {
  std::uint64_t state = 0x9E3779B97F4A7C15ull;
  double uniform() {
    state = state * 6364136223846793005ull + 1442695040888963407ull;
    return (static_cast<double>(state >> 11) + 0.5) / 9007199254740992.0;
  }
  double gauss() {
    const double u1 = uniform(), u2 = uniform();
    return std::sqrt(-2 * std::log(u1)) * std::cos(2 * 3.14159265358979323846 * u2);
  }
};

/// Tolerance rule used throughout: |a - b| <= rel * max(|a|, |b|) + abs.
bool near(double a, double b, double rel, double abs = 0.0);

/// "KEY.PATH: MESSAGE" of a violation (SI values as the library words them), or "none".
std::string describe(const std::optional<Violation>& v);

/// Sea-level air of the standard atmosphere (AirSpec's defaults).
extern const Air sea_level;

/// The bundled files.
std::string source_path(const std::string& relative);

/// A folder of this test process's own under the system's temporary folder (made on first use,
/// removed with everything in it when the process ends).
std::string scratch_dir();
/// `text` written to scratch_dir()/name (replacing any earlier file of that name); its path.
std::string scratch_file(const std::string& name, const std::string& text);

/// The bundled Pellion FR-2 in its second config ("medium").
ConfiguredCar pellion_medium();

/// A bundled track file laid out in its own air.
Circuit bundled_circuit(const std::string& relative);

/// A point-mass test car (model set explicitly: the default is the axle model) with no aero, no
/// rolling resistance, no inertia factor and no load sensitivity, driven by constant power through
/// an ideal transmission (efficiency 1).
Car plain_car(double mass_kg = 600.0, double mu = 1.5, double power_w = 300e3);

/// A car whose drive is a constant force `force_n` at every speed: one gear and a flat torque
/// curve (engine held at its lowest speed below the curve, so the force holds from standstill).
Car constant_force_car(double mass_kg, double force_n, double mu);

/// A car a test built or changed (one config, whose overrides are already in the car-level
/// values or which has none), as the solver takes it: the config's overrides are dropped so
/// that the car-level values the test set stand. Throws std::invalid_argument for a car with
/// other than one config.
ConfiguredCar configured(Car car);

/// Tracks from segments.
Track circle_track(double radius_m, double mesh_m);
Track straight_track(double length_m, double mesh_m, double start_speed_mps);
Segment straight(double length_m, double grade = 0.0);
Segment arc(double radius_m, double angle_rad, bool left);
Segment clothoid(double length_m, double from_curvature, double to_curvature);

}  // namespace lapwing::test
