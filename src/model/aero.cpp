#include "lapwing/model/aero.hpp"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "lapwing/base/format.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/model/loads.hpp"

namespace lapwing {

namespace {

// Bilinear: linear along the rear axis on the two front nodes, then along the front axis.
double bilinear(const MapGrid& m, const Bracket& f, const Bracket& r) {
  const std::size_t i = f.i, j = r.i;
  return lerp(lerp(m(i, j), m(i, j + 1), r.w), lerp(m(i + 1, j), m(i + 1, j + 1), r.w), f.w);
}

}  // namespace

MapCoefficients map_coefficients(const RideHeightMap& map, double front_m, double rear_m) {
  bool f_off = false, r_off = false;
  const Bracket f = bracket(map.front_m, front_m, &f_off), r = bracket(map.rear_m, rear_m, &r_off);
  return {bilinear(map.cda_m2, f, r), bilinear(map.cla_m2, f, r), bilinear(map.balance, f, r),
          f_off || r_off};
}

namespace {

// The residual of the ride heights h = (front, rear): G(h) = h - (h0 - F(h) / k), zero at the
// operating point, F the aero load on each axle at heights h. `coefficients` gives the map's
// coefficients at h.
template <typename Coefficients>
Eigen::Vector2d ride_residual(const RideHeightMap& map, double q, double z_drag, double wheelbase,
                              const Eigen::Vector2d& h, const Coefficients& coefficients) {
  const MapCoefficients c = coefficients(h);
  const AxleLoads f = aero_axle_loads(q * c.cla_m2, c.balance, q * c.cda_m2, z_drag, wheelbase);
  return Eigen::Vector2d(h[0] - (map.static_front_m - f.front_n / map.stiffness_front_npm),
                         h[1] - (map.static_rear_m - f.rear_n / map.stiffness_rear_npm));
}

constexpr double ride_tolerance_m = 1e-10;  // far below any map's resolution
constexpr double ride_fd_step_m = 1e-7;

// Damped Newton from h on G (`residual`), the Jacobian by forward differences of `fd_step`:
// the residual's norm left.
template <typename Residual>
double ride_newton(const Residual& residual, Eigen::Vector2d& h, double fd_step,
                   int max_iterations) {
  Eigen::Vector2d g = residual(h);
  for (int it = 0; it < max_iterations && g.norm() > ride_tolerance_m; ++it) {
    Eigen::Matrix2d jac;
    for (int k = 0; k < 2; ++k) {
      Eigen::Vector2d hk = h;
      hk[k] += fd_step;
      jac.col(k) = (residual(hk) - g) / fd_step;
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
    if (!next.allFinite()) break;
    h = next;
    g = g_next;
  }
  return g.norm();
}

// A region of one axis of n nodes: the interval from node a to a + 1, or beyond the ends (a = -1
// below the first node, n - 1 above the last, where the map holds its end values); its bracket
// is not held to it (the region's own linear weight, which runs on past its edges).
struct AxisRegion {
  const std::vector<double>& axis;
  long a;  // -1 .. n - 1
  double lo() const { return a < 0 ? -HUGE_VAL : axis[static_cast<std::size_t>(a)]; }
  double hi() const {
    return a + 1 >= static_cast<long>(axis.size()) ? HUGE_VAL
                                                   : axis[static_cast<std::size_t>(a + 1)];
  }
  Bracket at(double x) const {
    const std::size_t n = axis.size();
    if (a < 0) return {0, 0.0};
    if (a + 1 >= static_cast<long>(n)) return {n - 2, 1.0};
    const std::size_t i = static_cast<std::size_t>(a);
    return {i, (x - axis[i]) / (axis[i + 1] - axis[i])};
  }
  // A start inside the region: its middle (k = 0), its low end (1) or its high end (2); a
  // region beyond the axis's end from x held to it.
  double start(double x, int k) const {
    if (a >= 0 && a + 1 < static_cast<long>(axis.size()))
      return k == 0 ? 0.5 * (lo() + hi()) : (k == 1 ? lo() : hi());
    return std::clamp(x, lo(), hi());
  }
  bool holds(double x) const {
    const double width = a >= 0 && a + 1 < static_cast<long>(axis.size()) ? hi() - lo() : 1.0;
    const double slack = 1e-9 * width;
    return x >= lo() - slack && x <= hi() + slack;
  }
};

}  // namespace

AeroPoint solve_ride_heights(const RideHeightMap& map, double v, double rho, double z_drag,
                             double wheelbase, double guess_front, double guess_rear) {
  const double q = 0.5 * rho * v * v;
  const auto on_map = [&](const Eigen::Vector2d& h) { return map_coefficients(map, h[0], h[1]); };
  const auto residual = [&](const Eigen::Vector2d& h) {
    return ride_residual(map, q, z_drag, wheelbase, h, on_map);
  };
  // Damped Newton on the whole map from the guess (continuation from the last speed).
  Eigen::Vector2d h(guess_front, guess_rear);
  double left = ride_newton(residual, h, ride_fd_step_m, 60);
  if (!(left <= ride_tolerance_m) || !h.allFinite()) {
    // The map is bilinear in each of its cells (and held beyond its edges), so G is smooth in
    // each and kinks between them, where a Newton iteration over the whole map can cycle (a
    // map whose cells change steeply: a fuzz campaign's ClA of 3 to 6.7 m2 between neighbouring
    // cells, residual 3.4e-5 m). So region by region: Newton on the region's own polynomial
    // (its bilinear weights run on past its edges), from its middle, a root kept where it lies
    // in the region. G is continuous, so a root of the map is a root of the region it lies in;
    // of several (more than one operating point), the one nearest the guess among the regions
    // near the guess and where the iteration stopped, else among all.
    const long nf = static_cast<long>(map.front_m.size()),
               nr = static_cast<long>(map.rear_m.size());
    const Eigen::Vector2d guess(guess_front, guess_rear);
    bool found = false;
    Eigen::Vector2d best(0.0, 0.0);
    // Region (a, b)'s root, if it has one, into best where it is the nearest to the guess yet.
    const auto try_region = [&](long a, long b) {
      const AxisRegion rf{map.front_m, a}, rr{map.rear_m, b};
      const auto in_region = [&](const Eigen::Vector2d& x) {
        const Bracket f = rf.at(x[0]), r = rr.at(x[1]);
        const auto lin = [&](const MapGrid& m) {
          const std::size_t i = f.i, j = r.i;
          return lerp(lerp(m(i, j), m(i, j + 1), r.w), lerp(m(i + 1, j), m(i + 1, j + 1), r.w),
                      f.w);
        };
        return MapCoefficients{lin(map.cda_m2), lin(map.cla_m2), lin(map.balance), false};
      };
      const auto g = [&](const Eigen::Vector2d& x) {
        return ride_residual(map, q, z_drag, wheelbase, x, in_region);
      };
      // The step of the differences: within the region's width (some maps' axes are close).
      double step = ride_fd_step_m;
      if (a >= 0 && a + 1 < nf) step = std::min(step, 1e-3 * (rf.hi() - rf.lo()));
      if (b >= 0 && b + 1 < nr) step = std::min(step, 1e-3 * (rr.hi() - rr.lo()));
      // From the region's middle, then from its corners (Newton on the region's polynomial
      // can run to a root of it beyond the region).
      constexpr int starts[5][2] = {{0, 0}, {1, 1}, {1, 2}, {2, 1}, {2, 2}};
      for (const auto& s : starts) {
        Eigen::Vector2d x(rf.start(guess_front, s[0]), rr.start(guess_rear, s[1]));
        if (!(ride_newton(g, x, step, 60) <= ride_tolerance_m) || !x.allFinite() ||
            !rf.holds(x[0]) || !rr.holds(x[1]) || !(residual(x).norm() <= ride_tolerance_m))
          continue;
        if (!found || (x - guess).norm() < (best - guess).norm()) best = x;
        found = true;
        return;
      }
    };
    // The region of x on an axis of n nodes (-1 below the first node, n - 1 from the last).
    const auto region_of = [](const std::vector<double>& axis, double x) {
      return static_cast<long>(std::upper_bound(axis.begin(), axis.end(), x) - axis.begin()) - 1;
    };
    // First the regions within two of the guess's and of where the Newton iteration stopped
    // (the cycle is between neighbouring cells), then, where none holds a root, every region.
    std::vector<std::pair<long, long>> near;
    for (const Eigen::Vector2d& p : {guess, h}) {
      if (!p.allFinite()) continue;
      const long pa = region_of(map.front_m, p[0]), pb = region_of(map.rear_m, p[1]);
      for (long a = std::max(-1L, pa - 2); a <= std::min(nf - 1, pa + 2); ++a)
        for (long b = std::max(-1L, pb - 2); b <= std::min(nr - 1, pb + 2); ++b)
          if (std::find(near.begin(), near.end(), std::pair{a, b}) == near.end())
            near.emplace_back(a, b);
    }
    std::sort(near.begin(), near.end());
    for (const auto& [a, b] : near) try_region(a, b);
    if (!found)
      for (long a = -1; a < nf; ++a)
        for (long b = -1; b < nr; ++b)
          if (!std::binary_search(near.begin(), near.end(), std::pair{a, b})) try_region(a, b);
    if (found) {
      h = best;
      left = residual(h).norm();
    }
  }
  if (!(left <= ride_tolerance_m) || !h.allFinite())
    throw std::runtime_error("the ride heights do not converge (residual " + format_readable(left) +
                             " m)");
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
// A speed table's rows: from standstill to 250 m/s (900 km/h), the top of a lap's tables
// (EnvelopeOptions::speed_ceiling_mps): no lap reads a row beyond it.
constexpr Range table_speed_range{0.0, 250.0};

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
    const MapGrid& m;
    Range range;
  };
  for (const Grid& g : {Grid{"ride_height_map.cda", cda_m2, cda_range},
                        Grid{"ride_height_map.cla", cla_m2, cla_range},
                        Grid{"ride_height_map.balance", balance, balance_range}}) {
    const std::size_t rows = g.m.rows(), cols = g.m.cols();
    f.rule(rows == front_m.size(), g.key, [&] {
       return "rows differ from front: expected " + std::to_string(front_m.size()) + ", got " +
              std::to_string(rows);
     }).rule(cols == rear_m.size(), g.key, [&] {
      return "columns differ from rear: expected " + std::to_string(rear_m.size()) + ", got " +
             std::to_string(cols);
    });
    for (std::size_t i = 0; i < rows && !f.found(); ++i)
      for (std::size_t j = 0; j < cols && !f.found(); ++j)
        f.range(index_path(index_path(g.key, i), j), g.m(i, j), g.range, Quantity::number);
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
      f.each(speed, speed_mps, table_speed_range, Quantity::speed)
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

namespace {
// For each of a's parts, the index of b's part of the same name (the k-th of a name with the
// k-th): a family blends a part with its namesake, in whatever order the two configs list them
// (a helper's finding: configs of the same parts in the opposite order were blended front wing
// with diffuser, a balance of 52.3 % where both configs read 48.8). Empty where the names differ.
std::vector<std::size_t> namesakes(const PartsTable& a, const PartsTable& b) {
  std::vector<std::size_t> out;
  if (a.parts.size() != b.parts.size()) return out;
  std::vector<bool> taken(b.parts.size(), false);
  for (const AeroPart& pa : a.parts) {
    std::size_t j = 0;
    while (j < b.parts.size() && (taken[j] || b.parts[j].name != pa.name)) ++j;
    if (j == b.parts.size()) return {};
    taken[j] = true;
    out.push_back(j);
  }
  return out;
}
}  // namespace

std::optional<std::string> blend_mismatch(const AeroConfig& a, const AeroConfig& b) {
  if (a.form != b.form)
    return "'" + a.name + "' is " + std::string(form_name(a.form)) + " and '" + b.name + "' is " +
           std::string(form_name(b.form)) + " (a family's configs share one form)";
  if (a.speed_mps != b.speed_mps)
    return "'" + a.name + "' and '" + b.name + "' have different speed rows";
  if (a.parts) {
    if (a.parts->parts.size() != b.parts->parts.size())
      return "'" + a.name + "' and '" + b.name + "' have different numbers of parts";
    if (namesakes(*a.parts, *b.parts).empty())
      return "'" + a.name + "' and '" + b.name +
             "' name different parts (a family blends each part with its namesake)";
  }
  if (a.map && (a.map->front_m != b.map->front_m || a.map->rear_m != b.map->rear_m))
    return "'" + a.name + "' and '" + b.name + "' have different ride-height axes";
  if (a.trim.has_value() != b.trim.has_value())
    return "one of '" + a.name + "' and '" + b.name + "' has a straight_trim, the other not";
  if (a.mass_kg.has_value() != b.mass_kg.has_value() ||
      a.inertia_factor.has_value() != b.inertia_factor.has_value() ||
      a.cg_height_m.has_value() != b.cg_height_m.has_value() ||
      a.front_weight.has_value() != b.front_weight.has_value() ||
      a.drag_height_m.has_value() != b.drag_height_m.has_value())
    return "'" + a.name + "' and '" + b.name + "' override different car-level values";
  return std::nullopt;
}

namespace {
// base's lerp (a + t (b - a), the one home of linear interpolation) over each element, and
// over a value two configs override alike (blend_mismatch checked that both have it or not).
std::vector<double> lerp_each(const std::vector<double>& a, const std::vector<double>& b,
                              double t) {
  std::vector<double> out(a.size());
  for (std::size_t i = 0; i < a.size(); ++i) out[i] = lerp(a[i], b[i], t);
  return out;
}
std::optional<double> lerp_if(const std::optional<double>& a, const std::optional<double>& b,
                              double t) {
  return a ? std::optional<double>(lerp(*a, *b, t)) : std::nullopt;
}
}  // namespace

AeroConfig blend(const AeroConfig& a, const AeroConfig& b, double t, double wheelbase_m) {
  AeroConfig c = a;
  c.cda_m2 = lerp_each(a.cda_m2, b.cda_m2, t);
  c.cla_m2 = lerp_each(a.cla_m2, b.cla_m2, t);
  c.balance = lerp_each(a.balance, b.balance, t);
  if (a.map) {
    RideHeightMap& m = *c.map;
    const RideHeightMap &ma = *a.map, &mb = *b.map;
    // Cell by cell (the grids share their axes: blend's precondition).
    m.cda_m2.values() = lerp_each(ma.cda_m2.values(), mb.cda_m2.values(), t);
    m.cla_m2.values() = lerp_each(ma.cla_m2.values(), mb.cla_m2.values(), t);
    m.balance.values() = lerp_each(ma.balance.values(), mb.balance.values(), t);
    m.static_front_m = lerp(ma.static_front_m, mb.static_front_m, t);
    m.static_rear_m = lerp(ma.static_rear_m, mb.static_rear_m, t);
    m.stiffness_front_npm = lerp(ma.stiffness_front_npm, mb.stiffness_front_npm, t);
    m.stiffness_rear_npm = lerp(ma.stiffness_rear_npm, mb.stiffness_rear_npm, t);
    const MapCoefficients at_rest = map_coefficients(m, m.static_front_m, m.static_rear_m);
    c.cda_m2 = {at_rest.cda_m2};
    c.cla_m2 = {at_rest.cla_m2};
    c.balance = {at_rest.balance};
  }
  if (a.parts) {
    // Each part's force coefficient F / q blends (the tables may be at different speeds);
    // the blended table is held at a's reference speed and density.
    const double qa = 0.5 * a.parts->density_kg_m3 * a.parts->speed_mps * a.parts->speed_mps;
    const double qb = 0.5 * b.parts->density_kg_m3 * b.parts->speed_mps * b.parts->speed_mps;
    PartsTable& p = *c.parts;
    const std::vector<std::size_t> in_b = namesakes(*a.parts, *b.parts);
    for (std::size_t i = 0; i < p.parts.size(); ++i) {
      const AeroPart &pa = a.parts->parts[i], &pb = b.parts->parts[in_b[i]];
      p.parts[i].drag_n = qa * lerp(pa.drag_n / qa, pb.drag_n / qb, t);
      p.parts[i].downforce_n = qa * lerp(pa.downforce_n / qa, pb.downforce_n / qb, t);
      p.parts[i].x_m = lerp(pa.x_m, pb.x_m, t);
      p.parts[i].z_m = lerp(pa.z_m, pb.z_m, t);
    }
    const PartsReduction red = reduce_parts(p.parts, p.speed_mps, p.density_kg_m3, wheelbase_m);
    c.cda_m2 = {red.cda_m2};
    c.cla_m2 = {red.cla_m2};
    c.balance = {red.balance};
    c.drag_height_m = red.drag_height_m;
  } else {
    c.drag_height_m = lerp_if(a.drag_height_m, b.drag_height_m, t);
  }
  if (a.trim) {
    c.trim->dcda_m2 = lerp(a.trim->dcda_m2, b.trim->dcda_m2, t);
    c.trim->dcla_m2 = lerp(a.trim->dcla_m2, b.trim->dcla_m2, t);
    c.trim->dbalance = lerp(a.trim->dbalance, b.trim->dbalance, t);
    c.trim->below_curvature_1pm = lerp(a.trim->below_curvature_1pm, b.trim->below_curvature_1pm, t);
  }
  c.mass_kg = lerp_if(a.mass_kg, b.mass_kg, t);
  c.inertia_factor = lerp_if(a.inertia_factor, b.inertia_factor, t);
  c.cg_height_m = lerp_if(a.cg_height_m, b.cg_height_m, t);
  c.front_weight = lerp_if(a.front_weight, b.front_weight, t);
  return c;
}

std::optional<Violation> AeroFamily::validate() const {
  FirstViolation f;
  f.rule(setting_rad.size() >= 2, "setting", "a family needs 2 or more settings");
  f.order("setting", setting_rad, true);
  f.rule(configs.size() == setting_rad.size(), "configs", [&] {
    return "expected one config per setting: expected " + std::to_string(setting_rad.size()) +
           ", got " + std::to_string(configs.size());
  });
  if (!f.found() && !setting_rad.empty())
    f.range("at", at_rad, Range{setting_rad.front(), setting_rad.back()}, Quantity::angle);
  return f.result();
}

AeroConfig family_config(const AeroFamily& fam, const std::vector<AeroConfig>& configs,
                         double wheelbase_m) {
  // The measured setting pair around `at`: s_i <= at <= s_i+1, t = (at - s_i) / (s_i+1 - s_i).
  // A measured setting starts its pair (t = 0), so that lerp's a + t (b - a) gives its config
  // exactly; the last setting is the top pair's b, blended from that end (t = 0 again).
  std::size_t i = 0;
  while (i + 2 < fam.setting_rad.size() && fam.at_rad >= fam.setting_rad[i + 1]) ++i;
  const double t =
      (fam.at_rad - fam.setting_rad[i]) / (fam.setting_rad[i + 1] - fam.setting_rad[i]);
  const AeroConfig &a = configs[fam.configs[i]], &b = configs[fam.configs[i + 1]];
  AeroConfig c = t >= 1.0 ? blend(b, a, 0.0, wheelbase_m) : blend(a, b, t, wheelbase_m);
  c.name = fam.name;
  return c;
}

}  // namespace lapwing
