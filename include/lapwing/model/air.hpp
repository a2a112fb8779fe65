// The air a car meets: ISO 2533 standard atmosphere at altitude, with any of temperature,
// pressure and humidity replaced by a given value, and moist-air density.
#pragma once

#include <optional>

#include "lapwing/base/range.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/violation.hpp"

namespace lapwing {

/// ISO 2533:1975 standard atmosphere in the troposphere (geometric altitude -2 km to 11 km).
struct StandardAtmosphere {
  double temperature_k;
  double pressure_pa;
  double density_kg_m3;
};
StandardAtmosphere standard_atmosphere(double geometric_altitude_m);

/// Saturation vapour pressure over water, Magnus form (WMO Guide, Annex 4.B):
/// e_s = 611.2 exp(17.62 t / (243.12 + t)) Pa, t in C.
double saturation_vapour_pressure_pa(double temperature_k);

/// Density of moist air as an ideal-gas mixture: rho = (p - 0.378 e) / (R_d T), e = RH e_s(T).
double moist_air_density(double pressure_pa, double temperature_k, double relative_humidity);

/// What a track file or the command line says of the air; unset values come from ISO 2533.
struct AirSpec {
  double altitude_m = 0.0;
  std::optional<double> temperature_k;
  std::optional<double> pressure_pa;
  double relative_humidity = 0.0;  // 0..1; dry unless given

  // The ranges a track file or an option may give (README, "Track"): the troposphere
  // where circuits lie, and the air a car is run in.
  static constexpr Range altitude_range{-500.0, 6000.0};  // m
  // K: -50 to 70 C, each end as a value in C is converted (-50 + 273.15 is 223.14999999999998,
  // below the double nearest 223.15, which once refused the documented -50 C; -58 F converts
  // to the same double).
  static constexpr Range temperature_range{-50.0 + units::celsius_zero_k,
                                           70.0 + units::celsius_zero_k};
  static constexpr Range pressure_range{30000.0, 110000.0};  // Pa
  static constexpr Range humidity_range{0.0, 1.0};           // fraction
  /// The first value out of its range (key paths as in a track file: "altitude",
  /// "ambient.temperature", "ambient.pressure", "ambient.humidity").
  std::optional<Violation> validate() const;
};

/// Values that replace a spec's (the command line's air options, the Python module's `air`),
/// in SI; each one given replaces the spec's value, the others stay.
struct AirOverride {
  std::optional<double> altitude_m, temperature_k, pressure_pa, humidity;
};
/// `spec` with the values `o` gives in place of its own.
AirSpec apply(AirSpec spec, const AirOverride& o);

struct Air {
  double altitude_m;
  double temperature_k;
  double pressure_pa;
  double relative_humidity;
  double density_kg_m3;
  bool standard;  // true when nothing replaced the ISO 2533 values
};

/// The air of `spec` (InvalidInput, subject "air", when spec.validate() finds a violation).
Air make_air(const AirSpec& spec);

namespace atmosphere {
inline constexpr double sea_level_temperature_k = 288.15;  // ISO 2533
inline constexpr double sea_level_pressure_pa = 101325.0;  // ISO 2533
inline constexpr double lapse_rate_k_per_m = 0.0065;       // ISO 2533, troposphere
inline constexpr double dry_air_gas_constant = 287.05287;  // J/(kg K), ISO 2533
inline constexpr double earth_radius_m = 6356766.0;        // ISO 2533, for geopotential altitude
inline constexpr double tropopause_m = 11000.0;            // geopotential
}  // namespace atmosphere

}  // namespace lapwing
