#include "lapwing/model/air.hpp"

#include <cassert>
#include <cmath>
#include <cstdio>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

StandardAtmosphere standard_atmosphere(double z) {
  using namespace atmosphere;
  // Geopotential altitude H = r z / (r + z) (ISO 2533 section 2.3).
  const double h = earth_radius_m * z / (earth_radius_m + z);
  assert(h <= tropopause_m && "standard_atmosphere: troposphere only");
  // T = T0 - L H;  p = p0 (T / T0)^(g0 / (R L));  rho = p / (R T).
  const double t = sea_level_temperature_k - lapse_rate_k_per_m * h;
  const double p =
      sea_level_pressure_pa * std::pow(t / sea_level_temperature_k,
                                       units::g0 / (dry_air_gas_constant * lapse_rate_k_per_m));
  return {t, p, p / (dry_air_gas_constant * t)};
}

double saturation_vapour_pressure_pa(double temperature_k) {
  const double t = temperature_k - units::celsius_zero_k;
  return 611.2 * std::exp(17.62 * t / (243.12 + t));
}

double moist_air_density(double pressure_pa, double temperature_k, double relative_humidity) {
  // 0.378 = 1 - M_w / M_d (ratio of molar masses of water and dry air, 0.622).
  const double e = relative_humidity * saturation_vapour_pressure_pa(temperature_k);
  return (pressure_pa - 0.378 * e) / (atmosphere::dry_air_gas_constant * temperature_k);
}

std::optional<Violation> AirSpec::validate() const {
  FirstViolation f;
  f.range("altitude", altitude_m, altitude_range, Quantity::length);
  if (temperature_k)
    f.range("ambient.temperature", *temperature_k, temperature_range, Quantity::temperature);
  if (pressure_pa) f.range("ambient.pressure", *pressure_pa, pressure_range, Quantity::pressure);
  f.range("ambient.humidity", relative_humidity, humidity_range, Quantity::fraction);
  if (f.found() || relative_humidity == 0.0) return f.result();
  // The water vapour's pressure is part of the air's: at 100 % and 70 C it is 312 hPa, more
  // than the whole air's at 300 hPa. Such air does not exist (its dry part would be negative,
  // and the engine's correction with it).
  const StandardAtmosphere isa = standard_atmosphere(altitude_m);
  const double t = temperature_k.value_or(isa.temperature_k);
  const double p = pressure_pa.value_or(isa.pressure_pa);
  const double e = relative_humidity * saturation_vapour_pressure_pa(t);
  return f
      .rule(e < p, "ambient.humidity",
            [&] {
              char buf[200];
              std::snprintf(buf, sizeof buf,
                            "the water vapour at %.0f %% humidity and %.1f C (%.0f hPa) is not "
                            "below the air's pressure (%.0f hPa): no such air",
                            100.0 * relative_humidity, t - units::celsius_zero_k, e / 100.0,
                            p / 100.0);
              return std::string(buf);
            })
      .result();
}

AirSpec apply(AirSpec spec, const AirOverride& o) {
  if (o.altitude_m) spec.altitude_m = *o.altitude_m;
  if (o.temperature_k) spec.temperature_k = o.temperature_k;
  if (o.pressure_pa) spec.pressure_pa = o.pressure_pa;
  if (o.humidity) spec.relative_humidity = *o.humidity;
  return spec;
}

Air make_air(const AirSpec& spec) {
  require_valid(spec.validate(), "air");
  const StandardAtmosphere isa = standard_atmosphere(spec.altitude_m);
  Air a;
  a.altitude_m = spec.altitude_m;
  a.temperature_k = spec.temperature_k.value_or(isa.temperature_k);
  a.pressure_pa = spec.pressure_pa.value_or(isa.pressure_pa);
  a.relative_humidity = spec.relative_humidity;
  a.standard = !spec.temperature_k && !spec.pressure_pa && spec.relative_humidity == 0.0;
  a.density_kg_m3 = a.standard
                        ? isa.density_kg_m3
                        : moist_air_density(a.pressure_pa, a.temperature_k, a.relative_humidity);
  return a;
}

}  // namespace lapwing
