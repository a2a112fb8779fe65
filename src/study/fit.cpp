// fit.hpp's parameters, options, advice and edits; the solve itself, lapwing::fit, is in
// fit_solve.cpp (Ceres Solver).
#include "lapwing/study/fit.hpp"

#include <algorithm>
#include <cassert>
#include <limits>
#include <utility>

#include "lapwing/base/error.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing {

namespace {

constexpr FitParameter all_params[] = {
    FitParameter::grip, FitParameter::grip_lat, FitParameter::grip_long, FitParameter::power,
    FitParameter::cda,  FitParameter::cla,      FitParameter::balance,   FitParameter::mass};

}  // namespace

std::string_view fit_parameter_name(FitParameter p) {
  switch (p) {
    case FitParameter::grip:
      return "grip";
    case FitParameter::grip_lat:
      return "grip_lat";
    case FitParameter::grip_long:
      return "grip_long";
    case FitParameter::power:
      return "power";
    case FitParameter::cda:
      return "cda";
    case FitParameter::cla:
      return "cla";
    case FitParameter::balance:
      return "balance";
    case FitParameter::mass:
      return "mass";
  }
  return "";
}

std::optional<FitParameter> fit_parameter(std::string_view name) {
  for (FitParameter p : all_params)
    if (fit_parameter_name(p) == name) return p;
  return std::nullopt;
}

std::string fit_parameter_names() {
  std::string out;
  for (FitParameter p : all_params)
    out += (out.empty() ? "" : ", ") + std::string(fit_parameter_name(p));
  return out;
}

ConfiguredCar fitted_car(const ConfiguredCar& car, const std::vector<FitParameter>& params,
                         const std::vector<double>& values) {
  assert(params.size() == values.size());
  ConfiguredCar c = car;
  for (std::size_t i = 0; i < params.size(); ++i) {
    const double f = values[i];
    switch (params[i]) {
      case FitParameter::grip:
      case FitParameter::grip_lat:
      case FitParameter::grip_long:
        c = c.changed([&](Car& k, AeroConfig&) {
          if (params[i] != FitParameter::grip_long) k.tyres.mu_lat *= f;
          if (params[i] != FitParameter::grip_lat) k.tyres.mu_long *= f;
        });
        break;
      case FitParameter::power:
        c = scaled(c, Knob::power, f);
        break;
      case FitParameter::cda:
        c = scaled(c, Knob::cda, f);
        break;
      case FitParameter::cla:
        c = scaled(c, Knob::cla, f);
        break;
      case FitParameter::mass:
        c = scaled(c, Knob::mass, f);
        break;
      case FitParameter::balance:
        c = c.changed([&](Car&, AeroConfig& a) {
          for (double& b : a.balance) b += f;
          if (a.map)
            for (double& v : a.map->balance.values()) v += f;
        });
        break;
    }
  }
  return c;
}

FitBounds fit_bounds(const ConfiguredCar& car, FitParameter p) {
  const Car& c = car.car();
  const AeroConfig& a = car.aero();
  constexpr double inf = std::numeric_limits<double>::infinity();
  constexpr double least_factor = 0.01;  // grip and power: above 1 % of the car's own
  // The largest and least of a coefficient over the config's rows and map cells.
  const auto extremes = [&](const std::vector<double>& rows, const MapGrid* grid) {
    std::vector<double> all = rows;
    if (grid) all.insert(all.end(), grid->values().begin(), grid->values().end());
    if (all.empty()) return std::pair{0.0, 0.0};
    const auto [lo, hi] = std::minmax_element(all.begin(), all.end());
    return std::pair{*lo, *hi};
  };
  // A straight-line trim adds to every row where it opens (the factor scales the rows, not
  // the trim): f x + d within [lo, hi] at the rows' extremes.
  const StraightTrim trim = a.trim.value_or(StraightTrim{});
  const auto scaled_within = [&](const Range& r, double d, std::pair<double, double> rows,
                                 double least) {
    double lo = least, hi = inf;
    if (rows.first > 0.0) lo = std::max(lo, (r.lo - std::min(d, 0.0)) / rows.first);
    if (rows.second > 0.0) hi = (r.hi - std::max(d, 0.0)) / rows.second;
    return FitBounds{lo, hi};
  };
  // A config of parts: their downforce must sum above 0 (net lift is not modelled).
  const double least_area = a.form == AeroConfig::Form::forces ? 1e-3 : 0.0;
  switch (p) {
    case FitParameter::grip:
      return {least_factor, friction_range.hi / std::max(c.tyres.mu_lat, c.tyres.mu_long)};
    case FitParameter::grip_lat:
      return {least_factor, friction_range.hi / c.tyres.mu_lat};
    case FitParameter::grip_long:
      return {least_factor, friction_range.hi / c.tyres.mu_long};
    case FitParameter::power:
      return {least_factor, inf};
    case FitParameter::cda:
      return scaled_within(cda_range, trim.dcda_m2,
                           extremes(a.cda_m2, a.map ? &a.map->cda_m2 : nullptr), 0.0);
    case FitParameter::cla:
      return scaled_within(cla_range, trim.dcla_m2,
                           extremes(a.cla_m2, a.map ? &a.map->cla_m2 : nullptr), least_area);
    case FitParameter::mass:
      return {mass_range.lo / c.mass_kg, mass_range.hi / c.mass_kg};
    case FitParameter::balance: {
      const auto [lo, hi] = extremes(a.balance, a.map ? &a.map->balance : nullptr);
      const double d = trim.dbalance;
      return {balance_range.lo - lo - std::min(d, 0.0), balance_range.hi - hi - std::max(d, 0.0)};
    }
  }
  return {-inf, inf};
}

std::optional<Violation> FitOptions::validate() const {
  return FirstViolation()
      .range("step", step, Range{0.0, 0.2, true, false}, Quantity::fraction)
      .range("huber_kph", huber_kph, positive(), false)
      .range("residual_spacing_m", residual_spacing_m, positive(), Quantity::length)
      .rule(max_iterations >= 1 && max_iterations <= 200, "max_iterations", "must be 1 to 200")
      .rule(alignment_rounds >= 1 && alignment_rounds <= 50, "alignment_rounds", "must be 1 to 50")
      .range("separable_limit", separable_limit, Range{0.0, 1.0, true, true}, false)
      .result();
}

std::string separation_advice(FitParameter a, FitParameter b) {
  using P = FitParameter;
  auto is = [&](P x, P y) { return (a == x && b == y) || (a == y && b == x); };
  auto grip = [](P p) { return p == P::grip || p == P::grip_lat || p == P::grip_long; };
  if ((grip(a) && b == P::cla) || (grip(b) && a == P::cla))
    return "a log of a circuit with fast corners as well as slow ones, fitted with this one "
           "(downforce grows with speed squared, mu does not); fit takes one config, so a log "
           "at another wing level is a fit of its own, whose grip should agree";
  if (is(P::power, P::cda))
    return "a log with full-throttle runs ending at different speeds (drag grows with speed "
           "squared, the engine's force falls with it), or a coast-down in neutral (drag alone)";
  if (a == P::mass || b == P::mass)
    return "the car weighed (fix the mass): mass scales every force's effect at once";
  if (is(P::grip_lat, P::grip_long) || (grip(a) && grip(b)))
    return "a log with long braking zones as well as long steady corners (braking reads "
           "mu_long, steady corners mu_lat)";
  if (a == P::balance || b == P::balance)
    return "a log of a circuit with fast corners as well as slow ones, fitted with this one "
           "(the balance shows where one axle limits: fast corners against slow ones); fit takes "
           "one config, so a log at another wing level is a fit of its own";
  return "a log of another circuit, whose corners and straights weigh the two differently";
}

std::vector<CarValueEdit> fitted_edits(const Car& car, std::size_t config, const FitResult& r) {
  std::vector<CarValueEdit> out;
  const AeroConfig& a = car.configs.at(config);
  const std::string cfg = "aero.configs." + a.name + ".";
  auto area = [&](const char* key, const char* part_key, double f) {
    switch (a.form) {
      case AeroConfig::Form::constant:
        out.push_back({cfg + key, f, 0.0});
        break;
      case AeroConfig::Form::speed_table:
        out.push_back({cfg + "speed_table." + key, f, 0.0});
        break;
      case AeroConfig::Form::ride_height_map:
        out.push_back({cfg + "ride_height_map." + key, f, 0.0});
        break;
      case AeroConfig::Form::forces:
        for (std::size_t i = 0; i < a.parts->parts.size(); ++i)
          out.push_back({cfg + "forces.parts[" + std::to_string(i) + "]." + part_key, f, 0.0});
        break;
    }
  };
  double mu_lat = 1.0, mu_long = 1.0;
  for (std::size_t i = 0; i < r.params.size(); ++i) {
    const double v = r.values[i];
    switch (r.params[i]) {
      case FitParameter::grip:
        mu_lat *= v, mu_long *= v;
        break;
      case FitParameter::grip_lat:
        mu_lat *= v;
        break;
      case FitParameter::grip_long:
        mu_long *= v;
        break;
      case FitParameter::power:
        out.push_back(
            {car.powertrain.ideal ? "powertrain.constant_power" : "powertrain.torque_curve.torque",
             v, 0.0});
        break;
      case FitParameter::cda:
        area("cda", "drag", v);
        break;
      case FitParameter::cla:
        area("cla", "downforce", v);
        break;
      case FitParameter::mass:
        out.push_back({"mass", v, 0.0});
        if (a.mass_kg) out.push_back({cfg + "mass", v, 0.0});
        break;
      case FitParameter::balance:
        if (a.form == AeroConfig::Form::forces)
          throw InvalidInput("fit", broken_rule("free", "the balance of config '" + a.name +
                                                            "' comes from its parts' positions: "
                                                            "a fitted shift cannot be written "
                                                            "into its file"));
        out.push_back(
            {cfg + (a.form == AeroConfig::Form::constant      ? "balance"
                    : a.form == AeroConfig::Form::speed_table ? "speed_table.balance"
                                                              : "ride_height_map.balance"),
             1.0, v});
        break;
    }
  }
  if (mu_long != 1.0) out.insert(out.begin(), {"tyres.mu_long", mu_long, 0.0});
  if (mu_lat != 1.0) out.insert(out.begin(), {"tyres.mu_lat", mu_lat, 0.0});
  return out;
}

}  // namespace lapwing
