#include "lapwing/model/track.hpp"

#include <cmath>
#include <string>

#include "lapwing/base/format.hpp"

namespace lapwing {

double Track::length_m() const {
  if (line_path) return line_path->s_m.back();
  if (profile) return profile->s_m.back();
  double l = 0.0;
  for (const auto& s : segments) l += s.length_m;
  return l;
}

std::string Track::subject() const {
  return file.empty() ? "track '" + name + "'" : file;
}

bool Track::has_widths() const {
  if (profile) return !profile->width_left_m.empty();
  if (segments.empty()) return false;
  for (const auto& s : segments)
    if (!s.width_m && !width_m) return false;
  return true;
}

const char* Track::path_key() const {
  if (!profile) return "segments";
  return profile->source == PathProfile::Source::centerline ? "centerline" : "curvature";
}

std::optional<Violation> Segment::validate() const {
  FirstViolation f;
  const double k0 = curvature_start_1pm, k1 = curvature_end_1pm;
  // An arc's radius and angle come back from its curvature and length with the rounding of
  // R angle and 1 / R: the upper bounds allow 1e-12 of it, so that a file's 100 km radius or
  // two whole turns pass (1 m comes back exact: 1 / (1 / 1) = 1).
  auto derived = [](Range r) {
    r.hi *= 1 + 1e-12;
    return r;
  };
  switch (kind) {
    case Kind::straight:
      f.rule(k0 == 0.0 && k1 == 0.0, "straight", "a straight has no curvature")
          .range("straight.length", length_m, length_range, Quantity::length)
          .range("straight.grade", grade, grade_range, Quantity::fraction);
      if (width_m) f.range("straight.width", *width_m, width_range, Quantity::length);
      f.range("straight.bank", bank_rad, bank_range, Quantity::angle);
      break;
    case Kind::arc:
      f.rule(k0 == k1 && k0 != 0.0, "arc", "an arc has one curvature, and not zero");
      if (!f.found())
        f.range("arc.radius", 1.0 / std::abs(k0), derived(radius_range), Quantity::length)
            .range("arc.angle", length_m * std::abs(k0), derived(angle_range), Quantity::angle);
      f.range("arc.grade", grade, grade_range, Quantity::fraction);
      if (width_m) f.range("arc.width", *width_m, width_range, Quantity::length);
      f.range("arc.bank", bank_rad, bank_range, Quantity::angle);
      break;
    case Kind::clothoid:
      f.range("clothoid.length", length_m, length_range, Quantity::length)
          .rule(k0 != 0.0 || k1 != 0.0, "clothoid",
                "a clothoid needs from_radius, to_radius or both (a missing one is straight)");
      if (k0 != 0.0)
        f.range("clothoid.from_radius", 1.0 / std::abs(k0), derived(radius_range),
                Quantity::length);
      if (k1 != 0.0)
        f.range("clothoid.to_radius", 1.0 / std::abs(k1), derived(radius_range), Quantity::length);
      f.rule(!(k0 * k1 < 0.0), "clothoid", "a clothoid turns one way: its curvatures have one sign")
          .range("clothoid.grade", grade, grade_range, Quantity::fraction);
      if (width_m) f.range("clothoid.width", *width_m, width_range, Quantity::length);
      f.range("clothoid.bank", bank_rad, bank_range, Quantity::angle);
      break;
  }
  return f.result();
}

double Segment::signed_bank_rad() const {
  const double k = curvature_start_1pm != 0.0 ? curvature_start_1pm : curvature_end_1pm;
  return k < 0.0 ? -bank_rad : bank_rad;
}

double Wind::head_mps(double heading_rad) const {
  return speed_mps * std::sin(from_rad + heading_rad);
}

std::optional<Violation> Wind::validate() const {
  return FirstViolation()
      .range("speed", speed_mps, speed_range, Quantity::speed)
      .range("from", from_rad, from_range, Quantity::angle)
      .result();
}

std::optional<Violation> PathProfile::validate() const {
  FirstViolation f;
  const std::size_t n = s_m.size();
  f.rule(n >= 2, "s_m", "a path profile needs at least 2 points");
  for (const auto& [key, column] :
       {std::pair<const char*, const std::vector<double>*>{"curvature_1pm", &curvature_1pm},
        {"grade", &grade},
        {"x_m", &x_m},
        {"y_m", &y_m},
        {"elevation_m", &elevation_m}})
    f.rule(column->size() == n, key, [&, column = column] {
      return "size differs from s_m: expected " + std::to_string(n) + ", got " +
             std::to_string(column->size());
    });
  f.rule(bank_rad.empty() || bank_rad.size() == n, "bank_rad", [&] {
     return "size differs from s_m: expected " + std::to_string(n) + ", got " +
            std::to_string(bank_rad.size());
   }).each("bank_rad", bank_rad, Segment::bank_range, Quantity::angle);
  f.rule(n == 0 || s_m.front() == 0.0, "s_m", "a path profile starts at distance 0")
      .order("s_m", s_m, true);
  for (std::size_t i = 0; i < curvature_1pm.size() && !f.found(); ++i)
    f.rule(
        std::abs(curvature_1pm[i]) <= max_curvature_1pm, "curvature_1pm",
        [&] {
          return "curvature " + format_readable(curvature_1pm[i]) + " 1/m at " +
                 format_readable(s_m[i]) + " m is beyond 1/m (a radius under 1 m)";
        },
        "curvature_1pm[" + std::to_string(i) + "]");
  // Widths: both or neither, one per sample, every one > 0 (the distance to an edge).
  f.rule(width_left_m.size() == width_right_m.size(), "width_right_m",
         "give both widths (width_left_m and width_right_m) or neither");
  if (!width_left_m.empty())
    f.rule(width_left_m.size() == n, "width_left_m",
           [&] {
             return "size differs from s_m: expected " + std::to_string(n) + ", got " +
                    std::to_string(width_left_m.size());
           })
        .each("width_left_m", width_left_m, positive(), Quantity::length)
        .each("width_right_m", width_right_m, positive(), Quantity::length);
  return f.result();
}

std::optional<Violation> LineSpec::validate() const {
  return FirstViolation()
      .rule(method == Method::min_curvature, "method",
            "the min-time line depends on the car: make it with 'lapwing track line --method "
            "min-time --car CAR' and lap the track that writes")
      .range("vehicle_width", vehicle_width_m, vehicle_width_range, Quantity::length)
      .range("margin", margin_m, margin_range, Quantity::length)
      .result();
}

std::optional<Violation> Track::validate() const {
  FirstViolation f;
  f.rule(!closed || start_speed_mps == 0.0, "start_speed",
         "start_speed applies to open tracks only (closed: false)")
      .range("start_speed", start_speed_mps, start_speed_range, Quantity::speed)
      .part("", [&] { return air.validate(); })
      .range("mesh", mesh_m, mesh_range, Quantity::length)
      .rule(segments.empty() == profile.has_value(), "",
            "give exactly one of segments, centerline, curvature");
  if (profile) {
    f.part(path_key(), [&] { return profile->validate(); });
  } else {
    for (std::size_t i = 0; i < segments.size() && !f.found(); ++i)
      f.part("segments[" + std::to_string(i) + "]", [&] { return segments[i].validate(); });
  }
  if (width_m)
    f.rule(!segments.empty(), "width",
           "width applies to segment tracks; a centerline gives its widths as the columns "
           "width_left_m,width_right_m of its CSV")
        .range("width", *width_m, Segment::width_range, Quantity::length);
  if (line) f.part("line", [&] { return line->validate(); });
  if (wind) f.part("wind", [&] { return wind->validate(); });
  if (f.found()) return f.result();
  // Sector starts are along the described path (a line moves them where it passes them).
  double length = 0.0;
  if (profile)
    length = profile->s_m.back();
  else
    for (const auto& s : segments) length += s.length_m;
  f.rule(length / mesh_m <= max_mesh_points, "",
         [&] {
           return "the track is " + std::to_string(length) + " m long: at a mesh of " +
                  std::to_string(mesh_m) + " m that is more than 20 million points";
         })
      .each("sectors", sectors_m, non_negative(), Quantity::length)
      .rule(!sectors_m.empty() && sectors_m.front() == 0.0, "sectors", "sectors must start at 0 m");
  // Trim zones: inside the path, each ending after it starts, in order and apart.
  for (std::size_t i = 0; i < trim_zones.size() && !f.found(); ++i) {
    const std::string at = "trim_zones[" + std::to_string(i) + "]";
    const TrimZone& z = trim_zones[i];
    f.range(at + "[0]", z.start_m, Range{0.0, length, false, true}, Quantity::length)
        .range(at + "[1]", z.end_m, Range{0.0, length}, Quantity::length)
        .rule(
            z.end_m > z.start_m, at,
            [&] {
              std::string m = "a trim zone must end after it starts: its end, " +
                              format_readable(z.end_m) + " m, is not after its start, " +
                              format_readable(z.start_m) + " m";
              // A lap's zone meant across the start line is two zones (its end cut to 0.1 m
              // within the length, so that the advice is valid as it reads).
              if (closed && z.end_m < z.start_m)
                m += " (for a zone across the start line give two: [" + format_readable(z.start_m) +
                     " m, " + fixed(std::floor(length * 10.0) / 10.0, 1) + " m] and [0 m, " +
                     format_readable(z.end_m) + " m])";
              return m;
            },
            at + "[1]")
        .rule(i == 0 || z.start_m >= trim_zones[i - 1].end_m, at,
              "trim zones must be in order along the track and must not overlap", at + "[0]");
  }
  for (std::size_t i = 1; i < sectors_m.size() && !f.found(); ++i) {
    const std::string at = "sectors[" + std::to_string(i) + "]";
    f.rule(sectors_m[i] > sectors_m[i - 1], "sectors", "sector starts must be strictly increasing",
           at)
        .rule(
            sectors_m[i] < length, "sectors",
            [&] {
              return "sector start lies beyond the track's length (" + std::to_string(length) +
                     " m)";
            },
            at);
  }
  return f.result();
}

}  // namespace lapwing
