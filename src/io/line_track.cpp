#include "lapwing/io/line_track.hpp"

#include <cassert>
#include <cmath>
#include <filesystem>
#include <sstream>

#include "lapwing/base/format.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/path/mesh.hpp"

namespace lapwing {

namespace {

struct LineRow {
  double x, y, z, left, right;
};
constexpr CsvColumn<LineRow> flat_columns[] = {
    {"x_m", [](std::string& o, const LineRow& r) { csv_number(o, r.x); }},
    {"y_m", [](std::string& o, const LineRow& r) { csv_number(o, r.y); }},
    {"width_left_m", [](std::string& o, const LineRow& r) { csv_number(o, r.left); }},
    {"width_right_m", [](std::string& o, const LineRow& r) { csv_number(o, r.right); }},
};
constexpr CsvColumn<LineRow> climbing_columns[] = {
    {"x_m", [](std::string& o, const LineRow& r) { csv_number(o, r.x); }},
    {"y_m", [](std::string& o, const LineRow& r) { csv_number(o, r.y); }},
    {"z_m", [](std::string& o, const LineRow& r) { csv_number(o, r.z); }},
    {"width_left_m", [](std::string& o, const LineRow& r) { csv_number(o, r.left); }},
    {"width_right_m", [](std::string& o, const LineRow& r) { csv_number(o, r.right); }},
};

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
                                const std::string& csv_name) {
  assert(line.source == PathProfile::Source::line && !line.width_left_m.empty());
  // A closed line's last sample is its first again: the file holds each point once.
  const std::size_t n = source.closed ? line.x_m.size() - 1 : line.x_m.size();
  bool climbs = false;
  for (double z : line.elevation_m) climbs = climbs || z != 0.0;
  const std::span<const CsvColumn<LineRow>> columns =
      climbs ? std::span<const CsvColumn<LineRow>>(climbing_columns)
             : std::span<const CsvColumn<LineRow>>(flat_columns);
  CsvWriter<LineRow> csv(columns, n);
  for (std::size_t i = 0; i < n; ++i)
    csv.add({line.x_m[i], line.y_m[i], line.elevation_m[i], line.width_left_m[i],
             line.width_right_m[i]});
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
  y << "format: 1\nname: " << json_quote(source.name + " (" + method + " line)")
    << "\nclosed: " << (source.closed ? "true" : "false") << "\n";
  if (!source.closed) y << "start_speed: " << format_number(source.start_speed_mps) << " m/s\n";
  y << air_yaml(air);
  y << "mesh: " << format_number(source.mesh_m) << " m\n";
  // The line's points are 1 m apart and hold no noise: smoothing auto finds that and fits them
  // at the shortest length. The elevation was the source's, exact: kept within 10 m.
  y << "centerline: {file: " << json_quote(csv_name)
    << (climbs ? ", elevation_smoothing: 10 m" : "") << "}\n";
  y << "sectors: [";
  for (std::size_t k = 0; k < sectors.size(); ++k)
    y << (k ? ", " : "") << format_number(k == 0 ? 0.0 : sectors[k]) << " m";
  y << "]\n";
  return {y.str(), csv.take()};
}

}  // namespace lapwing
