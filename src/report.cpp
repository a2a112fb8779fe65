#include "lapwing/report.hpp"

#include <algorithm>
#include <cstdio>

#include "lapwing/json.hpp"
#include "lapwing/units.hpp"

#ifndef LAPWING_VERSION
#define LAPWING_VERSION "0.0.0"
#endif

namespace lapwing {

std::string version() {
  return LAPWING_VERSION;
}

namespace {
double kph(double mps) {
  return mps / units::kph;
}

std::string csv_field(const std::string& s) {
  if (s.find_first_of(",\"\n") == std::string::npos) return s;
  std::string o = "\"";
  for (char c : s) o += (c == '"') ? std::string("\"\"") : std::string(1, c);
  return o + "\"";
}
}  // namespace

std::string summary_json(const std::string& car_name, const std::vector<LapSummary>& results) {
  JsonWriter w;
  w.begin_object().field("lapwing", version()).field("car", car_name);
  w.key("results").begin_array();
  for (const auto& s : results) {
    w.begin_object()
        .field("track", s.track_name)
        .field("config", s.config)
        .field("lap_time_s", s.lap_time_s)
        .field("length_m", s.length_m)
        .field("air_density_kg_m3", s.air_density_kg_m3)
        .field("top_speed_kph", kph(s.top_speed_mps))
        .field("min_speed_kph", kph(s.min_speed_mps))
        .field("full_throttle_fraction", s.full_throttle_fraction)
        .field("braking_fraction", s.braking_fraction)
        .field("trimmed_fraction", s.trimmed_fraction);
    w.key("warnings").begin_array();
    for (const auto& text : s.warnings) w.value(text);
    w.end_array();
    w.key("sectors_s").numbers(s.sectors_s);
    w.key("corners").begin_array();
    for (const auto& c : s.corners) {
      w.begin_object()
          .field("id", c.id)
          .field("start_m", c.start_m)
          .field("apex_m", c.apex_m)
          .field("end_m", c.end_m)
          .field("entry_kph", kph(c.entry_mps))
          .field("apex_kph", kph(c.apex_mps))
          .field("exit_kph", kph(c.exit_mps))
          .field("time_s", c.time_s)
          .field("limit", c.limit)
          .end_object();
    }
    w.end_array().end_object();
  }
  w.end_array().end_object();
  return w.str();
}

std::string trace_csv(const Lap& lap, const Mesh& mesh) {
  std::string o =
      "distance_m,time_s,x_m,y_m,curvature_1pm,speed_kph,long_accel_g,lat_accel_g,gear,rpm,phase,"
      "drag_N,downforce_N,front_load_N,rear_load_N\n";
  o.reserve(mesh.size() * 200);
  auto num = [&o](double v) {
    o += format_number(v);
    o += ',';
  };
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    num(mesh.s_m[i]);
    num(lap.time_s[i]);
    num(mesh.x_m[i]);
    num(mesh.y_m[i]);
    num(mesh.curvature_1pm[i]);
    num(kph(lap.speed_mps[i]));
    num(lap.long_accel_mps2[i] / units::g0);
    num(lap.lat_accel_mps2[i] / units::g0);
    o += std::to_string(lap.gear[i]);
    o += ',';
    num(lap.engine_radps[i] / units::rpm);
    o += phase_name(lap.phase[i]);
    o += ',';
    num(lap.drag_n[i]);
    num(lap.downforce_n[i]);
    num(lap.front_load_n[i]);
    o += format_number(lap.rear_load_n[i]);
    o += '\n';
  }
  return o;
}

std::string corners_csv(const std::vector<LapSummary>& results) {
  std::string o = "track,config,id,start_m,apex_m,end_m,entry_kph,apex_kph,exit_kph,time_s,limit\n";
  for (const auto& s : results) {
    for (const auto& c : s.corners) {
      o += csv_field(s.track_name) + "," + csv_field(s.config) + "," + std::to_string(c.id);
      for (double v : {c.start_m, c.apex_m, c.end_m, kph(c.entry_mps), kph(c.apex_mps),
                       kph(c.exit_mps), c.time_s})
        o += "," + format_number(v);
      o += "," + c.limit + "\n";
    }
  }
  return o;
}

std::string fixed(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string s = buf;
  if (s.rfind("-0", 0) == 0 && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
  return s;
}

std::string text_table(const std::vector<std::string>& header,
                       const std::vector<std::vector<std::string>>& rows) {
  std::vector<std::size_t> width(header.size(), 0);
  for (std::size_t c = 0; c < header.size(); ++c) width[c] = header[c].size();
  for (const auto& r : rows)
    for (std::size_t c = 0; c < r.size() && c < width.size(); ++c)
      width[c] = std::max(width[c], r[c].size());
  auto line = [&](const std::vector<std::string>& r) {
    std::string o;
    for (std::size_t c = 0; c < width.size(); ++c) {
      const std::string cell = c < r.size() ? r[c] : "";
      const std::string pad(width[c] - cell.size(), ' ');
      if (c) o += "  ";
      o += c == 0 ? cell + pad : pad + cell;
    }
    while (!o.empty() && o.back() == ' ') o.pop_back();
    return o + "\n";
  };
  std::string o = line(header);
  std::size_t total = 0;
  for (auto w : width) total += w;
  o += std::string(total + 2 * (width.size() - 1), '-') + "\n";
  for (const auto& r : rows) o += line(r);
  return o;
}

std::string lap_table(const LapSummary& s) {
  std::string o;
  o += "lap time " + fixed(s.lap_time_s, 3) + " s   top speed " + fixed(kph(s.top_speed_mps), 1) +
       " km/h   min speed " + fixed(kph(s.min_speed_mps), 1) + " km/h   corners " +
       std::to_string(s.corners.size()) + "\n";
  o += "full throttle " + fixed(100 * s.full_throttle_fraction, 1) + " %   braking " +
       fixed(100 * s.braking_fraction, 1) + " %   air " + fixed(s.air_density_kg_m3, 4) +
       " kg/m3\n";
  if (s.trimmed_fraction > 0.0)
    o += "straight-line trim " + fixed(100 * s.trimmed_fraction, 1) + " % of the lap\n";
  for (const auto& text : s.warnings) o += "warning: " + text + "\n";
  o += "sectors (s)";
  for (double t : s.sectors_s) o += "  " + fixed(t, 3);
  o += "\n";
  if (!s.corners.empty()) {
    std::vector<std::vector<std::string>> rows;
    for (const auto& c : s.corners)
      rows.push_back({std::to_string(c.id), c.direction > 0 ? "L" : "R", fixed(c.start_m, 1),
                      fixed(c.apex_m, 1), fixed(c.end_m, 1), fixed(kph(c.entry_mps), 1),
                      fixed(kph(c.apex_mps), 1), fixed(kph(c.exit_mps), 1), fixed(c.time_s, 3),
                      c.limit});
    o += "\n" + text_table({"corner", "turn", "start m", "apex m", "end m", "entry km/h",
                            "apex km/h", "exit km/h", "time s", "limit"},
                           rows);
  }
  return o;
}

}  // namespace lapwing
