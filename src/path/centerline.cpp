#include "lapwing/path/centerline.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <sstream>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/interpolate.hpp"
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

// The points' polyline (closed: with the chord from the last point back to the first):
// cumulative chord length at each point.
std::vector<double> chord_lengths(const CenterlinePoints& p, bool closed) {
  const std::size_t m = p.x_m.size();
  std::vector<double> c(m + (closed ? 1 : 0), 0.0);
  for (std::size_t i = 1; i < c.size(); ++i) {
    const std::size_t a = i - 1, b = i % m;
    c[i] = c[i - 1] + std::hypot(p.x_m[b] - p.x_m[a], p.y_m[b] - p.y_m[a]);
  }
  return c;
}

// Samples every total / n of chord length along the points (n of them closed, n + 1 open). x and
// y follow a cubic Hermite curve through the points, parametrised by chord length, with the
// tangents of central differences, (p_{i+1} - p_{i-1}) / (c_{i+1} - c_{i-1}) (Catmull-Rom in
// chord length; one-sided at an open path's ends): samples on straight chords would cut every
// bend by the chord's sagitta, c^2 / (8 R), which a light fit reads as curvature noise (points
// 1 m apart round an 18 m hairpin: 7 mm, a tenth of the hairpin's curvature). Elevation and
// widths are linear along the chords.
struct Samples {
  double h = 0.0;
  std::vector<double> x, y, z, wl, wr, bank;
  std::vector<std::size_t> nearest;  // the data point nearest each sample (for errors)
  std::size_t size() const { return x.size(); }
};
Samples resample(const CenterlinePoints& p, bool closed, const std::vector<double>& c,
                 std::size_t n) {
  const std::size_t m = p.x_m.size();
  const double total = c.back();
  // Tangents (dx/dc, dy/dc) at each point.
  std::vector<double> tx(m), ty(m);
  for (std::size_t i = 0; i < m; ++i) {
    std::size_t a = i == 0 ? (closed ? m - 1 : 0) : i - 1;
    std::size_t b = i + 1 == m ? (closed ? 0 : m - 1) : i + 1;
    // Chord distance from a to b through i (c holds the closing chord at index m).
    double ca = i == 0 ? (closed ? c[m - 1] - c[m] : c[0]) : c[i - 1];
    double cb = i + 1 == m ? (closed ? c[m] : c[m - 1]) : c[i + 1];
    const double dc = cb - ca;
    tx[i] = dc > 0.0 ? (p.x_m[b] - p.x_m[a]) / dc : 0.0;
    ty[i] = dc > 0.0 ? (p.y_m[b] - p.y_m[a]) / dc : 0.0;
  }
  Samples r;
  r.h = total / static_cast<double>(n);
  const std::size_t samples = closed ? n : n + 1;
  const bool has_z = !p.z_m.empty(), has_w = !p.width_left_m.empty();
  std::size_t seg = 0;
  for (std::size_t j = 0; j < samples; ++j) {
    const double s = std::min(total, static_cast<double>(j) * r.h);
    while (seg + 2 < c.size() && c[seg + 1] < s) ++seg;
    const std::size_t a = seg, b = (seg + 1) % m;
    const double d = c[seg + 1] - c[seg];
    const double w = d > 0.0 ? (s - c[seg]) / d : 0.0;
    auto at = [&](const std::vector<double>& v) { return lerp(v[a], v[b], w); };
    // Hermite basis: h00 = 2t^3 - 3t^2 + 1, h10 = t^3 - 2t^2 + t, h01 = -2t^3 + 3t^2,
    // h11 = t^3 - t^2.
    const double w2 = w * w, w3 = w2 * w;
    const double h00 = 2 * w3 - 3 * w2 + 1, h10 = w3 - 2 * w2 + w, h01 = -2 * w3 + 3 * w2,
                 h11 = w3 - w2;
    r.x.push_back(h00 * p.x_m[a] + h10 * d * tx[a] + h01 * p.x_m[b] + h11 * d * tx[b]);
    r.y.push_back(h00 * p.y_m[a] + h10 * d * ty[a] + h01 * p.y_m[b] + h11 * d * ty[b]);
    r.nearest.push_back(w < 0.5 ? a : b);
    if (has_z) r.z.push_back(at(p.z_m));
    if (has_w) {
      r.wl.push_back(at(p.width_left_m));
      r.wr.push_back(at(p.width_right_m));
    }
    if (!p.bank_rad.empty()) r.bank.push_back(at(p.bank_rad));
  }
  return r;
}

// Where smoothing the widths made the track wider than its survey by more than
// widened_note_m (a narrowing shorter than the smoothing length: a kerb, a pit wall's nose),
// a note with the place and the figures: a racing line (track line) is bounded by the smoothed
// widths and may pass outside the surveyed edge there (a helper's finding: one row 1 m from
// the edge, and the line passed 1.33 m beyond it). The lap on the centerline is not affected.
constexpr double widened_note_m = 0.25;
void note_widened(const Samples& r, PathProfile& p, double smoothing_m) {
  double worst = widened_note_m, at_s = 0.0, raw = 0.0, smooth = 0.0;
  const char* side = nullptr;
  for (std::size_t j = 0; j < r.wl.size(); ++j)
    for (const bool left : {true, false}) {
      const double given = left ? r.wl[j] : r.wr[j];
      const double made = left ? p.width_left_m[j] : p.width_right_m[j];
      if (made - given > worst) {
        worst = made - given;
        at_s = static_cast<double>(j) * r.h;
        raw = given;
        smooth = made;
        side = left ? "left" : "right";
      }
    }
  if (!side) return;
  p.notes.push_back("the widths are smoothed over " + fixed(smoothing_m, 1) + " m: at " +
                    fixed(at_s, 1) + " m along the points the " + side + " edge is " +
                    fixed(raw, 2) + " m from the centerline as surveyed and " + fixed(smooth, 2) +
                    " m after smoothing, the most any edge moves out: a racing line there may "
                    "pass up to " +
                    fixed(worst, 2) +
                    " m beyond the surveyed edge (a narrowing shorter than the smoothing)");
}

constexpr int xy_order = 3;  // third differences: curvature (a second derivative) stays smooth

}  // namespace

double centerline_fit_spacing(double smoothing_m, double finest_m) {
  // lambda = (L / (pi h))^6 roughly: at L / h = 40 that is 4.3e6.
  return std::max(finest_m, smoothing_m / 40.0);
}

std::optional<Violation> CenterlineOptions::validate() const {
  FirstViolation f;
  if (smoothing_m) f.range("smoothing", *smoothing_m, positive(), Quantity::length);
  return f.range("elevation_smoothing", elevation_smoothing_m, positive(), Quantity::length)
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
  return fit_centerline(std::make_shared<const CenterlinePoints>(points), closed, o);
}

PathProfile fit_centerline(std::shared_ptr<const CenterlinePoints> given, bool closed,
                           const CenterlineOptions& o) {
  assert(given);
  require_valid(o.validate(), "centerline options");
  {
    const CenterlinePoints& g = *given;
    const std::size_t n = g.x_m.size();
    FirstViolation f;
    f.rule(n >= min_centerline_points, "x_m", "a centerline needs at least 10 points")
        .rule(g.y_m.size() == n && (g.z_m.empty() || g.z_m.size() == n), "y_m",
              "x_m, y_m (and z_m) differ in length")
        .rule(g.width_left_m.size() == g.width_right_m.size() &&
                  (g.width_left_m.empty() || g.width_left_m.size() == n),
              "width_left_m", "give both widths (width_left_m and width_right_m) for every point")
        .rule(g.bank_rad.empty() || g.bank_rad.size() == n, "bank_deg",
              "give a bank angle for every point");
    // A width is the distance from the centerline to that edge: > 0.
    for (const auto* w : {&g.width_left_m, &g.width_right_m}) {
      const std::string name = w == &g.width_left_m ? "width_left_m" : "width_right_m";
      for (std::size_t i = 0; i < w->size() && !f.found(); ++i)
        f.rule((*w)[i] > 0.0, name,
               name + " " + format_number((*w)[i]) +
                   " m is not a width: the distance from the centerline to the edge must be > 0",
               name + "[" + std::to_string(i) + "]");
    }
    require_valid(f.result(), g.source);
  }
  // A closed centerline may repeat its first point at the end: drop it.
  std::shared_ptr<const CenterlinePoints> points = given;
  if (closed && std::hypot(given->x_m.back() - given->x_m.front(),
                           given->y_m.back() - given->y_m.front()) < 1e-6) {
    auto trimmed = std::make_shared<CenterlinePoints>(*given);
    for (auto* v : {&trimmed->x_m, &trimmed->y_m, &trimmed->z_m, &trimmed->width_left_m,
                    &trimmed->width_right_m, &trimmed->bank_rad})
      if (!v->empty()) v->pop_back();
    points = std::move(trimmed);
  }
  const CenterlinePoints& pts = *points;
  const std::size_t m = pts.x_m.size();
  PathProfile p;
  p.source = PathProfile::Source::centerline;
  p.data_file = pts.source;
  p.elevation_smoothing_m = o.elevation_smoothing_m;
  {
    // The data as given, for the closure check (mesh.cpp): the gap from the last point to the
    // first, which the closed fit bridges, against the median point spacing.
    std::vector<double> chords(m - 1);
    for (std::size_t i = 1; i < m; ++i)
      chords[i - 1] = std::hypot(pts.x_m[i] - pts.x_m[i - 1], pts.y_m[i] - pts.y_m[i - 1]);
    std::nth_element(chords.begin(),
                     chords.begin() + static_cast<std::ptrdiff_t>(chords.size() / 2), chords.end());
    p.point_spacing_m = chords[chords.size() / 2];
    p.data_closure_gap_m =
        std::hypot(pts.x_m.back() - pts.x_m.front(), pts.y_m.back() - pts.y_m.front());
    p.last_point_index = m - 1;
  }
  const std::vector<double> c = chord_lengths(pts, closed);
  const double total = c.back();
  if (!(total <= PathProfile::max_length_m)) {
    // Name the widest gap between points (the first of the widest): a stray point is the usual
    // cause. Each gap on its own, as the sum can overflow where no gap does (coordinates near
    // 1e308: a robustness campaign's, which read "inf km long ... inf m from the one before").
    std::size_t worst = 1;
    double widest = -1.0;
    for (std::size_t i = 1; i < c.size(); ++i) {
      const std::size_t a = i - 1, b = i % m;
      const double gap = std::hypot(pts.x_m[b] - pts.x_m[a], pts.y_m[b] - pts.y_m[a]);
      if (gap > widest) {
        widest = gap;
        worst = i;
      }
    }
    const std::size_t row = std::min(worst, m - 1);
    const std::string length = std::isfinite(total) ? format_readable(total / 1000.0) + " km long"
                                                    : "longer than a double can hold";
    const std::string gap =
        std::isfinite(widest) ? format_readable(widest) + " m" : "further than a double can hold";
    throw InvalidInput(pts.source, broken_rule("",
                                               "the centerline is " + length +
                                                   " (at most 200 km); this point is " + gap +
                                                   " from the one before",
                                               "x_m[" + std::to_string(row) + "]"));
  }
  auto samples_at = [&](double step) {
    return std::max<std::size_t>(10, static_cast<std::size_t>(std::llround(total / step)));
  };

  // The smoothing length: given, or chosen by GCV on the points themselves, one sample each
  // (their noise is independent from one to the next, as GCV assumes; samples interpolated
  // between them would look like signal and be kept). Their spacing is taken as even; the
  // length follows from lambda at the spacing of the path GCV fitted through them (noise
  // lengthens the chords between the raw points: 0.5 m of it on points 2 m apart, by 10 %).
  double length = 0.0;
  if (o.smoothing_m) {
    length = *o.smoothing_m;
  } else {
    const double intervals = static_cast<double>(closed ? m : m - 1);
    const double h0 = total / intervals;
    const double lo = gcv_min_spacings * h0;
    const double hi = std::max(lo, std::min(gcv_max_spacings * h0, 0.5 * total));
    const SmoothingChoice g = choose_smoothing({pts.x_m, pts.y_m}, h0, xy_order, closed, lo, hi);
    const auto gxy = smooth_lambda_all({pts.x_m, pts.y_m}, g.lambda, xy_order, closed);
    const std::vector<double>& gx = gxy[0];
    const std::vector<double>& gy = gxy[1];
    double fitted = 0.0;
    for (std::size_t i = 1; i < m + (closed ? 1 : 0); ++i)
      fitted += std::hypot(gx[i % m] - gx[i - 1], gy[i % m] - gy[i - 1]);
    const double h1 = fitted / intervals;
    length = smoothing_length(h1, g.lambda, xy_order);
    p.smoothing = automatic_smoothing_info(g, h1);
  }
  p.smoothing_m = length;

  const Samples r = resample(
      pts, closed, c,
      samples_at(o.fixed_spacing ? o.spacing_m : centerline_fit_spacing(length, o.spacing_m)));
  const double h = r.h;
  p.sample_spacing_m = h;
  const std::size_t samples = r.size();
  const auto fxy = smooth_all({r.x, r.y}, h, length, xy_order, closed);
  const std::vector<double>& fx = fxy[0];
  const std::vector<double>& fy = fxy[1];
  std::vector<double> res(samples);
  for (std::size_t j = 0; j < samples; ++j) res[j] = std::hypot(r.x[j] - fx[j], r.y[j] - fy[j]);
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
    os << "the centerline fitted over " << length << " m turns tighter than a 1 m radius "
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
    throw InvalidInput(pts.source,
                       broken_rule("", os.str(), "x_m[" + std::to_string(r.nearest[j]) + "]"));
  }
  // Raw curvature (over 5 m chords, so that it is finite) against the fitted one: the noise the
  // fit removed.
  {
    const std::size_t step = std::max<std::size_t>(1, static_cast<std::size_t>(5.0 / h));
    std::vector<double> rawk, fitk;
    for (std::size_t j = step; j + step < samples; j += step) {
      const double ax = r.x[j - step], ay = r.y[j - step], bx = r.x[j], by = r.y[j],
                   cx = r.x[j + step], cy = r.y[j + step];
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
  if (!r.z.empty()) {
    elev = smooth(r.z, h, o.elevation_smoothing_m, 2, closed);
    grade = derivative(elev, h, closed);
    // The grades segment tracks and curvature profiles take (Segment::grade_range, +-50 %:
    // steeper is no road); beyond it, most likely z_m in another unit than metres.
    for (std::size_t j = 0; j < grade.size(); ++j) {
      if (std::abs(grade[j]) <= Segment::grade_range.hi) continue;
      std::ostringstream os;
      os.precision(3);
      os << "the elevation climbs or falls by more than 50 % (a grade of " << 100.0 * grade[j]
         << " % at " << static_cast<double>(j) * h << " m along the points, smoothed over "
         << o.elevation_smoothing_m << " m): steeper is no road; z_m in metres?";
      throw InvalidInput(pts.source,
                         broken_rule("", os.str(), "z_m[" + std::to_string(r.nearest[j]) + "]"));
    }
  }
  // The widths and the bank alike, from one factorisation: smoothed over the path's smoothing
  // length (a survey's bank is as noisy as its edges).
  std::vector<std::vector<double>> sides;
  if (!r.wl.empty()) {
    sides.push_back(r.wl);
    sides.push_back(r.wr);
  }
  if (!r.bank.empty()) sides.push_back(r.bank);
  if (!sides.empty()) {
    std::vector<std::vector<double>> smoothed = smooth_all(sides, h, length, 1, closed);
    if (!r.bank.empty()) {
      p.bank_rad = std::move(smoothed.back());
      smoothed.pop_back();
    }
    if (!r.wl.empty()) {
      p.width_left_m = std::move(smoothed[0]);
      p.width_right_m = std::move(smoothed[1]);
      note_widened(r, p, length);
    }
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
    if (!p.width_left_m.empty())
      for (auto* v : {&p.width_left_m, &p.width_right_m}) v->push_back(v->front());
    if (!p.bank_rad.empty()) p.bank_rad.push_back(p.bank_rad.front());
  }
  p.points = std::move(points);
  return p;
}

PathProfile refit_centerline(const PathProfile& profile, bool closed, double factor) {
  assert(profile.points && profile.source == PathProfile::Source::centerline);
  CenterlineOptions o;
  o.smoothing_m = profile.smoothing_m * factor;
  o.elevation_smoothing_m = profile.elevation_smoothing_m;
  // The same samples as the fit itself, so that only the strength differs.
  o.spacing_m = profile.sample_spacing_m;
  o.fixed_spacing = true;
  PathProfile p = fit_centerline(profile.points, closed, o);
  p.notes = profile.notes;
  p.geodetic = profile.geodetic;
  return p;
}

}  // namespace lapwing
