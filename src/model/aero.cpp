#include "lapwing/model/aero.hpp"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace lapwing {

namespace {

// Cell and weight of x on a strictly increasing axis, clamped to the ends.
struct Cell {
  std::size_t i;
  double w;
  bool off;
};
Cell locate(const std::vector<double>& axis, double x) {
  if (x <= axis.front()) return {0, 0.0, x < axis.front()};
  if (x >= axis.back()) return {axis.size() - 2, 1.0, x > axis.back()};
  const auto it = std::upper_bound(axis.begin(), axis.end(), x);
  const std::size_t i = static_cast<std::size_t>(it - axis.begin()) - 1;
  return {i, (x - axis[i]) / (axis[i + 1] - axis[i]), false};
}

double bilinear(const Eigen::MatrixXd& m, const Cell& f, const Cell& r) {
  const auto i = static_cast<Eigen::Index>(f.i), j = static_cast<Eigen::Index>(r.i);
  const double a = m(i, j) + r.w * (m(i, j + 1) - m(i, j));
  const double b = m(i + 1, j) + r.w * (m(i + 1, j + 1) - m(i + 1, j));
  return a + f.w * (b - a);
}

}  // namespace

MapCoefficients map_coefficients(const RideHeightMap& map, double front_m, double rear_m) {
  const Cell f = locate(map.front_m, front_m), r = locate(map.rear_m, rear_m);
  return {bilinear(map.cda_m2, f, r), bilinear(map.cla_m2, f, r), bilinear(map.balance, f, r),
          f.off || r.off};
}

AeroPoint solve_ride_heights(const RideHeightMap& map, double v, double rho, double z_drag,
                             double wheelbase, double guess_front, double guess_rear) {
  const double q = 0.5 * rho * v * v;
  // Residual G(h) = h - (h0 - F(h) / k), zero at the operating point.
  auto residual = [&](const Eigen::Vector2d& h) {
    const MapCoefficients c = map_coefficients(map, h[0], h[1]);
    const double moment = q * c.cda_m2 * z_drag / wheelbase;
    const double f_front = q * c.cla_m2 * c.balance - moment;
    const double f_rear = q * c.cla_m2 * (1.0 - c.balance) + moment;
    return Eigen::Vector2d(h[0] - (map.static_front_m - f_front / map.stiffness_front_npm),
                           h[1] - (map.static_rear_m - f_rear / map.stiffness_rear_npm));
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
