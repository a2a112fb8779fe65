#include "lapwing/path/centerline.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/path/geodesy.hpp"
#include "lapwing/path/smoothing.hpp"

namespace lapwing {

namespace {

// Derivative of evenly spaced samples: central differences, periodic or one-sided at the ends.
std::vector<double> derivative(const std::vector<double>& f, double h, bool periodic) {
  const std::size_t n = f.size();
  std::vector<double> d(n);
  for (std::size_t i = 0; i < n; ++i) {
    if (periodic) {
      d[i] = (f[(i + 1) % n] - f[(i + n - 1) % n]) / (2 * h);
    } else if (i == 0) {
      d[i] = (f[1] - f[0]) / h;
    } else if (i + 1 == n) {
      d[i] = (f[n - 1] - f[n - 2]) / h;
    } else {
      d[i] = (f[i + 1] - f[i - 1]) / (2 * h);
    }
  }
  return d;
}

// kappa = (x' y'' - y' x'') / (x'^2 + y'^2)^(3/2)
std::vector<double> curvature_of(const std::vector<double>& x, const std::vector<double>& y,
                                 double h, bool periodic) {
  const auto x1 = derivative(x, h, periodic), y1 = derivative(y, h, periodic);
  const auto x2 = derivative(x1, h, periodic), y2 = derivative(y1, h, periodic);
  std::vector<double> k(x.size());
  for (std::size_t i = 0; i < k.size(); ++i)
    k[i] = (x1[i] * y2[i] - y1[i] * x2[i]) / std::pow(x1[i] * x1[i] + y1[i] * y1[i], 1.5);
  return k;
}

double rms(const std::vector<double>& a, const std::vector<double>& b) {
  double s = 0.0;
  for (std::size_t i = 0; i < a.size(); ++i) s += (a[i] - b[i]) * (a[i] - b[i]);
  return std::sqrt(s / static_cast<double>(a.size()));
}

}  // namespace

std::optional<Violation> CenterlineOptions::validate() const {
  return FirstViolation()
      .range("smoothing", smoothing_m, positive(), Quantity::length)
      .range("elevation_smoothing", elevation_smoothing_m, positive(), Quantity::length)
      .range("spacing", spacing_m, Range{0.01, 100.0}, Quantity::length)
      .result();
}

CenterlinePoints project_wgs84(std::string source, const std::vector<double>& lat,
                               const std::vector<double>& lon, const std::vector<double>& alt) {
  CenterlinePoints p;
  p.source = std::move(source);
  const bool has_alt = !alt.empty();
  for (std::size_t i = 0; i < lat.size(); ++i) {
    if (std::abs(lat[i]) > 90.0 || std::abs(lon[i]) > 180.0)
      throw InvalidInput(p.source, broken_rule("", "latitude or longitude out of range",
                                               "lat_deg[" + std::to_string(i) + "]"));
    const double h = has_alt ? alt[i] : 0.0;
    const auto enu =
        wgs84::to_enu(wgs84::to_ecef(lat[i], lon[i], h), lat[0], lon[0], has_alt ? alt[0] : 0.0);
    p.x_m.push_back(enu[0]);
    p.y_m.push_back(enu[1]);
    if (has_alt) p.z_m.push_back(enu[2]);
  }
  return p;
}

PathProfile fit_centerline(const CenterlinePoints& points, bool closed,
                           const CenterlineOptions& o) {
  require_valid(o.validate(), "centerline options");
  std::vector<double> x = points.x_m, y = points.y_m, z = points.z_m;
  require_valid(FirstViolation()
                    .rule(x.size() >= 10, "x_m", "a centerline needs at least 10 points")
                    .rule(y.size() == x.size() && (z.empty() || z.size() == x.size()), "y_m",
                          "x_m, y_m (and z_m) differ in length")
                    .result(),
                points.source);
  PathProfile p;
  p.source = PathProfile::Source::centerline;
  p.data_file = points.source;
  p.smoothing_m = o.smoothing_m;
  p.elevation_smoothing_m = o.elevation_smoothing_m;
  // A closed centerline may repeat its first point at the end: drop it.
  if (closed && std::hypot(x.back() - x.front(), y.back() - y.front()) < 1e-6) {
    x.pop_back();
    y.pop_back();
    if (!z.empty()) z.pop_back();
  }
  const std::size_t m = x.size();
  {
    // The data as given, for the closure check (mesh.cpp): the gap from the last point to the
    // first, which the closed fit bridges with a chord, against the median point spacing.
    std::vector<double> chords(m - 1);
    for (std::size_t i = 1; i < m; ++i)
      chords[i - 1] = std::hypot(x[i] - x[i - 1], y[i] - y[i - 1]);
    std::nth_element(chords.begin(),
                     chords.begin() + static_cast<std::ptrdiff_t>(chords.size() / 2), chords.end());
    p.point_spacing_m = chords[chords.size() / 2];
    p.data_closure_gap_m = std::hypot(x.back() - x.front(), y.back() - y.front());
    p.last_point_index = m - 1;
  }
  // Chord lengths, then samples evenly spaced along them.
  std::vector<double> c(m + (closed ? 1 : 0), 0.0);
  for (std::size_t i = 1; i < c.size(); ++i) {
    const std::size_t a = i - 1, b = i % m;
    c[i] = c[i - 1] + std::hypot(x[b] - x[a], y[b] - y[a]);
  }
  const double total = c.back();
  if (total > PathProfile::max_length_m) {
    // Name the widest gap between points: a stray point is the usual cause.
    std::size_t worst = 1;
    for (std::size_t i = 1; i < c.size(); ++i)
      if (c[i] - c[i - 1] > c[worst] - c[worst - 1]) worst = i;
    const std::size_t row = std::min(worst, points.x_m.size() - 1);
    throw InvalidInput(
        points.source,
        broken_rule("",
                    "the centerline is " + std::to_string(total / 1000.0) +
                        " km long (at most 200 km); this point is " +
                        std::to_string(c[worst] - c[worst - 1]) + " m from the one before",
                    "x_m[" + std::to_string(row) + "]"));
  }
  const std::size_t n =
      std::max<std::size_t>(10, static_cast<std::size_t>(std::llround(total / o.spacing_m)));
  const double h = total / static_cast<double>(n);
  const std::size_t samples = closed ? n : n + 1;
  std::vector<double> rx(samples), ry(samples), rz(z.empty() ? 0 : samples);
  std::vector<std::size_t> nearest(samples);  // the data point nearest each sample (for errors)
  std::size_t seg = 0;
  for (std::size_t j = 0; j < samples; ++j) {
    const double s = std::min(total, static_cast<double>(j) * h);
    while (seg + 2 < c.size() && c[seg + 1] < s) ++seg;
    const std::size_t a = seg, b = (seg + 1) % m;
    const double w = c[seg + 1] > c[seg] ? (s - c[seg]) / (c[seg + 1] - c[seg]) : 0.0;
    rx[j] = x[a] + w * (x[b] - x[a]);
    ry[j] = y[a] + w * (y[b] - y[a]);
    if (!z.empty()) rz[j] = z[a] + w * (z[b] - z[a]);
    nearest[j] = w < 0.5 ? a : b;
  }
  // The fit.
  constexpr int order = 3;
  const auto fx = smooth(rx, h, o.smoothing_m, order, closed);
  const auto fy = smooth(ry, h, o.smoothing_m, order, closed);
  std::vector<double> res(samples);
  for (std::size_t j = 0; j < samples; ++j) res[j] = std::hypot(rx[j] - fx[j], ry[j] - fy[j]);
  p.fit_residual_rms_m = rms(res, std::vector<double>(samples, 0.0));
  const auto k = curvature_of(fx, fy, h, closed);
  // The fit must be a road: nowhere tighter than a 1 m radius, as a curvature file's rows are
  // checked. A path that runs out and straight back (a cusp) has none (0 / 0) at its turn, or
  // one far beyond 1/m, and a lap of it would mean nothing (issue 19, finding 7).
  // The turn between consecutive chords of the fit is checked too: where the path reverses
  // between two samples its derivatives need not vanish on the grid, and the curvature formula
  // can read 0 (a straight that runs back on itself).
  auto chord_turn = [&](std::size_t j) {  // turn per metre from chord j - 1 to chord j
    const std::size_t a = (j + samples - 1) % samples, b = (j + 1) % samples;
    const double ux = fx[j] - fx[a], uy = fy[j] - fy[a], vx = fx[b] - fx[j], vy = fy[b] - fy[j];
    const double turn = std::atan2(ux * vy - uy * vx, ux * vx + uy * vy);
    return turn / (0.5 * (std::hypot(ux, uy) + std::hypot(vx, vy)));
  };
  for (std::size_t j = 0; j < samples; ++j) {
    const bool inner = closed || (j > 0 && j + 1 < samples);
    const double turn = inner ? chord_turn(j) : 0.0;
    if (std::abs(k[j]) <= max_curvature_1pm && std::abs(turn) <= max_curvature_1pm) continue;
    std::ostringstream os;
    os.precision(3);
    os << "the centerline fitted over " << o.smoothing_m << " m turns tighter than a 1 m radius "
       << "near this point (";
    if (std::isfinite(k[j]) && std::abs(k[j]) > max_curvature_1pm)
      os << "curvature " << k[j] << " 1/m";
    else if (std::isfinite(turn))
      os << "a turn of " << std::abs(turn) << " rad/m between chords";
    else
      os << "no curvature: the path stops and turns back";
    os << " at " << static_cast<double>(j) * h
       << " m along the points): a cusp, a point out of place or points out of order; fix the "
          "points, or smooth over a longer length";
    throw InvalidInput(points.source,
                       broken_rule("", os.str(), "x_m[" + std::to_string(nearest[j]) + "]"));
  }
  // Raw curvature (over 5 m chords, so that it is finite) against the fitted one: the noise the
  // fit removed.
  {
    const std::size_t step = std::max<std::size_t>(1, static_cast<std::size_t>(5.0 / h));
    std::vector<double> rawk, fitk;
    for (std::size_t j = step; j + step < samples; j += step) {
      const double ax = rx[j - step], ay = ry[j - step], bx = rx[j], by = ry[j], cx = rx[j + step],
                   cy = ry[j + step];
      // Curvature of the circle through three points: 2 cross / (|ab| |bc| |ca|).
      const double cross = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
      const double den = std::hypot(bx - ax, by - ay) * std::hypot(cx - bx, cy - by) *
                         std::hypot(cx - ax, cy - ay);
      if (den <= 0.0) continue;
      rawk.push_back(2.0 * cross / den);
      fitk.push_back(k[j]);
    }
    p.curvature_noise_rms_1pm = rawk.empty() ? 0.0 : rms(rawk, fitk);
  }
  std::vector<double> grade(samples, 0.0), elev(samples, 0.0);
  if (!z.empty()) {
    elev = smooth(rz, h, o.elevation_smoothing_m, 2, closed);
    grade = derivative(elev, h, closed);
  }
  // The profile along the fitted path's own length.
  p.s_m.assign(samples, 0.0);
  for (std::size_t j = 1; j < samples; ++j)
    p.s_m[j] = p.s_m[j - 1] + std::hypot(fx[j] - fx[j - 1], fy[j] - fy[j - 1]);
  p.x_m = fx;
  p.y_m = fy;
  p.curvature_1pm = k;
  p.grade = grade;
  p.elevation_m = elev;
  if (closed) {
    // Close the loop: the last sample is the first again.
    p.s_m.push_back(p.s_m.back() + std::hypot(fx.front() - fx.back(), fy.front() - fy.back()));
    for (auto* v : {&p.x_m, &p.y_m, &p.curvature_1pm, &p.grade, &p.elevation_m})
      v->push_back(v->front());
  }
  return p;
}

}  // namespace lapwing
