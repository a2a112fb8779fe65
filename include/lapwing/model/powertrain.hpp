// Engine and gearbox: the drive force at the wheels at a road speed, in the best gear.
#pragma once

#include <optional>
#include <vector>

#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/range.hpp"
#include "lapwing/base/violation.hpp"

namespace lapwing {

enum class DrivenAxle { rear, front, all };

/// How the engine's power follows the air (README, "Car", powertrain): `fixed` holds the curve
/// at every track (the default: a file without the key means what it meant before); `natural`
/// and `turbo` read the curve as rated at SAE J1349 reference air (99 kPa dry-air pressure,
/// 25 C) and correct it to the track's air (engine_power_ratio).
enum class Aspiration { fixed, natural, turbo };

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
  Aspiration aspiration = Aspiration::fixed;
  std::optional<double> full_power_altitude_m;  // turbo: rated power up to this ISA altitude

  static constexpr Range full_power_altitude_range{0.0, 6000.0};  // m (AirSpec's altitudes)
  // Bounds far beyond any car's, so that a value typed in the wrong unit or order of magnitude
  // is refused instead of overflowing the tables (1e307 N m made a car that "cannot move"):
  // 1 MN m, 100 MW, ratios up to 100.
  static constexpr Range torque_range{0.0, 1e6};              // N m
  static constexpr Range power_range{0.0, 1e8, true, false};  // W
  static constexpr Range ratio_range{0.0, 100.0, true, false};
  /// The first value that breaks a rule that breaks a rule, in the order of a car file's
  /// `powertrain:` (key paths as there; the curve is named torque_curve, whichever form the file
  /// gave).
  std::optional<Violation> validate() const;
};

struct Drive {
  double force_n;       // at the contact patches, after drivetrain efficiency
  int gear;             // 1-based; 0 for an ideal (gearless) transmission
  double engine_radps;  // engine speed (0 for an ideal transmission)
};

/// SAE J1349 (June 1990) reference air: dry-air pressure 99 kPa, 25 C (298 K).
inline constexpr double j1349_dry_pressure_pa = 99e3;
inline constexpr double j1349_temperature_k = 298.0;

/// SAE J1349 (June 1990) correction factor of a spark-ignition engine,
///   CF = 1.18 (99 kPa / p_dry) sqrt(T / 298 K) - 0.18,
/// the factor that brings power observed in air of dry-air pressure p_dry (Pa) and temperature
/// T (K) to reference air: P_ref = CF P_observed.
double j1349_correction_factor(double dry_pressure_pa, double temperature_k);

/// The share of the rated curve the engine gives in air of total pressure p (Pa), temperature
/// T (K) and relative humidity RH (0..1), p_dry = p - RH e_s(T) (Magnus, air.hpp):
///  - fixed: 1;
///  - natural: 1 / CF (SAE J1349: P_site = P_ref / CF);
///  - turbo: 1 up to the full-power altitude, where the dry-air pressure is the ISO 2533
///    pressure p_fp there; in thinner air the natural law with that pressure as reference,
///    1 / (1.18 p_fp / p_dry - 0.18). The temperature term is left out for a turbo: its boost
///    control and charge cooling hold the charge temperature (common practice), and the ratio
///    stays continuous at the full-power altitude.
/// The rated power (W): a constant power, or the curve's peak of torque x engine speed.
double rated_power_w(const Powertrain& p);
double engine_power_ratio(const Powertrain& p, double pressure_pa, double temperature_k,
                          double relative_humidity);

/// Engine torque at engine speed w (rad/s): linear in the torque curve. Below the curve's first
/// point the clutch slips and the engine is held there (a launch); above the rev limit it is 0.
double engine_torque_nm(const Powertrain& p, double engine_radps);

/// The drive in each usable gear at road speed v (m/s), best (largest force) chosen:
/// F = T(w) * gear * final_drive * efficiency / r, w = v / r * gear * final_drive.
/// At a speed beyond the rev limit in top gear, no gear is usable and the force is 0.
/// An ideal transmission gives F = efficiency * P / v (v floored at 1 mm/s: at standstill the
/// tyres limit the force long before).
Drive best_drive(const Powertrain& p, double rolling_radius_m, double speed_mps);

/// best_drive at road speeds given in increasing order (an Envelope's rows): each gear walks on
/// along the torque curve from the last speed's interval instead of searching it, with the same
/// answers bit for bit (the same interval and blend as engine_torque_nm).
class DriveWalk {
 public:
  DriveWalk(const Powertrain& p, double rolling_radius_m);
  /// best_drive(p, rolling_radius_m, v); v no less than the last call's.
  Drive at(double speed_mps);

 private:
  const Powertrain& p_;
  double r_;
  double last_v_ = 0.0;
  std::vector<AxisWalk> walks_;  // per gear: along the torque curve, from the last speed's interval
};

/// The road speed at the rev limit in top gear (m/s); 0 for an ideal transmission.
double rev_limited_speed_mps(const Powertrain& p, double rolling_radius_m);

}  // namespace lapwing
