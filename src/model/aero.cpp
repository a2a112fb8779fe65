#include "lapwing/model/aero.hpp"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include "lapwing/base/interpolate.hpp"
#include "lapwing/model/loads.hpp"

namespace lapwing {

namespace {

// Bilinear: linear along the rear axis on the two front nodes, then along the front axis.
double bilinear(const Eigen::MatrixXd& m, const Bracket& f, const Bracket& r) {
  const auto i = static_cast<Eigen::Index>(f.i), j = static_cast<Eigen::Index>(r.i);
  return lerp(lerp(m(i, j), m(i, j + 1), r.w), lerp(m(i + 1, j), m(i + 1, j + 1), r.w), f.w);
}

}  // namespace

MapCoefficients map_coefficients(const RideHeightMap& map, double front_m, double rear_m) {
  bool f_off = false, r_off = false;
  const Bracket f = bracket(map.front_m, front_m, &f_off), r = bracket(map.rear_m, rear_m, &r_off);
  return {bilinear(map.cda_m2, f, r), bilinear(map.cla_m2, f, r), bilinear(map.balance, f, r),
          f_off || r_off};
}

AeroPoint solve_ride_heights(const RideHeightMap& map, double v, double rho, double z_drag,
                             double wheelbase, double guess_front, double guess_rear) {
  const double q = 0.5 * rho * v * v;
  // Residual G(h) = h - (h0 - F(h) / k), zero at the operating point.
  auto residual = [&](const Eigen::Vector2d& h) {
    const MapCoefficients c = map_coefficients(map, h[0], h[1]);
    const AxleLoads f = aero_axle_loads(q * c.cla_m2, c.balance, q * c.cda_m2, z_drag, wheelbase);
    return Eigen::Vector2d(h[0] - (map.static_front_m - f.front_n / map.stiffness_front_npm),
                           h[1] - (map.static_rear_m - f.rear_n / map.stiffness_rear_npm));
  };
  constexpr double tolerance_m = 1e-10;  // far below any map's resolution
  constexpr int max_iterations = 60;
  constexpr double fd_step_m = 1e-7;
  Eigen::Vector2d h(guess_front, guess_rear);
  Eigen::Vector2d g = residual(h);
  for (int it = 0; it < max_iterations && g.norm() > tolerance_m; ++it) {
    // Jacobian by forward differences (the map is piecewise bilinear, so this is its slope).
    Eigen::Matrix2d jac;
    for (int k = 0; k < 2; ++k) {
      Eigen::Vector2d hk = h;
      hk[k] += fd_step_m;
      jac.col(k) = (residual(hk) - g) / fd_step_m;
    }
    Eigen::Vector2d step = jac.fullPivLu().solve(-g);
    if (!step.allFinite()) step = -g;  // singular: a plain fixed-point step
    // Damping: halve the step until the residual falls.
    double t = 1.0;
    Eigen::Vector2d next = h + step, g_next = residual(next);
    while (g_next.norm() >= g.norm() && t > 1e-6) {
      t *= 0.5;
      next = h + t * step;
      g_next = residual(next);
    }
    h = next;
    g = g_next;
  }
  if (!(g.norm() <= tolerance_m) || !h.allFinite())
    throw std::runtime_error("the ride heights do not converge (residual " +
                             std::to_string(g.norm()) + " m)");
  const MapCoefficients c = map_coefficients(map, h[0], h[1]);
  return {c.cda_m2, c.cla_m2, c.balance, h[0], h[1], c.off, h[0] <= 0.0 || h[1] <= 0.0};
}

PartsReduction reduce_parts(const std::vector<AeroPart>& parts, double v, double rho,
                            double wheelbase) {
  const double q = 0.5 * rho * v * v;
  double drag = 0.0, down = 0.0, front = 0.0, drag_moment = 0.0;
  for (const auto& p : parts) {
    drag += p.drag_n;
    down += p.downforce_n;
    // Lever rule: a force at x rearward of the front axle puts (L - x) / L of itself on it.
    front += p.downforce_n * (wheelbase - p.x_m) / wheelbase;
    drag_moment += p.drag_n * p.z_m;
  }
  return {drag / q, down / q, down != 0.0 ? front / down : 0.5,
          drag != 0.0 ? drag_moment / drag : 0.0};
}

namespace {

// The ranges of a config's coefficients (README, "Car").
constexpr Range cda_range{0.0, 20.0}, cla_range{0.0, 30.0}, balance_range{0.0, 1.0};

std::string index_path(const std::string& key, std::size_t i) {
  return key + "[" + std::to_string(i) + "]";
}

}  // namespace

std::optional<Violation> RideHeightMap::validate_axes() const {
  FirstViolation f;
  const Range height{-0.5, 1.0};
  f.each("ride_height_map.front", front_m, height, Quantity::length)
      .each("ride_height_map.rear", rear_m, height, Quantity::length);
  for (const auto& [key, axis] :
       {std::pair<std::string, const std::vector<double>*>{"ride_height_map.front", &front_m},
        {"ride_height_map.rear", &rear_m}})
    f.rule(axis->size() >= 2, key, "a map needs at least 2 points per axis")
        .order(key, *axis, true);
  return f.result();
}

std::optional<Violation> RideHeightMap::validate() const {
  FirstViolation f;
  f.part("", [&] { return validate_axes(); });
  struct Grid {
    const char* key;
    const Eigen::MatrixXd& m;
    Range range;
  };
  for (const Grid& g : {Grid{"ride_height_map.cda", cda_m2, cda_range},
                        Grid{"ride_height_map.cla", cla_m2, cla_range},
                        Grid{"ride_height_map.balance", balance, balance_range}}) {
    const auto rows = static_cast<std::size_t>(g.m.rows()),
               cols = static_cast<std::size_t>(g.m.cols());
    f.rule(rows == front_m.size(), g.key, [&] {
       return "rows differ from front: expected " + std::to_string(front_m.size()) + ", got " +
              std::to_string(rows);
     }).rule(cols == rear_m.size(), g.key, [&] {
      return "columns differ from rear: expected " + std::to_string(rear_m.size()) + ", got " +
             std::to_string(cols);
    });
    for (std::size_t i = 0; i < rows && !f.found(); ++i)
      for (std::size_t j = 0; j < cols && !f.found(); ++j)
        f.range(index_path(index_path(g.key, i), j),
                g.m(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)), g.range,
                Quantity::number);
  }
  const Range at_rest{0.0, 1.0, true, false}, stiffness{0.0, 1e9, true, false};
  return f.range("static_ride_height.front", static_front_m, at_rest, Quantity::length)
      .range("static_ride_height.rear", static_rear_m, at_rest, Quantity::length)
      .range("heave_stiffness.front", stiffness_front_npm, stiffness, Quantity::stiffness)
      .range("heave_stiffness.rear", stiffness_rear_npm, stiffness, Quantity::stiffness)
      .result();
}

std::optional<Violation> PartsTable::validate() const {
  FirstViolation f;
  f.range("speed", speed_mps, Range{0.0, 200.0, true, false}, Quantity::speed)
      .range("density", density_kg_m3, Range{0.5, 1.5}, Quantity::number)
      .rule(!parts.empty(), "parts", "a parts table needs at least one part");
  for (std::size_t i = 0; i < parts.size() && !f.found(); ++i) {
    const AeroPart& p = parts[i];
    const std::string at = index_path("parts", i);
    f.range(at + ".drag", p.drag_n, non_negative(), Quantity::force)
        .range(at + ".downforce", p.downforce_n, Range{-1e6, 1e6}, Quantity::force)
        .range(at + ".x", p.x_m, Range{-5.0, 15.0}, Quantity::length)
        .range(at + ".z", p.z_m, Range{0.0, 3.0}, Quantity::length);
  }
  double down = 0.0;
  for (const auto& p : parts) down += p.downforce_n;
  return f
      .rule(down > 0.0, "parts",
            [&] {
              return "the parts' downforce sums to " + std::to_string(down) +
                     " N: net lift is not modelled";
            })
      .result();
}

std::optional<Violation> AeroConfig::validate() const {
  FirstViolation f;
  const bool one_row =
      speed_mps.empty() && cda_m2.size() == 1 && cla_m2.size() == 1 && balance.size() == 1;
  switch (form) {
    case Form::constant:
      f.rule(one_row, "", "a constant config has one value each of cda, cla and balance");
      if (!f.found())
        f.range("cda", cda_m2[0], cda_range, Quantity::area)
            .range("cla", cla_m2[0], cla_range, Quantity::area)
            .range("balance", balance[0], balance_range, Quantity::fraction);
      break;
    case Form::speed_table: {
      const std::string speed = "speed_table.speed";
      const std::size_t n = speed_mps.size();
      f.each(speed, speed_mps, non_negative(), Quantity::speed)
          .rule(n >= 2, speed, "a table needs at least 2 rows")
          .order(speed, speed_mps, true);
      struct Column {
        const char* key;
        const std::vector<double>& v;
        Range range;
        Quantity q;
      };
      for (const Column& c :
           {Column{"speed_table.cda", cda_m2, cda_range, Quantity::area},
            Column{"speed_table.cla", cla_m2, cla_range, Quantity::area},
            Column{"speed_table.balance", balance, balance_range, Quantity::fraction}})
        f.each(c.key, c.v, c.range, c.q).rule(c.v.size() == n, c.key, [&] {
          return "size differs from speed: expected " + std::to_string(n) + ", got " +
                 std::to_string(c.v.size());
        });
      break;
    }
    case Form::forces:
      // The parts' own rules are PartsTable's; these are the coefficients they reduce to.
      f.rule(one_row, "", "a config from forces has one value each of cda, cla and balance");
      if (!f.found())
        f.rule(balance_range.contains(balance[0]), "forces.parts",
               [&] {
                 return "the parts put " + std::to_string(100 * balance[0]) +
                        " % of the downforce on the front axle: outside 0..100 %";
               })
            .rule(cla_range.contains(cla_m2[0]) && cda_range.contains(cda_m2[0]), "forces.parts",
                  [&] {
                    return "the parts give CdA " + std::to_string(cda_m2[0]) + " m2, ClA " +
                           std::to_string(cla_m2[0]) + " m2: beyond the ranges of a config";
                  });
      break;
    case Form::ride_height_map:
      f.rule(map.has_value(), "ride_height_map", "a ride-height map config needs its map")
          .part("", [&] { return map->validate(); })
          .rule(one_row, "", "a map config has one value each of cda, cla and balance (at rest)");
      break;
  }
  if (trim) {
    const StraightTrim& t = *trim;
    f.range("straight_trim.cda", t.dcda_m2, Range{-20.0, 20.0}, Quantity::area)
        .range("straight_trim.cla", t.dcla_m2, Range{-30.0, 30.0}, Quantity::area)
        .range("straight_trim.balance", t.dbalance, Range{-1.0, 1.0}, Quantity::number)
        .range("straight_trim.below_curvature", t.below_curvature_1pm, Range{0.0, 1.0, true, false},
               Quantity::number);
    // Rows known now are checked now; a map's are checked where its ride heights are solved
    // (the Envelope).
    for (std::size_t k = 0; k < cda_m2.size() && !map && !f.found(); ++k) {
      const double cda = cda_m2[k] + t.dcda_m2, cla = cla_m2[k] + t.dcla_m2,
                   bal = balance[k] + t.dbalance;
      f.rule(cda >= 0.0 && cla >= 0.0 && bal >= 0.0 && bal <= 1.0, "straight_trim", [&] {
        return "straight_trim takes CdA, ClA or balance out of range (CdA " + std::to_string(cda) +
               " m2, ClA " + std::to_string(cla) + " m2, balance " + std::to_string(bal) + ")";
      });
    }
  }
  return f.result();
}

std::string_view form_name(AeroConfig::Form f) {
  switch (f) {
    case AeroConfig::Form::constant:
      return "constant";
    case AeroConfig::Form::speed_table:
      return "speed_table";
    case AeroConfig::Form::forces:
      return "forces";
    case AeroConfig::Form::ride_height_map:
      return "ride_height_map";
  }
  return "constant";
}

}  // namespace lapwing
