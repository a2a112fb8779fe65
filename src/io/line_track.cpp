#include "lapwing/io/line_track.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <filesystem>
#include <sstream>

#include "lapwing/base/format.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/mesh.hpp"

namespace lapwing {

namespace {

struct LineRow {
  double x, y, z, left, right, bank_deg;
};
// The columns written: x_m, y_m, z_m when the line climbs, the widths, bank_deg when it is banked.
std::vector<CsvColumn<LineRow>> line_columns(bool climbs, bool banked) {
  std::vector<CsvColumn<LineRow>> c{
      {"x_m", [](std::string& o, const LineRow& r) { csv_number(o, r.x); }},
      {"y_m", [](std::string& o, const LineRow& r) { csv_number(o, r.y); }}};
  if (climbs) c.push_back({"z_m", [](std::string& o, const LineRow& r) { csv_number(o, r.z); }});
  c.push_back({"width_left_m", [](std::string& o, const LineRow& r) { csv_number(o, r.left); }});
  c.push_back({"width_right_m", [](std::string& o, const LineRow& r) { csv_number(o, r.right); }});
  if (banked)
    c.push_back({"bank_deg", [](std::string& o, const LineRow& r) { csv_number(o, r.bank_deg); }});
  return c;
}

}  // namespace

std::string air_yaml(const AirSpec& air) {
  std::string o = "altitude: " + format_number(air.altitude_m) + " m\n";
  if (air.temperature_k || air.pressure_pa || air.relative_humidity > 0.0) {
    std::string ambient;
    auto add = [&](const std::string& item) { ambient += (ambient.empty() ? "" : ", ") + item; };
    if (air.temperature_k) add("temperature: " + format_number(*air.temperature_k) + " K");
    if (air.pressure_pa) add("pressure: " + format_number(*air.pressure_pa) + " Pa");
    if (air.relative_humidity > 0.0) add("humidity: " + format_number(air.relative_humidity));
    o += "ambient: {" + ambient + "}\n";
  }
  return o;
}

LineTrackFiles line_track_files(const Track& source, const PathProfile& line, const AirSpec& air,
                                const std::string& method, const LineSpec& spec,
                                const std::string& csv_name,
                                const std::optional<SourceQuality>& source_quality) {
  assert(line.source == PathProfile::Source::line && !line.width_left_m.empty());
  // A closed line's last sample is its first again: the file holds each point once.
  const std::size_t n = source.closed ? line.x_m.size() - 1 : line.x_m.size();
  bool climbs = false;
  for (double z : line.elevation_m) climbs = climbs || z != 0.0;
  // The bank where the line passes: the described path's at the line's reference distance, as
  // a mesh over the line reads it (DescribedBank), written as a bank_deg column.
  const DescribedBank described_bank(source);
  std::vector<double> bank_deg(n);
  bool banked = false;
  for (std::size_t i = 0; i < n; ++i) {
    bank_deg[i] = described_bank.at(line.reference_s_m[i]) / units::deg;
    banked = banked || bank_deg[i] != 0.0;
  }
  const std::vector<CsvColumn<LineRow>> columns = line_columns(climbs, banked);
  CsvWriter<LineRow> csv(columns, n);
  for (std::size_t i = 0; i < n; ++i)
    csv.add({line.x_m[i], line.y_m[i], line.elevation_m[i], line.width_left_m[i],
             line.width_right_m[i], bank_deg[i]});
  // Where the line passes the source's sector starts.
  Track lined = source;
  lined.line_path = line;
  const std::vector<double> sectors = lapped_sectors_m(lined);
  std::ostringstream y;
  y << "# Made by 'lapwing track line' from "
    << std::filesystem::path(source.file).filename().string() << ": the " << method
    << " line for a vehicle " << format_number(spec.vehicle_width_m) << " m wide with a margin of "
    << format_number(spec.margin_m)
    << " m each side.\n# Widths are measured from the line; lapping this track laps the line.\n";
  // The source's verdict: the line is drawn from its data, and reads no better (a poor source
  // would otherwise come back good: the line's points are 1 m apart and hold no noise).
  if (source_quality) y << "# The source's " << source_quality->text << "\n";
  y << "format: 1\nname: " << json_quote(source.name + " (" + method + " line)")
    << "\nclosed: " << (source.closed ? "true" : "false") << "\n";
  if (!source.closed) y << "start_speed: " << format_number(source.start_speed_mps) << " m/s\n";
  y << air_yaml(air);
  y << "mesh: " << format_number(source.mesh_m) << " m\n";
  // The line's points are 1 m apart and hold no noise: smoothing auto finds that and fits them
  // at the shortest length. The elevation was the source's, exact: kept within 10 m.
  y << "centerline: {file: " << json_quote(csv_name)
    << (climbs ? ", elevation_smoothing: 10 m" : "")
    << (source_quality ? ", source_verdict: " + source_quality->verdict : std::string()) << "}\n";
  if (source.wind)
    y << "wind: {speed: " << format_number(source.wind->speed_mps)
      << " m/s, from: " << format_number(source.wind->from_rad / units::deg) << " deg}\n";
  if (!source.trim_zones.empty()) {
    // Trim zones are given along the described path: each is moved to where the line passes
    // its ends (as a mesh over the line reads them), then scaled from the line's length to the
    // length the written points fit to (within a few cm), so that the last ends at the lap's end
    // when the source's does.
    CenterlinePoints points;
    points.x_m.assign(line.x_m.begin(), line.x_m.begin() + static_cast<std::ptrdiff_t>(n));
    points.y_m.assign(line.y_m.begin(), line.y_m.begin() + static_cast<std::ptrdiff_t>(n));
    CenterlineOptions fit;
    const double fitted_m = fit_centerline(points, source.closed, fit).s_m.back();
    const double scale = fitted_m / line.s_m.back();
    const auto moved = [&](double s) {
      return std::min(fitted_m, scale * interpolate(line.reference_s_m, line.s_m, s));
    };
    y << "trim_zones: [";
    for (std::size_t k = 0; k < source.trim_zones.size(); ++k)
      y << (k ? ", " : "") << "[" << format_number(moved(source.trim_zones[k].start_m)) << " m, "
        << format_number(moved(source.trim_zones[k].end_m)) << " m]";
    y << "]\n";
  }
  y << "sectors: [";
  for (std::size_t k = 0; k < sectors.size(); ++k)
    y << (k ? ", " : "") << format_number(k == 0 ? 0.0 : sectors[k]) << " m";
  y << "]\n";
  return {y.str(), csv.take()};
}

}  // namespace lapwing
