// Engine and gearbox: the drive force at the wheels at a road speed, in the best gear.
#pragma once

#include <optional>
#include <vector>

#include "lapwing/base/violation.hpp"

namespace lapwing {

enum class DrivenAxle { rear, front, all };

struct Powertrain {
  bool ideal = false;                // constant power through an ideal transmission (no gears)
  double constant_power_w = 0.0;     // when ideal
  std::vector<double> engine_radps;  // torque curve abscissae, strictly increasing (rad/s)
  std::vector<double> torque_nm;     // engine torque at engine_radps
  double rev_limit_radps = 0.0;
  std::vector<double> gears;  // overall = gear * final_drive; strictly decreasing
  double final_drive = 1.0;
  double efficiency = 1.0;    // drivetrain, engine to wheels
  double shift_time_s = 0.0;  // drive cut after each upshift
  DrivenAxle driven = DrivenAxle::rear;

  /// The first value that breaks a rule, in the order of a car file's `powertrain:` (key paths
  /// as there; the curve is named torque_curve, whichever form the file gave).
  std::optional<Violation> validate() const;
};

struct Drive {
  double force_n;       // at the contact patches, after drivetrain efficiency
  int gear;             // 1-based; 0 for an ideal (gearless) transmission
  double engine_radps;  // engine speed (0 for an ideal transmission)
};

/// Engine torque at engine speed w (rad/s): linear in the torque curve. Below the curve's first
/// point the clutch slips and the engine is held there (a launch); above the rev limit it is 0.
double engine_torque_nm(const Powertrain& p, double engine_radps);

/// The drive in each usable gear at road speed v (m/s), best (largest force) chosen:
/// F = T(w) * gear * final_drive * efficiency / r, w = v / r * gear * final_drive.
/// At a speed beyond the rev limit in top gear, no gear is usable and the force is 0.
/// An ideal transmission gives F = efficiency * P / v (v floored at 1 mm/s: at standstill the
/// tyres limit the force long before).
Drive best_drive(const Powertrain& p, double rolling_radius_m, double speed_mps);

/// The road speed at the rev limit in top gear (m/s); 0 for an ideal transmission.
double rev_limited_speed_mps(const Powertrain& p, double rolling_radius_m);

}  // namespace lapwing
