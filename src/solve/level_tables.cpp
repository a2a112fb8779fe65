#include "lapwing/solve/level_tables.hpp"

#include <boost/math/tools/roots.hpp>

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
// A cell's cubic misses the function anywhere in the cell by some share of the largest fourth
// difference |y_w - 4 y_(w+1) + 6 y_(w+2) - 4 y_(w+3) + y_(w+4)| of the four five-node windows
// that hold a node of its stencil (nodes i-3 .. i+4). The share, measured over 3,000 places of
// the break (tests/solve/level_tables_test.cpp): 0.023 for a smooth quartic (the interpolation
// error f''''/24 (t + 1) t (t - 1) (t - 2) h^4, at most 9/16 of that over the cell; Burden &
// Faires, Numerical Analysis, sec. 3.1, from memory), 0.064 for a jump in the second
// derivative, 0.33 for a jump, 0.375 for a kink; for sums of two kinks and a quartic, and of
// three kinks, 1.22 at most over 20,000 seeded random draws each. Several breaks inside eight nodes
// could cancel in all four windows, so this is a screen, not a bound: a cell is kept without asking
// the model at its middle only where twice its largest difference is within the check's share of
// the tolerance (two, where one break needs 0.375), the rest are checked at their middles as
// before. The tables' functions break at few places in eight nodes (the binding axle changes,
// a ride-height map's join) besides the Envelope's rows, whose ripple between rows (1.3e-8
// m/s^2 at most, LevelTables::tolerance_mps2) neither check sees all of.
constexpr double fourth_difference_share = 2.0;

CellCubics::CellCubics(const std::vector<double>& nodes, double h, double tolerance,
                       const std::function<double(std::size_t)>& exact_mid, bool screen)
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
    // Sure from the nodes alone where the fourth differences around the cell are small
    // (fourth_difference_share); else the model at the cell's middle decides.
    if (screen && i >= 3 && i + 5 <= n) {
      // A node without a value (NaN: the lateral table's search found none) leaves the cell
      // to its check (the comparison fails), which drops it and its neighbours where its own
      // cubic reads the node, as before.
      bool sure = true;
      for (std::size_t w = i - 3; w <= i && sure; ++w)
        sure =
            fourth_difference_share * std::abs(nodes[w] - 4.0 * nodes[w + 1] + 6.0 * nodes[w + 2] -
                                               4.0 * nodes[w + 3] + nodes[w + 4]) <=
            check_share * tolerance;
      if (sure) continue;
    }
    ++mid_checks_;
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

namespace {
// The lateral limit's nodes to 50 bits (1e-15 relative), so that they carry no noise of their
// own into the cubics.
constexpr int lateral_node_bits = 50;
}  // namespace

LevelTables build_level_tables(const Envelope& env) {
  LevelTables t;
  const Road level{};
  const double top = env.max_speed_mps() * env.max_speed_mps();
  const bool over_speed = !env.aero().one_row();
  // The fourth differences' screen (CellCubics), off with a ride-height map.
  const bool screen = !env.has_map();
  constexpr double unlimited = std::numeric_limits<double>::infinity();
  auto table_of = [&](std::size_t cells, auto f) {
    const double h = top / static_cast<double>(cells);
    AxleHints hints;  // node to node, as a sweep's steps
    std::vector<double> nodes(cells + 1);
    for (std::size_t i = 0; i <= cells; ++i) nodes[i] = f(static_cast<double>(i) * h, hints);
    return CellCubics(
        nodes, h, LevelTables::tolerance_mps2,
        [&](std::size_t i) { return f((static_cast<double>(i) + 0.5) * h, hints); }, screen);
  };
  // A table in `cell_count` cells where that keeps at least LevelTables::min_kept_share of
  // them, else in `fine_cell_count` (LevelTables::cell_count).
  auto table = [&](auto f) {
    if (over_speed) return table_of(LevelTables::fine_cell_count, f);
    CellCubics coarse = table_of(LevelTables::cell_count, f);
    if (static_cast<double>(coarse.kept_cells()) >=
        LevelTables::min_kept_share * static_cast<double>(coarse.cells()))
      return coarse;
    return table_of(LevelTables::fine_cell_count, f);
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
  // The lateral limit A(u) at every node and cell middle: the largest a with the steady usage
  // at most 1 at curvature a / u (TOMS 748, the feasible end), bracketed around a guess (a
  // node's extrapolated from the two before it, a middle's the cubic through the four nodes
  // around it) by +-1e-6 of it, widened a hundredfold until it brackets, then by doubling from
  // 0: four or five evaluations a node where a bracket of +-2 % took ten.
  const std::size_t lc = LevelTables::lateral_cell_count;
  t.lateral_du = top / static_cast<double>(lc);
  auto lateral = [&](double u, double guess) {
    namespace tools = boost::math::tools;
    const double v = std::sqrt(u);
    auto excess = [&](double a) { return axle_steady_excess(env, v, a / u, level); };
    std::uintmax_t iters = 200;
    const auto eps = tools::eps_tolerance<double>(lateral_node_bits);
    if (guess > 0.0) {
      for (double w = 1e-6; w < 0.05; w *= 100.0) {
        const double a = (1.0 - w) * guess, b = (1.0 + w) * guess;
        const double fa = excess(a);
        if (!(fa <= 0.0)) continue;
        const double fb = excess(b);
        if (fb > 0.0) return tools::toms748_solve(excess, a, b, fa, fb, eps, iters).first;
      }
    }
    double lo = 0.0, hi = guess > 0.0 ? guess : 1.0, f_hi = excess(hi);
    for (int k = 0; k < 200 && f_hi <= 0.0; ++k) {
      lo = hi;
      hi *= 2.0;
      f_hi = excess(hi);
    }
    const double f_lo = excess(lo);
    // No bracket (a car that cannot hold itself on the level, or no limit found): no node, and
    // the cells around it keep no cubic.
    if (!(f_hi > 0.0) || !(f_lo <= 0.0)) return std::numeric_limits<double>::quiet_NaN();
    return tools::toms748_solve(excess, lo, hi, f_lo, f_hi, eps, iters).first;
  };
  // Node 0 (u = 0, where a curvature cannot make a lateral acceleration) is read a thousandth of
  // a cell up: cell 0's check fails if that is not close enough, and the search answers there.
  std::vector<double>& a = t.lateral_nodes;
  a.resize(lc + 1);
  for (std::size_t i = 0; i <= lc; ++i) {
    const double guess = i >= 2 ? 2.0 * a[i - 1] - a[i - 2] : (i == 1 ? a[0] : 0.0);
    a[i] = lateral((i == 0 ? 1e-3 : static_cast<double>(i)) * t.lateral_du, guess);
  }
  t.lateral_limit = CellCubics(
      a, t.lateral_du, LevelTables::lateral_tolerance_mps2,
      [&](std::size_t i) {
        const double guess = i >= 1 && i + 2 <= lc
                                 ? (9.0 * (a[i] + a[i + 1]) - a[i - 1] - a[i + 2]) / 16.0
                                 : 0.5 * (a[i] + a[i + 1]);
        return lateral((static_cast<double>(i) + 0.5) * t.lateral_du, guess);
      },
      screen);
  // The steady usage grows with the curvature at the top speed, up to the top node's edge, where
  // no tyre there reaches the mu floor (LevelTables::top_usage_grows): each axle's load at a_x =
  // 0 on the level at the top speed, its outer tyre's at the top node's lateral force (half the
  // axle's load and the transfer, at most the whole of it: an inner tyre lifted).
  {
    const Envelope::RoadForces f = env.road_forces(env.rows(false), top, 0.0, level);
    const AxleLoads at_top =
        axle_loads(env.car(), f.drag_n, f.downforce_n, f.balance, f.normal_share, 0.0, 0.0);
    const double fy = env.mass_kg() * a[lc];  // NaN where the top node has no value
    const double onset = env.tyres().floor_onset_load_n();
    const auto outer = [fy](double axle_n, double transfer_per_n) {
      return std::min(axle_n, 0.5 * axle_n + transfer_per_n * fy);
    };
    t.top_usage_grows = fy == fy && outer(at_top.front_n, env.transfer().front) < onset &&
                        outer(at_top.rear_n, env.transfer().rear) < onset;
  }
  t.lateral_falls = true;
  for (std::size_t i = 1; i < lc && t.lateral_falls; ++i) {
    const double here = a[i] / (static_cast<double>(i) * t.lateral_du);
    const double next = a[i + 1] / (static_cast<double>(i + 1) * t.lateral_du);
    t.lateral_falls = here > 0.0 && next <= here * (1.0 - 1e-12);
  }
  return t;
}

std::shared_ptr<const StepTables> StepTableCache::get(double h,
                                                      const std::function<StepTables()>& build) {
  const std::lock_guard<std::mutex> lock(mutex_);
  for (const auto& t : kept_)
    if (t->h == h) return t;
  auto t = std::make_shared<const StepTables>(build());
  if (kept_.size() < max_kept) kept_.push_back(t);
  return t;
}

std::size_t StepTableCache::kept() {
  const std::lock_guard<std::mutex> lock(mutex_);
  return kept_.size();
}

bool LevelTables::steady_grip_speed(double k, double& v, std::size_t* cell) const {
  if (!(k > 0.0) || lateral_nodes.empty()) return false;
  const std::size_t n = lateral_nodes.size() - 1;
  auto holds = [&](std::size_t i) {  // A(u_i) >= k u_i
    return lateral_nodes[i] >= k * (static_cast<double>(i) * lateral_du);
  };
  // The limit is the top speed, or below the first node: the search's.
  if (holds(n) || !holds(1)) return false;
  std::size_t lo = 1, hi = n;  // holds(lo), !holds(hi)
  // Where the nodes fall (lateral_falls) the node sought is the single one with holds(lo) and
  // !holds(lo + 1): any bracket of it narrows to it. The node given (the caller's guess) and
  // its neighbours first.
  if (cell && lateral_falls && *cell >= 1 && *cell < n) {
    const std::size_t c = *cell;
    if (holds(c)) {
      lo = c;
      if (!holds(c + 1))
        hi = c + 1;
      else if (c + 2 <= n) {
        lo = c + 1;
        if (!holds(c + 2)) hi = c + 2;
      }
    } else {
      hi = c;  // c >= 2: holds(1)
      if (holds(c - 1))
        lo = c - 1;
      else
        hi = c - 1;
    }
  }
  while (hi - lo > 1) {
    const std::size_t mid = (lo + hi) / 2;
    (holds(mid) ? lo : hi) = mid;
  }
  if (cell) *cell = lo;
  const std::array<double, 4>* c = lateral_limit.cubic(lo);
  if (!c) return false;
  // g(t) = A(t) - k u(t) over the cell, g(0) >= 0 > g(1): Newton, kept inside the bracket.
  const double u0 = static_cast<double>(lo) * lateral_du, ku = k * lateral_du;
  const auto& a = *c;
  // The first iterate where the chord through the cell's ends crosses 0 (g is nearly linear
  // over a cell: two or three Newton steps from there, where the cell's middle took four to
  // six); the middle where the ends do not bracket (rounding at a node).
  const double g0 = a[0] - k * u0, g1 = ((a[0] + a[1]) + (a[2] + a[3])) - k * u0 - ku;
  const double chord = g0 / (g0 - g1);
  double tl = 0.0, th = 1.0, t = chord > 0.0 && chord < 1.0 ? chord : 0.5;
  for (int it = 0; it < 60; ++it) {
    const double g = a[0] + t * (a[1] + t * (a[2] + t * a[3])) - k * u0 - ku * t;
    const double dg = a[1] + t * (2.0 * a[2] + 3.0 * t * a[3]) - ku;
    (g >= 0.0 ? tl : th) = t;
    double next = dg < 0.0 ? t - g / dg : 0.5 * (tl + th);
    if (!(next > tl && next < th)) next = 0.5 * (tl + th);
    if (th - tl <= 1e-13) {
      t = tl;
      break;
    }
    if (std::abs(next - t) <= 1e-13) {  // converged: the root less a step, feasible (g >= 0)
      t = std::max(tl, next - 1e-12);
      break;
    }
    t = next;
  }
  v = std::sqrt(u0 + t * lateral_du) * (1.0 - steady_speed_share);
  return true;
}

}  // namespace lapwing
