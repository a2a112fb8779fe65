#include "lapwing/path/log_curvature.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/curvature_profile.hpp"
#include "lapwing/path/logged_speed.hpp"
#include "lapwing/path/smoothing.hpp"

namespace lapwing {

namespace {
// A closed log's run past its start is cut only where it is longer than this share of the lap
// (log_curvature): the project's own rule, set above the 0.27 % (7.5 m of Brannock Park's
// 2 741 m) that a lateral acceleration read 1 % low moves the crossing, measured.
constexpr double overrun_min_share = 0.005;
}  // namespace

std::optional<Violation> LogCurvatureOptions::validate() const {
  FirstViolation f;
  if (smoothing_m) f.range("smoothing", *smoothing_m, positive(), Quantity::length);
  return f.range("min_speed", min_speed_mps, positive(), Quantity::speed).result();
}

LogCurvature log_curvature(const LogChannels& log, const LogCurvatureOptions& o) {
  require_valid(o.validate(), "log options");
  std::vector<double> v = log.speed_mps;  // a copy: an overlap past the line is cut off
  const bool by_distance = !log.distance_m.empty(), by_yaw = !log.yaw_rate_radps.empty();
  const std::vector<double>& along = by_distance ? log.distance_m : log.time_s;
  const std::vector<double>& turning = by_yaw ? log.yaw_rate_radps : log.lat_accel_mps2;
  require_valid(FirstViolation()
                    .rule(v.size() >= 2, "speed_mps", "a log needs at least 2 rows")
                    .rule(along.size() == v.size(), by_distance ? "distance_m" : "time_s",
                          "give the distance or the time of every row")
                    .order(by_distance ? "distance_m" : "time_s", along, true)
                    .rule(turning.size() == v.size(), by_yaw ? "yaw_rate_radps" : "lat_accel_mps2",
                          "give the lateral acceleration or the yaw rate of every row")
                    .result(),
                log.source);
  auto row_path = [](const char* column, std::size_t i) {
    return std::string(column) + "[" + std::to_string(i) + "]";
  };
  // Each row within what a car logs: a value beyond is a unit read wrong or a corrupt row (one
  // row of 1e308 m/s2 once overflowed the curvature to infinity: issue 19, finding 6).
  auto beyond = [&](const char* column, const std::vector<double>& c, double limit,
                    const char* what) {
    for (std::size_t i = 0; i < c.size(); ++i)
      if (!(std::abs(c[i]) <= limit))
        throw InvalidInput(
            log.source, broken_rule("", std::string(what) + ": no car logs one; is the unit right?",
                                    row_path(column, i)));
  };
  beyond("speed_mps", v, log_max_row_speed_mps, "a speed beyond 900 km/h");
  if (by_yaw)
    beyond("yaw_rate_radps", turning, log_max_row_yaw_radps,
           "a yaw rate beyond 10 rad/s (573 deg/s)");
  else
    beyond("lat_accel_mps2", turning, log_max_row_lateral_mps2,
           "a lateral acceleration beyond 50 g");
  // Distance: given, or integrated from time.
  std::vector<double> s(v.size(), 0.0);
  if (by_distance) {
    for (std::size_t i = 0; i < s.size(); ++i) s[i] = along[i] - along[0];
  } else {
    s = distance_from_time(along, v);
    for (std::size_t i = 1; i < s.size(); ++i) {
      if (!std::isfinite(s[i])) break;  // beyond any length: refused below
      if (!(s[i] > s[i - 1]))
        throw InvalidInput(log.source, broken_rule("", "the car does not move between these rows",
                                                   row_path("time_s", i)));
    }
  }
  // Curvature: a_y / v^2 or yaw rate / v, bridged over slow rows.
  std::vector<double> k(v.size(), 0.0);
  std::vector<bool> ok(v.size(), false);
  for (std::size_t i = 0; i < k.size(); ++i)
    if (v[i] >= o.min_speed_mps)
      k[i] = by_yaw ? turning[i] / v[i] : turning[i] / (v[i] * v[i]), ok[i] = true;
  {
    // Linear bridges over rows too slow to read curvature from.
    std::size_t last = k.size();
    for (std::size_t i = 0; i < k.size(); ++i) {
      if (!ok[i]) continue;
      if (last == k.size())
        for (std::size_t j = 0; j < i; ++j) k[j] = k[i];
      else
        for (std::size_t j = last + 1; j < i; ++j)
          k[j] = lerp(k[last], k[i], (s[j] - s[last]) / (s[i] - s[last]));
      last = i;
    }
    if (last == k.size())
      throw InvalidInput(log.source,
                         broken_rule("", "no row is fast enough to read curvature from"));
    for (std::size_t j = last + 1; j < k.size(); ++j) k[j] = k[last];
  }
  // The median row spacing (what the log can draw) and the widest gap between rows.
  auto median_spacing = [&] {
    std::vector<double> gaps(s.size() - 1);
    for (std::size_t i = 1; i < s.size(); ++i) gaps[i - 1] = s[i] - s[i - 1];
    std::nth_element(gaps.begin(), gaps.begin() + static_cast<std::ptrdiff_t>(gaps.size() / 2),
                     gaps.end());
    return gaps[gaps.size() / 2];
  };
  double overlap = 0.0, crossing = 0.0;
  if (o.closed && s.size() >= 3 && std::isfinite(s.back())) {
    // A closed lap's log that runs on past the line (a logger stopped some way after it) would
    // make a track as much too long. The rows' own path (their curvature integrated, heading 0
    // at the first row, so the line through the start is x = 0) says where the lap crosses the
    // line again: searched back from the end over the log's last 10 %, moving forward, within
    // 2 % of the length of the start. Cut there when that is more than 2 row spacings, 2 m and
    // 0.5 % of the lap before the end: within 2 spacings the end is the line, as near as the
    // rows can say; within 0.5 % of the lap a run past the line cannot be told from the path's
    // own closure error (a lateral acceleration read 1 % low makes a lap's path cross its start
    // 7.5 m before its end on Brannock Park, measured): that is left in and said
    // (crossing_before_end_m), not cut.
    std::vector<double> x, y, th;
    integrate_path(s, k, x, y, &th);
    const double total = s.back(), spacing = median_spacing();
    for (std::size_t j = s.size() - 1; j >= 2 && s[j] > 0.9 * total; --j) {
      if (!(x[j - 1] < 0.0 && x[j] >= 0.0)) continue;
      if (std::cos(th[j]) > 0.5 && std::abs(y[j]) < 0.02 * total) {
        const double w = -x[j - 1] / (x[j] - x[j - 1]);
        const double cut = lerp(s[j - 1], s[j], w);
        if (total - cut <= std::max(2.0, 2.0 * spacing)) {
          // The end is the line.
        } else if (total - cut <= overrun_min_share * total) {
          crossing = total - cut;
        } else {
          overlap = total - cut;
          k[j] = lerp(k[j - 1], k[j], w);
          v[j] = lerp(v[j - 1], v[j], w);
          s[j] = cut;
          s.resize(j + 1);
          k.resize(j + 1);
          v.resize(j + 1);
        }
      }
      break;
    }
  }
  // Resample evenly and filter.
  const double length = s.back();
  if (!(length <= PathProfile::max_length_m))
    throw InvalidInput(log.source, broken_rule("", "the log covers more than 200 km",
                                               row_path("speed_mps", v.size() - 1)));
  const double h = 0.5;
  const std::size_t n = static_cast<std::size_t>(std::llround(length / h));
  // Too short to be a track (a log of 0.18 m once became a one-row curvature file that no
  // track could load, and a division by zero steps: issue 19, finding 6).
  if (n + 1 < log_min_samples)
    throw InvalidInput(
        log.source,
        broken_rule("",
                    "the log covers " + format_readable(length) + " m; a track from a log needs " +
                        format_readable(h * static_cast<double>(log_min_samples - 1)) +
                        " m at least (" + std::to_string(log_min_samples) + " samples " +
                        format_readable(h) + " m apart)",
                    row_path("speed_mps", v.size() - 1)));
  const double step = length / static_cast<double>(n);
  std::vector<double> rs(n + 1), rk(n + 1), rv(n + 1);
  std::vector<std::size_t> row(n + 1);  // the log row nearest each sample (for errors)
  AxisWalk walk(s);
  for (std::size_t j = 0; j <= n; ++j) {
    const double sj = std::min(length, static_cast<double>(j) * step);
    const Bracket w = walk.at(sj);
    rs[j] = sj;
    rk[j] = at(k, w);
    rv[j] = at(v, w);
    row[j] = w.w < 0.5 ? w.i : w.i + 1;
  }
  LogCurvature out;
  out.length_m = length;
  out.overlap_m = overlap;
  out.crossing_before_end_m = crossing;
  // The log's median row spacing: what its data can draw (the filter's search starts there,
  // and the track's data-quality verdict judges it, not the 0.5 m resampling).
  out.row_spacing_m = median_spacing();
  for (std::size_t i = 1; i < s.size(); ++i)
    if (s[i] - s[i - 1] > out.largest_gap_m)
      out.largest_gap_m = s[i] - s[i - 1], out.largest_gap_row = i;
  // The filter's length: given, or chosen by GCV on the curvature resampled at the log's own
  // median row spacing (so that the samples are about the rows and their noise stays
  // independent from one to the next, as GCV assumes). Second differences, as the filter; a
  // closed lap's curvature is periodic.
  constexpr int log_order = 2;
  if (o.smoothing_m) {
    out.smoothing_m = *o.smoothing_m;
  } else {
    const std::size_t nr = std::max<std::size_t>(
        10, static_cast<std::size_t>(std::llround(length / out.row_spacing_m)));
    const double hr = length / static_cast<double>(nr);
    std::vector<double> kr;
    std::size_t at = 0;
    for (std::size_t j = 0; j < (o.closed ? nr : nr + 1); ++j) {
      const double sj = std::min(length, static_cast<double>(j) * hr);
      while (at + 2 < s.size() && s[at + 1] < sj) ++at;
      const double w = (sj - s[at]) / (s[at + 1] - s[at]);
      kr.push_back(lerp(k[at], k[at + 1], w));
    }
    // From 2 to 100 row spacings (as a centerline's points: centerline.hpp).
    const double lo = 2.0 * hr;
    const double hi = std::max(lo, std::min(100.0 * hr, 0.5 * length));
    const SmoothingChoice g = choose_smoothing({kr}, hr, log_order, o.closed, lo, hi);
    out.smoothing_m = g.length_m;
    out.smoothing = automatic_smoothing_info(g, hr);
  }
  if (o.closed) {
    // Periodic: the last sample is the first again.
    rk.pop_back();
    rk = smooth(rk, step, out.smoothing_m, log_order, true);
    rk.push_back(rk.front());
  } else {
    rk = smooth(rk, step, out.smoothing_m, log_order, false);
  }
  // The peak lateral acceleration, on the filtered curvature (one spiky sample says little).
  {
    std::size_t worst = 0;
    double peak = 0.0;
    for (std::size_t j = 0; j <= n; ++j) {
      const double ay = std::abs(rk[j]) * rv[j] * rv[j];
      if (ay > peak) peak = ay, worst = j;
    }
    out.peak_lateral_g = peak / units::g0;
    out.peak_row = row[worst];
  }
  std::vector<double> x, y, th;
  integrate_path(rs, rk, x, y, &th);
  if (o.closed) {
    // Heading: a whole number of turns. Spread the difference as a constant curvature change.
    const double turns = std::round(th.back() / (2 * units::pi));
    const double dth = turns * 2 * units::pi - th.back();
    out.closure_heading_deg = -dth / units::deg;  // before spreading
    out.turns = th.back() / (2 * units::pi);
    for (double& kk : rk) kk += dth / length;
    integrate_path(rs, rk, x, y, &th);
    out.closure_gap_m = std::hypot(x.back() - x.front(), y.back() - y.front());
    // Position: heading changes d(theta)(s) = a sin(pi s / L) + b sin(2 pi s / L), which vanish
    // at both ends (the heading still closes), chosen so that the end moves by minus the gap:
    // d(end) = integral of (-sin(theta), cos(theta)) d(theta) ds. A few Newton passes.
    for (int pass = 0; pass < 4; ++pass) {
      const double gx = x.back() - x.front(), gy = y.back() - y.front();
      double m11 = 0, m12 = 0, m21 = 0, m22 = 0;
      for (std::size_t j = 0; j < n; ++j) {
        const double sm = 0.5 * (rs[j] + rs[j + 1]), tj = 0.5 * (th[j] + th[j + 1]);
        const double f1 = std::sin(units::pi * sm / length),
                     f2 = std::sin(2 * units::pi * sm / length);
        m11 += -std::sin(tj) * f1 * step;
        m12 += -std::sin(tj) * f2 * step;
        m21 += std::cos(tj) * f1 * step;
        m22 += std::cos(tj) * f2 * step;
      }
      const double det = m11 * m22 - m12 * m21;
      if (std::abs(det) < 1e-12) break;
      const double a = (-gx * m22 + gy * m12) / det, b = (-m11 * gy + m21 * gx) / det;
      // d(kappa) = d/ds of d(theta).
      for (std::size_t j = 0; j <= n; ++j)
        rk[j] += a * units::pi / length * std::cos(units::pi * rs[j] / length) +
                 b * 2 * units::pi / length * std::cos(2 * units::pi * rs[j] / length);
      integrate_path(rs, rk, x, y, &th);
    }
  }
  // The tightest turn left (a lap closed over a few metres, or a slow log's a_y / v^2, can end
  // beyond the 1/m of any track: the caller refuses it, after its own checks).
  for (std::size_t j = 0; j <= n; ++j)
    if (!(std::abs(rk[j]) <= std::abs(out.tightest_1pm))) {
      out.tightest_1pm = rk[j];
      out.tightest_row = row[j];
    }
  out.s_m = std::move(rs);
  out.curvature_1pm = std::move(rk);
  return out;
}

}  // namespace lapwing
