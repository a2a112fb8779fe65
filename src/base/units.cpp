#include "lapwing/base/units.hpp"

#include <array>
#include <charconv>
#include <cmath>
#include <utility>

namespace lapwing {

namespace {

// A unit: its spellings and the affine map to SI (si = value * scale + offset).
struct Unit {
  std::string_view name;
  double scale;
  double offset = 0.0;
};

// Conversion factors: exact by definition (NIST SP 811, appendix B) unless noted.
constexpr double inch = 0.0254;
constexpr double foot = 0.3048;
constexpr double mile = 1609.344;
constexpr double pound = 0.45359237;
constexpr double pound_force = pound * units::g0;
// Mechanical hp = 550 ft lbf/s = 745.69987158 W (NIST SP 811, appendix B), taken to the
// micro-watt as README, "Input formats" states it; PS = 75 kgf m/s = 75 x 9.80665 W, exact
// (DIN 66036; from memory).
constexpr double horsepower = 745.699872;
constexpr double metric_hp = 735.49875;

template <std::size_t N>
using Units = std::array<Unit, N>;

constexpr Units<7> length_units{
    {{"m", 1}, {"mm", 1e-3}, {"cm", 1e-2}, {"km", 1e3}, {"in", inch}, {"ft", foot}, {"mi", mile}}};
constexpr Units<4> speed_units{
    {{"m/s", 1}, {"km/h", units::kph}, {"kph", units::kph}, {"mph", mile / 3600.0}}};
constexpr Units<2> mass_units{{{"kg", 1}, {"lb", pound}}};
constexpr Units<3> force_units{{{"N", 1}, {"kN", 1e3}, {"lbf", pound_force}}};
constexpr Units<4> power_units{{{"W", 1}, {"kW", 1e3}, {"hp", horsepower}, {"PS", metric_hp}}};
constexpr Units<4> torque_units{{{"N m", 1}, {"Nm", 1}, {"N*m", 1}, {"lbf ft", pound_force* foot}}};
constexpr Units<2> angle_units{{{"deg", units::deg}, {"rad", 1}}};
constexpr Units<3> area_units{{{"m2", 1}, {"cm2", 1e-4}, {"ft2", foot* foot}}};
constexpr Units<3> temperature_units{{{"C", 1, units::celsius_zero_k},
                                      {"K", 1},
                                      {"F", 5.0 / 9.0, units::celsius_zero_k - 32.0 * 5.0 / 9.0}}};
constexpr Units<5> pressure_units{
    {{"Pa", 1}, {"hPa", 100}, {"kPa", 1e3}, {"bar", 1e5}, {"mbar", 100}}};
constexpr Units<2> stiffness_units{{{"N/m", 1}, {"N/mm", 1e3}}};
constexpr Units<2> time_units{{{"s", 1}, {"ms", 1e-3}}};
constexpr Units<1> engine_speed_units{{{"rpm", units::rpm}}};
constexpr Units<1> fraction_units{{{"%", 1e-2}}};

template <typename F>
auto with_units(Quantity q, F&& f) {
  switch (q) {
    case Quantity::length:
      return f(length_units.data(), length_units.size(), true);
    case Quantity::speed:
      return f(speed_units.data(), speed_units.size(), true);
    case Quantity::mass:
      return f(mass_units.data(), mass_units.size(), true);
    case Quantity::force:
      return f(force_units.data(), force_units.size(), true);
    case Quantity::power:
      return f(power_units.data(), power_units.size(), true);
    case Quantity::torque:
      return f(torque_units.data(), torque_units.size(), true);
    case Quantity::angle:
      return f(angle_units.data(), angle_units.size(), true);
    case Quantity::area:
      return f(area_units.data(), area_units.size(), true);
    case Quantity::temperature:
      return f(temperature_units.data(), temperature_units.size(), true);
    case Quantity::pressure:
      return f(pressure_units.data(), pressure_units.size(), true);
    case Quantity::stiffness:
      return f(stiffness_units.data(), stiffness_units.size(), true);
    case Quantity::time:
      return f(time_units.data(), time_units.size(), true);
    case Quantity::engine_speed:
      return f(engine_speed_units.data(), engine_speed_units.size(), true);
    // A plain fraction is in (0..1); "%" is the only unit and is not the default.
    case Quantity::fraction:
      return f(fraction_units.data(), fraction_units.size(), false);
    case Quantity::number:
      break;
  }
  return f(static_cast<const Unit*>(nullptr), std::size_t{0}, false);
}

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

}  // namespace

std::string_view quantity_name(Quantity q) {
  switch (q) {
    case Quantity::length:
      return "length";
    case Quantity::speed:
      return "speed";
    case Quantity::mass:
      return "mass";
    case Quantity::force:
      return "force";
    case Quantity::power:
      return "power";
    case Quantity::torque:
      return "torque";
    case Quantity::angle:
      return "angle";
    case Quantity::area:
      return "area";
    case Quantity::temperature:
      return "temperature";
    case Quantity::pressure:
      return "pressure";
    case Quantity::stiffness:
      return "stiffness";
    case Quantity::time:
      return "time";
    case Quantity::engine_speed:
      return "engine speed";
    case Quantity::fraction:
      return "fraction";
    case Quantity::number:
      return "number";
  }
  return "number";
}

std::string accepted_units(Quantity q) {
  return with_units(q, [](const Unit* u, std::size_t n, bool) {
    std::string s;
    for (std::size_t i = 0; i < n; ++i) {
      if (i) s += ", ";
      s += u[i].name;
    }
    return s;
  });
}

std::optional<double> to_si(double value, std::string_view unit, Quantity q) {
  return with_units(q, [&](const Unit* u, std::size_t n, bool first_is_default) {
    if (unit.empty()) {
      // Plain number: the default unit (the first), or the plain value for fractions/numbers.
      if (first_is_default) return std::optional<double>(value * u[0].scale + u[0].offset);
      return std::optional<double>(value);
    }
    for (std::size_t i = 0; i < n; ++i)
      if (u[i].name == unit) return std::optional<double>(value * u[i].scale + u[i].offset);
    return std::optional<double>();
  });
}

std::optional<double> parse_number(std::string_view text) {
  text = trim(text);
  if (text.empty()) return std::nullopt;
  if (text.front() == '+') text.remove_prefix(1);
  double v = 0.0;
  auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
  if (ec != std::errc() || end != text.data() + text.size() || !std::isfinite(v))
    return std::nullopt;
  return v;
}

std::optional<double> parse_quantity(std::string_view text, Quantity q, std::string& error) {
  text = trim(text);
  std::string_view body = text;
  if (!body.empty() && body.front() == '+') body.remove_prefix(1);
  double v = 0.0;
  auto [end, ec] = std::from_chars(body.data(), body.data() + body.size(), v);
  if (ec != std::errc() || end == body.data()) {
    error = "'" + std::string(text) + "' is not a " + std::string(quantity_name(q)) +
            " (expected a number" + (q == Quantity::number ? "" : ", optionally with a unit") + ")";
    return std::nullopt;
  }
  if (!std::isfinite(v)) {
    error = "'" + std::string(text) + "' is not a finite number";
    return std::nullopt;
  }
  std::string_view unit = trim(std::string_view(end, body.data() + body.size() - end));
  auto si = to_si(v, unit, q);
  if (!si) {
    std::string accepted = accepted_units(q);
    error = "unknown " + std::string(quantity_name(q)) + " unit '" + std::string(unit) + "'" +
            (accepted.empty() ? " (a plain number is expected)" : " (accepted: " + accepted + ")");
    return std::nullopt;
  }
  return si;
}

}  // namespace lapwing
