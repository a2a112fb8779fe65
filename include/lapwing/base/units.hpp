// Units at the boundary: every quantity read from a file or an option is converted to SI here,
// once, and never again (README, "Input formats", lists the units). Inside the program: m, m/s, kg,
// N, W, N m, rad, m^2, K, Pa, N/m, s, rad/s, and plain fractions.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace lapwing {

enum class Quantity {
  length,
  speed,
  mass,
  force,
  power,
  torque,
  angle,
  area,
  temperature,
  pressure,
  stiffness,
  time,
  engine_speed,
  fraction,
  number,  // dimensionless, no unit accepted
};

/// Human name of a quantity ("length", "speed", ...), for error messages.
std::string_view quantity_name(Quantity q);

/// The units a quantity accepts, default first, e.g. "m, mm, cm, km, in, ft, mi".
std::string accepted_units(Quantity q);

/// Converts `value` given in `unit` (empty: the quantity's default unit) to SI.
/// Returns nullopt when the unit is not one the quantity accepts.
std::optional<double> to_si(double value, std::string_view unit, Quantity q);

/// Parses "<number>" or "<number> <unit>" (the space is optional) into SI. On failure returns
/// nullopt and sets `error` to a sentence that says what was wrong. Non-finite numbers fail.
std::optional<double> parse_quantity(std::string_view text, Quantity q, std::string& error);

/// Strict parse of a finite decimal number (no unit, no trailing text).
std::optional<double> parse_number(std::string_view text);

namespace units {
inline constexpr double g0 = 9.80665;  // standard gravity, m/s^2 (CGPM 1901)
inline constexpr double pi = 3.14159265358979323846;
inline constexpr double kph = 1.0 / 3.6;          // m/s per km/h
inline constexpr double rpm = 2.0 * pi / 60.0;    // rad/s per rpm
inline constexpr double deg = pi / 180.0;         // rad per degree
inline constexpr double celsius_zero_k = 273.15;  // K at 0 C
/// m/s to km/h, for output.
inline constexpr double to_kph(double mps) {
  return mps / kph;
}
}  // namespace units

}  // namespace lapwing
