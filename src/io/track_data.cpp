#include "lapwing/io/track_data.hpp"

#include <algorithm>
#include <cmath>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/path/curvature_profile.hpp"

namespace lapwing {

namespace {

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

// The bank_deg column in rad (+ helping a left turn, the curvature's sign), each row within
// Segment::bank_range (an InvalidInput at "bank_deg[i]": row_error places it on its line).
std::vector<double> bank_column(const CsvTable& t) {
  std::vector<double> out;
  const auto& deg = t.column("bank_deg");
  for (std::size_t i = 0; i < deg.size(); ++i) {
    const double b = deg[i] * units::deg;
    if (!Segment::bank_range.contains(b))
      throw InvalidInput(t.file, broken_rule("",
                                             "bank_deg " + format_number(deg[i]) +
                                                 " is beyond +-45 deg (a road's steepest banking)",
                                             "bank_deg[" + std::to_string(i) + "]"));
    out.push_back(b);
  }
  return out;
}

// Dropouts in a centerline's points (is_dropout: the rule for a log's rows), named by the
// file's lines: the widest, and how many more (a closed centerline's last point to its first
// too, which the fit bridges as it bridges any other gap).
void warn_of_dropouts(const CsvTable& t, const CenterlinePoints& points, bool closed,
                      PathProfile& p) {
  const std::size_t n = points.x_m.size();
  struct Gap {
    double m;
    std::size_t before, after;  // rows
  };
  std::vector<Gap> gaps;
  auto look = [&](std::size_t a, std::size_t b) {
    const double d = std::hypot(points.x_m[b] - points.x_m[a], points.y_m[b] - points.y_m[a]);
    if (is_dropout(d, p.point_spacing_m)) gaps.push_back({d, a, b});
  };
  for (std::size_t i = 1; i < n; ++i) look(i - 1, i);
  if (closed && n > 1) look(n - 1, 0);
  if (gaps.empty()) return;
  const Gap& widest = *std::max_element(gaps.begin(), gaps.end(),
                                        [](const Gap& a, const Gap& b) { return a.m < b.m; });
  std::string more;
  if (gaps.size() > 1)
    more = " (and " + std::to_string(gaps.size() - 1) + " more such gap" +
           (gaps.size() > 2 ? "s" : "") + ")";
  p.warnings.push_back(
      t.file + ": points " + fixed(widest.m, 1) + " m apart from line " +
      std::to_string(t.lines[widest.before]) + " to line " + std::to_string(t.lines[widest.after]) +
      " (the median is " + fixed(p.point_spacing_m, 2) + " m)" + more + ": a dropout (over " +
      fixed(dropout_min_gap_m, 0) + " m and " + fixed(dropout_spacings, 0) +
      " times the median); the track across it is the fit's guess, not the road: add the "
      "missing points");
}

}  // namespace

ProfileFile read_centerline_file(const std::string& file, bool closed, const CenterlineOptions& o) {
  const CsvTable t = read_csv(file, min_centerline_points);
  try {
    CenterlinePoints points;
    bool geodetic = false;
    if (t.find("x_m") >= 0 || t.find("y_m") >= 0) {
      require_no_duplicates(t, {"x_m", "y_m"});
      points.source = file;
      points.x_m = t.column("x_m");
      points.y_m = t.column("y_m");
      if (t.find("z_m") >= 0) points.z_m = t.column("z_m");
    } else if (t.find("lat_deg") >= 0 || t.find("lon_deg") >= 0) {
      require_no_duplicates(t, {"lat_deg", "lon_deg"});
      const auto& lat = t.column("lat_deg");
      const auto& lon = t.column("lon_deg");
      points = project_wgs84(file, lat, lon,
                             t.find("alt_m") >= 0 ? t.column("alt_m") : std::vector<double>{});
      geodetic = true;
    } else {
      throw InputError(file, Mark{1, 1},
                       "a centerline needs columns x_m,y_m[,z_m] or lat_deg,lon_deg[,alt_m]");
    }
    // Widths: both columns or neither (each > 0: fit_centerline's rule).
    {
      const int left = t.find("width_left_m"), right = t.find("width_right_m");
      if ((left >= 0) != (right >= 0))
        throw InputError(file, Mark{1, 1},
                         std::string("a centerline with widths needs both width_left_m and "
                                     "width_right_m (only ") +
                             (left >= 0 ? "width_left_m" : "width_right_m") + " is given)");
      if (left >= 0) {
        points.width_left_m = t.column("width_left_m");
        points.width_right_m = t.column("width_right_m");
      }
    }
    // Bank (deg, + helping a left turn); its range is the fit's (PathProfile::validate).
    if (t.find("bank_deg") >= 0) points.bank_rad = bank_column(t);
    ProfileFile out{fit_centerline(points, closed, o), t.lines};
    out.profile.geodetic = geodetic;
    warn_of_dropouts(t, points, closed, out.profile);
    note_unused_columns(
        t,
        geodetic ? std::vector<std::string>{"lat_deg", "lon_deg", "alt_m", "width_left_m",
                                            "width_right_m", "bank_deg"}
                 : std::vector<std::string>{"x_m", "y_m", "z_m", "width_left_m", "width_right_m",
                                            "bank_deg"},
        "a centerline reads x_m, y_m, z_m or lat_deg, lon_deg, alt_m, and width_left_m, "
        "width_right_m, bank_deg",
        out.profile);
    return out;
  } catch (const InvalidInput& e) {
    if (e.subject() != file) throw;  // not the data's (bad options)
    throw row_error(t, e);
  }
}

ProfileFile read_curvature_file(const std::string& file) {
  const CsvTable t = read_csv(file, 10);
  require_increasing(t, "distance_m");
  try {
    const auto& d = t.column("distance_m");
    const auto& k = t.column("curvature_1pm");
    ProfileFile out{
        profile_from_curvature(file, d, k,
                               t.find("grade") >= 0 ? t.column("grade") : std::vector<double>{}),
        t.lines};
    // Bank per sample as given (one per row, as the distances).
    if (t.find("bank_deg") >= 0) out.profile.bank_rad = bank_column(t);
    note_unused_columns(t, {"distance_m", "curvature_1pm", "grade", "bank_deg"},
                        "a curvature profile reads distance_m, curvature_1pm, grade, bank_deg",
                        out.profile);
    return out;
  } catch (const InvalidInput& e) {
    if (e.subject() != file) throw;  // not the data's (bad options)
    throw row_error(t, e);
  }
}

PathProfile import_centerline(const std::string& file, bool closed, const CenterlineOptions& o) {
  return read_centerline_file(file, closed, o).profile;
}

PathProfile import_curvature(const std::string& file) {
  return read_curvature_file(file).profile;
}

}  // namespace lapwing
