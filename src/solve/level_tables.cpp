#include "lapwing/solve/level_tables.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "lapwing/model/loads.hpp"
#include "lapwing/solve/axle.hpp"
#include "lapwing/solve/envelope.hpp"

namespace lapwing {

// The share of the tolerance a cell's middle may miss by. For a smooth function the middle is
// where a cubic's error is largest (the error is f^(4) / 24 (t + 1) t (t - 1) (t - 2) h^4,
// whose factor peaks over the cell at t = 1/2: 9/16); where the function kinks in a
// neighbouring cell (the breaks of a speed-dependent aero coefficient) the error elsewhere in
// the cell can be a few times that at the middle. A quarter of the tolerance keeps the whole
// cell within it (tests/solve/level_tables_test.cpp samples the cells between their middles).
constexpr double check_share = 0.25;

CellCubics::CellCubics(const std::vector<double>& nodes, double h, double tolerance,
                       const std::function<double(std::size_t)>& exact_mid)
    : inv_h_(1.0 / h) {
  const std::size_t n = nodes.size();
  if (n < 4) return;
  const std::size_t cells = n - 1;
  cells_.resize(cells);
  std::vector<std::uint8_t> bad(cells, 0);
  for (std::size_t i = 0; i < cells; ++i) {
    // The four nodes s..s+3 nearest cell i, at t = p, p+1, p+2, p+3 (t = x / h - i).
    const std::size_t s = std::min(i == 0 ? 0 : i - 1, n - 4);
    const double p = static_cast<double>(s) - static_cast<double>(i);
    const double y0 = nodes[s], y1 = nodes[s + 1], y2 = nodes[s + 2], y3 = nodes[s + 3];
    // Newton's divided differences on a unit grid, then the monomials in t: with q = t - p,
    // f = y0 + d1 q + d2 q (q - 1) + d3 q (q - 1) (q - 2).
    const double d1 = y1 - y0, d2 = (y2 - 2.0 * y1 + y0) / 2.0,
                 d3 = (y3 - 3.0 * y2 + 3.0 * y1 - y0) / 6.0;
    // In q: a0 + a1 q + a2 q^2 + a3 q^3.
    const double a0 = y0, a1 = d1 - d2 + 2.0 * d3, a2 = d2 - 3.0 * d3, a3 = d3;
    // q = t - p: shift to t.
    std::array<double, 4>& c = cells_[i];
    c[0] = a0 - a1 * p + a2 * p * p - a3 * p * p * p;
    c[1] = a1 - 2.0 * a2 * p + 3.0 * a3 * p * p;
    c[2] = a2 - 3.0 * a3 * p;
    c[3] = a3;
    const double mid = c[0] + 0.5 * (c[1] + 0.5 * (c[2] + 0.5 * c[3]));
    const double want = exact_mid(i);
    if (!(std::abs(mid - want) <= check_share * tolerance)) bad[i] = 1;
  }
  for (std::size_t i = 0; i < cells; ++i)
    if (bad[i] || (i > 0 && bad[i - 1]) || (i + 1 < cells && bad[i + 1]))
      cells_[i][0] = std::numeric_limits<double>::quiet_NaN();
  top_ = static_cast<double>(cells);
}

std::size_t CellCubics::kept_cells() const {
  return static_cast<std::size_t>(std::count_if(
      cells_.begin(), cells_.end(), [](const std::array<double, 4>& c) { return c[0] == c[0]; }));
}

LevelTables build_level_tables(const Envelope& env) {
  LevelTables t;
  const Road level{};
  const double top = env.max_speed_mps() * env.max_speed_mps();
  const std::size_t cells = LevelTables::cell_count;
  const double h = top / static_cast<double>(cells);
  constexpr double unlimited = std::numeric_limits<double>::infinity();
  auto table = [&](auto f) {
    AxleHints hints;  // node to node, as a sweep's steps
    std::vector<double> nodes(cells + 1);
    for (std::size_t i = 0; i <= cells; ++i) nodes[i] = f(static_cast<double>(i) * h, hints);
    return CellCubics(nodes, h, LevelTables::tolerance_mps2, [&](std::size_t i) {
      return f((static_cast<double>(i) + 0.5) * h, hints);
    });
  };
  t.brake = table(
      [&](double u, AxleHints& hints) { return axle_brake_accel(env, u, 0.0, level, &hints); });
  t.grip = table([&](double u, AxleHints& hints) {
    return axle_drive_accel(env, u, 0.0, level, unlimited, false, &hints);
  });
  if (env.has_trim())
    t.grip_trimmed = table([&](double u, AxleHints& hints) {
      return axle_drive_accel(env, u, 0.0, level, unlimited, true, &hints);
    });
  return t;
}

}  // namespace lapwing
