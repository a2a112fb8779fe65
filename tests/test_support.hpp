// Helpers shared by the tests: simple cars and tracks built in code (so that a closed form's
// assumptions are visible in the test), and the tolerance rule.
#pragma once

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

/// Tolerance rule used throughout: |a - b| <= rel * max(|a|, |b|) + abs.
bool near(double a, double b, double rel, double abs = 0.0);

/// "KEY.PATH: MESSAGE" of a violation (SI values as the library words them), or "none".
std::string describe(const std::optional<Violation>& v);

/// The bundled files.
std::string source_path(const std::string& relative);

/// A bundled track file laid out in its own air.
Circuit bundled_circuit(const std::string& relative);

/// A point-mass test car with no aero, no rolling resistance, no inertia factor and no load
/// sensitivity, driven by constant power through an ideal transmission (efficiency 1).
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
