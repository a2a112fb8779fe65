#include "lapwing/io/track_import.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <sstream>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/io/line_track.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/geodesy.hpp"
#include "lapwing/path/smoothing.hpp"

namespace lapwing {

namespace {

constexpr double max_path_m = 200e3;  // a path longer than 200 km is no circuit: bad data

// Heading and positions from curvature along s (trapezoid for heading, midpoint for position).
void integrate_path(const std::vector<double>& s, const std::vector<double>& k,
                    std::vector<double>& x, std::vector<double>& y, std::vector<double>* heading) {
  const std::size_t n = s.size();
  x.assign(n, 0.0);
  y.assign(n, 0.0);
  double th = 0.0;
  if (heading) heading->assign(n, 0.0);
  for (std::size_t i = 1; i < n; ++i) {
    const double ds = s[i] - s[i - 1];
    const double th1 = th + 0.5 * (k[i - 1] + k[i]) * ds;
    const double mid = 0.5 * (th + th1);
    x[i] = x[i - 1] + ds * std::cos(mid);
    y[i] = y[i - 1] + ds * std::sin(mid);
    th = th1;
    if (heading) (*heading)[i] = th;
  }
}

// A note naming the columns of `t` that are not among `used`: data the user may think was read.
void note_unused_columns(const CsvTable& t, const std::vector<std::string>& used,
                         const std::string& reads, PathProfile& p) {
  std::string unused;
  int count = 0;
  for (const auto& name : t.names)
    if (std::find(used.begin(), used.end(), name) == used.end()) {
      unused += (unused.empty() ? "'" : ", '") + name + "'";
      ++count;
    }
  if (count > 0)
    p.notes.push_back(t.file + ": column" + (count > 1 ? "s " : " ") + unused + " not used (" +
                      reads + ")");
}

}  // namespace

PathProfile import_centerline(const std::string& file, bool closed, const CenterlineOptions& o) {
  const CsvTable t = read_csv(file, 10);
  auto pts = std::make_shared<CenterlinePoints>();
  pts->closed = closed;
  std::vector<double>&x = pts->x_m, &y = pts->y_m, &z = pts->z_m;
  bool geodetic = false;
  std::vector<int> lines = t.lines;  // file line of each point kept
  if (t.find("x_m") >= 0 || t.find("y_m") >= 0) {
    require_no_duplicates(t, {"x_m", "y_m"});
    x = t.column("x_m");
    y = t.column("y_m");
    if (t.find("z_m") >= 0) z = t.column("z_m");
  } else if (t.find("lat_deg") >= 0 || t.find("lon_deg") >= 0) {
    require_no_duplicates(t, {"lat_deg", "lon_deg"});
    const auto& lat = t.column("lat_deg");
    const auto& lon = t.column("lon_deg");
    const bool has_alt = t.find("alt_m") >= 0;
    for (std::size_t i = 0; i < t.rows(); ++i) {
      if (std::abs(lat[i]) > 90.0 || std::abs(lon[i]) > 180.0)
        throw InputError(file, Mark{t.lines[i], 1}, "latitude or longitude out of range");
      const double h = has_alt ? t.column("alt_m")[i] : 0.0;
      const auto enu = wgs84::to_enu(wgs84::to_ecef(lat[i], lon[i], h), lat[0], lon[0],
                                     has_alt ? t.column("alt_m")[0] : 0.0);
      x.push_back(enu[0]);
      y.push_back(enu[1]);
      if (has_alt) z.push_back(enu[2]);
    }
    geodetic = true;
  } else {
    throw InputError(file, Mark{1, 1},
                     "a centerline needs columns x_m,y_m[,z_m] or lat_deg,lon_deg[,alt_m]");
  }
  // Widths: both columns or neither; every width positive (the distance from the centerline to
  // that edge).
  {
    const int left = t.find("width_left_m"), right = t.find("width_right_m");
    if ((left >= 0) != (right >= 0))
      throw InputError(file, Mark{1, 1},
                       std::string("a centerline with widths needs both width_left_m and "
                                   "width_right_m (only ") +
                           (left >= 0 ? "width_left_m" : "width_right_m") + " is given)");
    if (left >= 0) {
      for (const int c : {left, right}) {
        const auto& w = t.columns[static_cast<std::size_t>(c)];
        for (std::size_t i = 0; i < w.size(); ++i)
          if (!(w[i] > 0.0))
            throw InputError(file, Mark{t.lines[i], 1},
                             t.names[static_cast<std::size_t>(c)] + " " + format_number(w[i]) +
                                 " m is not a width: the distance from the centerline to the "
                                 "edge must be > 0");
      }
      pts->width_left_m = t.columns[static_cast<std::size_t>(left)];
      pts->width_right_m = t.columns[static_cast<std::size_t>(right)];
    }
  }
  PathProfile note_holder;
  note_unused_columns(
      t,
      geodetic
          ? std::vector<std::string>{"lat_deg", "lon_deg", "alt_m", "width_left_m", "width_right_m"}
          : std::vector<std::string>{"x_m", "y_m", "z_m", "width_left_m", "width_right_m"},
      "a centerline reads x_m, y_m, z_m or lat_deg, lon_deg, alt_m, and width_left_m, "
      "width_right_m",
      note_holder);
  // A closed centerline may repeat its first point at the end: drop it.
  if (closed && std::hypot(x.back() - x.front(), y.back() - y.front()) < 1e-6) {
    for (auto* v : {&x, &y, &z, &pts->width_left_m, &pts->width_right_m})
      if (!v->empty()) v->pop_back();
    lines.pop_back();
  }
  {
    // A path longer than 200 km is no circuit: name the widest gap between points (a stray point
    // is the usual cause).
    const std::size_t m = x.size();
    double total = 0.0, widest = 0.0;
    std::size_t worst = 1;
    for (std::size_t i = 1; i < m + (closed ? 1 : 0); ++i) {
      const double chord = std::hypot(x[i % m] - x[i - 1], y[i % m] - y[i - 1]);
      total += chord;
      if (chord > widest) widest = chord, worst = i;
    }
    if (total > max_path_m) {
      const std::size_t row = std::min(worst, t.lines.size() - 1);
      throw InputError(file, Mark{t.lines[row], 1},
                       "the centerline is " + std::to_string(total / 1000.0) +
                           " km long (at most 200 km); this point is " + std::to_string(widest) +
                           " m from the one before");
    }
  }
  PathProfile p = fit_centerline(pts, o);
  p.data_file = file;
  p.geodetic = geodetic;
  p.last_point_line = lines.back();
  p.notes = std::move(note_holder.notes);
  return p;
}

PathProfile import_curvature(const std::string& file) {
  const CsvTable t = read_csv(file, 10);
  require_increasing(t, "distance_m");
  PathProfile p;
  p.source = PathProfile::Source::curvature;
  p.data_file = file;
  const auto& d = t.column("distance_m");
  p.s_m.resize(d.size());
  for (std::size_t i = 0; i < d.size(); ++i) p.s_m[i] = d[i] - d[0];
  if (p.s_m.back() > max_path_m)
    throw InputError(file, Mark{t.lines.back(), 1}, "the profile is longer than 200 km");
  p.curvature_1pm = t.column("curvature_1pm");
  for (std::size_t i = 0; i < p.curvature_1pm.size(); ++i)
    if (std::abs(p.curvature_1pm[i]) > 1.0)
      throw InputError(file, Mark{t.lines[i], 1}, "curvature beyond 1/m (a radius under 1 m)");
  p.grade = t.find("grade") >= 0 ? t.column("grade") : std::vector<double>(d.size(), 0.0);
  for (std::size_t i = 0; i < p.grade.size(); ++i)
    if (std::abs(p.grade[i]) > 0.5)
      throw InputError(file, Mark{t.lines[i], 1}, "grade beyond +-50 %");
  p.has_bank = t.find("bank_deg") >= 0;
  note_unused_columns(t, {"distance_m", "curvature_1pm", "grade", "bank_deg"},
                      "a curvature profile reads distance_m, curvature_1pm, grade, bank_deg", p);
  integrate_path(p.s_m, p.curvature_1pm, p.x_m, p.y_m, nullptr);
  p.elevation_m.assign(d.size(), 0.0);
  for (std::size_t i = 1; i < d.size(); ++i)
    p.elevation_m[i] =
        p.elevation_m[i - 1] + 0.5 * (p.grade[i - 1] + p.grade[i]) * (p.s_m[i] - p.s_m[i - 1]);
  return p;
}

namespace {
// The curvature profile a log becomes (the columns import_curvature reads).
struct ProfileRow {
  double s_m, curvature_1pm;
};
constexpr CsvColumn<ProfileRow> profile_columns[] = {
    {"distance_m", [](std::string& o, const ProfileRow& r) { csv_number(o, r.s_m); }},
    {"curvature_1pm", [](std::string& o, const ProfileRow& r) { csv_number(o, r.curvature_1pm); }},
};
}  // namespace

LogTrack track_from_log(const LogOptions& o, const std::string& csv_name) {
  const CsvTable t = read_csv(o.log, 10);
  auto scale_of = [&](const std::string& unit, const char* what) {
    if (std::string(what) == "speed") {
      if (unit == "km/h" || unit == "kph") return units::kph;
      if (unit == "m/s") return 1.0;
      if (unit == "mph") return 1609.344 / 3600.0;
    } else if (std::string(what) == "accel") {
      if (unit == "g") return units::g0;
      if (unit == "m/s2") return 1.0;
    } else {
      if (unit == "deg/s") return units::deg;
      if (unit == "rad/s") return 1.0;
    }
    throw InputError(o.log, Mark{}, std::string("unknown ") + what + " unit '" + unit + "'");
  };
  const double vs = scale_of(o.speed_unit, "speed");
  auto kph_text = [](double mps) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1f", mps / units::kph);
    return std::string(buf);
  };
  const auto& vcol = t.column(o.speed);
  std::vector<double> v(vcol.size());
  for (std::size_t i = 0; i < v.size(); ++i) v[i] = vcol[i] * vs;
  if (!o.closed && v[0] < 0.0)
    throw InputError(o.log, Mark{t.lines[0], 1},
                     "the first logged speed is negative (" + kph_text(v[0]) +
                         " km/h): an open log's first speed becomes the track's start_speed");
  if (!o.closed && v[0] > log_max_start_speed_mps)
    throw InputError(o.log, Mark{t.lines[0], 1},
                     "the first logged speed, " + kph_text(v[0]) + " km/h read with --speed-unit " +
                         o.speed_unit +
                         ", is more than a track's start_speed may be (540 km/h); is the speed "
                         "in another unit?");
  // Distance: given, or integrated from time.
  std::vector<double> s(v.size(), 0.0);
  if (!o.distance.empty()) {
    require_increasing(t, o.distance);
    const auto& dc = t.column(o.distance);
    for (std::size_t i = 0; i < s.size(); ++i) s[i] = dc[i] - dc[0];
  } else {
    require_increasing(t, o.time);
    const auto& tc = t.column(o.time);
    for (std::size_t i = 1; i < s.size(); ++i)
      s[i] = s[i - 1] + 0.5 * (v[i] + v[i - 1]) * (tc[i] - tc[i - 1]);
    for (std::size_t i = 1; i < s.size(); ++i)
      if (!(s[i] > s[i - 1]))
        throw InputError(o.log, Mark{t.lines[i], 1}, "the car does not move between these rows");
  }
  // Curvature: a_y / v^2 or yaw rate / v, bridged over slow rows.
  std::vector<double> k(v.size(), 0.0);
  std::vector<bool> ok(v.size(), false);
  if (!o.yaw_rate.empty()) {
    const double ys = scale_of(o.yaw_unit, "yaw");
    const auto& r = t.column(o.yaw_rate);
    for (std::size_t i = 0; i < k.size(); ++i)
      if (v[i] >= o.min_speed_mps) k[i] = r[i] * ys / v[i], ok[i] = true;
  } else {
    const double as = scale_of(o.accel_unit, "accel");
    const auto& a = t.column(o.lat_accel);
    for (std::size_t i = 0; i < k.size(); ++i)
      if (v[i] >= o.min_speed_mps) k[i] = a[i] * as / (v[i] * v[i]), ok[i] = true;
  }
  {
    // Linear bridges over rows too slow to read curvature from.
    std::size_t last = k.size();
    for (std::size_t i = 0; i < k.size(); ++i) {
      if (!ok[i]) continue;
      if (last == k.size())
        for (std::size_t j = 0; j < i; ++j) k[j] = k[i];
      else
        for (std::size_t j = last + 1; j < i; ++j)
          k[j] = k[last] + (k[i] - k[last]) * (s[j] - s[last]) / (s[i] - s[last]);
      last = i;
    }
    if (last == k.size())
      throw InputError(o.log, Mark{}, "no row is fast enough to read curvature from");
    for (std::size_t j = last + 1; j < k.size(); ++j) k[j] = k[last];
  }
  // Resample evenly and filter.
  const double length = s.back();
  if (length > max_path_m)
    throw InputError(o.log, Mark{t.lines.back(), 1}, "the log covers more than 200 km");
  const double h = 0.5;
  const std::size_t n = static_cast<std::size_t>(std::llround(length / h));
  const double step = length / static_cast<double>(n);
  std::vector<double> rs(n + 1), rk(n + 1), rv(n + 1);
  std::vector<std::size_t> row(n + 1);  // the log row nearest each sample (for errors)
  std::size_t seg = 0;
  for (std::size_t j = 0; j <= n; ++j) {
    const double sj = std::min(length, static_cast<double>(j) * step);
    while (seg + 2 < s.size() && s[seg + 1] < sj) ++seg;
    const double w = (sj - s[seg]) / (s[seg + 1] - s[seg]);
    rs[j] = sj;
    rk[j] = k[seg] + w * (k[seg + 1] - k[seg]);
    rv[j] = v[seg] + w * (v[seg + 1] - v[seg]);
    row[j] = w < 0.5 ? seg : seg + 1;
  }
  LogTrack out{};
  out.length_m = length;
  // The filter's length: given, or chosen by GCV on the curvature resampled at the log's own
  // median row spacing (so that the samples are about the rows and their noise stays
  // independent from one to the next, as GCV assumes). Second differences, as the filter; a
  // closed lap's curvature is periodic.
  constexpr int log_order = 2;
  if (o.smoothing_m) {
    out.smoothing_m = *o.smoothing_m;
  } else {
    std::vector<double> gaps(s.size() - 1);
    for (std::size_t i = 1; i < s.size(); ++i) gaps[i - 1] = s[i] - s[i - 1];
    std::nth_element(gaps.begin(), gaps.begin() + static_cast<std::ptrdiff_t>(gaps.size() / 2),
                     gaps.end());
    const std::size_t nr = std::max<std::size_t>(
        10, static_cast<std::size_t>(std::llround(length / gaps[gaps.size() / 2])));
    const double hr = length / static_cast<double>(nr);
    std::vector<double> kr;
    std::size_t at = 0;
    for (std::size_t j = 0; j < (o.closed ? nr : nr + 1); ++j) {
      const double sj = std::min(length, static_cast<double>(j) * hr);
      while (at + 2 < s.size() && s[at + 1] < sj) ++at;
      const double w = (sj - s[at]) / (s[at + 1] - s[at]);
      kr.push_back(k[at] + w * (k[at + 1] - k[at]));
    }
    const double lo = gcv_min_spacings * hr;
    const double hi = std::max(lo, std::min(gcv_max_spacings * hr, 0.5 * length));
    const SmoothingChoice g = choose_smoothing({kr}, hr, log_order, o.closed, lo, hi);
    out.smoothing_m = g.length_m;
    out.smoothing.automatic = true;
    out.smoothing.noise_rms = g.noise_rms;
    out.smoothing.chosen_at_spacing_m = hr;
    out.smoothing.at_lower_bound = g.at_lower_bound;
    out.smoothing.at_upper_bound = g.at_upper_bound;
    out.smoothing.exact_trace = g.exact_trace;
  }
  if (o.closed) {
    // Periodic: the last sample is the first again.
    rk.pop_back();
    rk = smooth(rk, step, out.smoothing_m, log_order, true);
    rk.push_back(rk.front());
  } else {
    rk = smooth(rk, step, out.smoothing_m, log_order, false);
  }
  out.start_speed_mps = v[0];
  // What a unit read wrong does: a_y in m/s2 read as g is 9.81 times too large (and in g read
  // as m/s2 9.81 times too small); a yaw rate in deg/s read as rad/s is 57.3 times too large;
  // a speed in km/h read as m/s makes a_y / v^2 3.6^2 times too small.
  const bool by_yaw = !o.yaw_rate.empty();
  // The hint names the mistake that scales curvature the way seen: a number in the smaller
  // unit read as the larger one is too large (m/s2 read as g, deg/s read as rad/s).
  auto unit_hint = [&](bool too_large) {
    const std::string what = by_yaw ? "a yaw rate" : "a lateral acceleration";
    const std::string option = by_yaw ? "--yaw-unit" : "--accel-unit";
    const std::string now = by_yaw ? o.yaw_unit : o.accel_unit;
    const std::string larger = by_yaw ? "rad/s" : "g", smaller = by_yaw ? "deg/s" : "m/s2";
    const std::string factor = by_yaw ? "57.3" : "9.81";
    std::string hint = "check " + option + " (" + now + " now)";
    if (too_large && now == larger)
      hint = what + " in " + smaller + " read as " + larger + " is " + factor +
             " times too large: if the log is in " + smaller + ", give " + option + " " + smaller;
    if (!too_large && now == smaller)
      hint = what + " in " + larger + " read as " + smaller + " is " + factor +
             " times too small: if the log is in " + larger + ", give " + option + " " + larger;
    return hint + "; else check --speed-unit (" + o.speed_unit + " now) and the columns given";
  };
  // No car corners at more than 8 g: curvature x speed^2 beyond that is a unit read wrong. On
  // the filtered curvature, so that one spiky sample cannot refuse a log.
  {
    std::size_t worst = 0;
    double peak = 0.0;
    for (std::size_t j = 0; j <= n; ++j) {
      const double ay = std::abs(rk[j]) * rv[j] * rv[j];
      if (ay > peak) peak = ay, worst = j;
    }
    out.peak_lateral_g = peak / units::g0;
    if (out.peak_lateral_g > log_max_lateral_g) {
      std::ostringstream os;
      os.precision(3);
      os << "the log implies a lateral acceleration of " << out.peak_lateral_g
         << " g here (curvature x speed^2, filtered over " << out.smoothing_m
         << " m), more than the " << log_max_lateral_g << " g no car exceeds: " << unit_hint(true);
      throw InputError(o.log, Mark{t.lines[row[worst]], 1}, os.str());
    }
  }
  std::vector<double> x, y, th;
  integrate_path(rs, rk, x, y, &th);
  if (o.closed) {
    // Heading: a whole number of turns. Spread the difference as a constant curvature change.
    const double turns = std::round(th.back() / (2 * units::pi));
    const double dth = turns * 2 * units::pi - th.back();
    out.closure_heading_deg = -dth / units::deg;  // before spreading
    const double turns_read = th.back() / (2 * units::pi);
    for (double& kk : rk) kk += dth / length;
    integrate_path(rs, rk, x, y, &th);
    out.closure_gap_m = std::hypot(x.back() - x.front(), y.back() - y.front());
    // A lap logged right closes to within the drift of its sensors; a gap that is a good part
    // of the lap is curvature scaled wrong, and spreading it would draw another track.
    if (out.closure_gap_m > log_max_closure_fraction * length) {
      std::ostringstream os;
      os.precision(4);
      os << "the lap does not close: with its heading closed its end is " << out.closure_gap_m
         << " m from its start, more than " << 100 * log_max_closure_fraction << " % of the lap's "
         << length << " m (its curvature adds up to " << turns_read
         << " turns where a lap makes a whole number): "
         // Fewer than one turn: curvature too small (the usual case); more: too large.
         << unit_hint(std::abs(turns_read) > 1.0);
      throw InputError(o.log, Mark{}, os.str());
    }
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
  CsvWriter<ProfileRow> csv(profile_columns, n + 1);
  for (std::size_t j = 0; j <= n; ++j) csv.add({rs[j], rk[j]});
  std::ostringstream y_out;
  const std::string name = o.name.empty() ? std::filesystem::path(o.log).stem().string() : o.name;
  y_out << "# Made by 'lapwing track from-log' from "
        << std::filesystem::path(o.log).filename().string() << ": curvature from "
        << (o.yaw_rate.empty() ? "lateral acceleration / speed^2" : "yaw rate / speed")
        << ", filtered over " << fixed(out.smoothing_m, 1) << " m"
        << (out.smoothing.automatic ? " (auto: generalised cross-validation)" : "") << ".\n";
  y_out << "format: 1\nname: " << json_quote(name) << "\nclosed: " << (o.closed ? "true" : "false")
        << "\n";
  if (!o.closed) y_out << "start_speed: " << format_number(v[0]) << " m/s  # the log's first\n";
  y_out << air_yaml(o.air);
  y_out << "mesh: 0.5 m\ncurvature: {file: " << json_quote(csv_name) << "}\n";
  out.yaml = y_out.str();
  out.csv = csv.take();
  return out;
}

}  // namespace lapwing
