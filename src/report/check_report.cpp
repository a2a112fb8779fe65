#include "lapwing/report/check_report.hpp"

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/text_table.hpp"
#include "lapwing/report/track_quality_text.hpp"

namespace lapwing {

std::string air_text(const Air& a) {
  std::string s = fixed(a.density_kg_m3, 4) + " kg/m3 (";
  if (a.standard) {
    s += "ISO 2533 at " + fixed(a.altitude_m, 0) + " m";
  } else {
    s += fixed(a.temperature_k - units::celsius_zero_k, 1) + " C, " +
         fixed(a.pressure_pa / 100.0, 1) + " hPa, " + fixed(100 * a.relative_humidity, 0) +
         " % humidity at " + fixed(a.altitude_m, 0) + " m";
  }
  return s + ")";
}

namespace {

// A config's notes, the same in the terminal and the JSON: what the data does outside its
// range, said once (the notes a lap that reaches them is warned of, summary.hpp), then what a
// reader might misread.
std::vector<std::string> config_notes(const ConfigCheck& c) {
  std::vector<std::string> notes = c.range_notes;
  if (c.no_downforce)
    notes.push_back(
        "no downforce: the front share of the aero load is undefined ('-'); the drag moment "
        "alone takes drag x drag height / wheelbase off the front axle (front aero load)");
  if (c.trim)
    notes.push_back("straight-line trim: CdA " + fixed(c.trim->dcda_m2, 3) + " m2, ClA " +
                    fixed(c.trim->dcla_m2, 3) + " m2, balance " + fixed(100 * c.trim->dbalance, 1) +
                    " points where |curvature| < " + fixed(c.trim->below_curvature_1pm, 4) +
                    " 1/m under drive");
  return notes;
}

// The top speed's limit word; `traction` names the model whose tyres set it (the axle model's
// driven axle, or the point mass's four tyres).
std::string limit_text(TopSpeedLimit l, const Car& car, double top_speed_mps) {
  // No speed at all: the drive never exceeds the rolling resistance, at standstill already
  // (where there is no drag to name).
  if (top_speed_mps <= 0.0 && l == TopSpeedLimit::drag)
    return "rolling resistance: the drive never exceeds it, the car cannot move on the level";
  std::string s = top_speed_limit_name(l);
  if (l == TopSpeedLimit::traction)
    s += car.model == VehicleModel::axle ? " (axle model: driven axle)"
                                         : " (point mass: four tyres)";
  if (l == TopSpeedLimit::front_lift || l == TopSpeedLimit::rear_lift)
    s += " (axle model: no load left on the axle at a steady speed)";
  return s;
}

std::string config_text(const ConfigCheck& c, const Car& car) {
  std::string out = "\nconfig " + c.name + " (" + std::string(form_name(c.form)) + "): CdA " +
                    fixed(c.cda_m2, 3) + " m2, ClA " + fixed(c.cla_m2, 3) + " m2, L/D " +
                    (c.lift_to_drag ? fixed(*c.lift_to_drag, 2) : std::string("-")) +
                    ", aero balance " + fixed(100 * c.aero_balance, 1) + " %" +
                    (c.has_map       ? " (at rest)"
                     : c.speed_table ? " (first row)"
                                     : "") +
                    ", drag height " + fixed(c.drag_height_m, 3) + " m, top speed " +
                    fixed(units::to_kph(c.top_speed_mps), 1) + " km/h (" +
                    limit_text(c.top_speed_limit, car, c.top_speed_mps) + ")\n";
  // The car-level values the config overrides, which its laps use (a helper's finding: check
  // showed none of them).
  const int index = car.config_index(c.name);
  if (index >= 0) {
    const AeroConfig& a = car.configs[static_cast<std::size_t>(index)];
    std::string own;
    const auto add = [&own](const std::string& what) { own += (own.empty() ? "" : ", ") + what; };
    if (a.mass_kg) add("mass " + fixed(*a.mass_kg, 1) + " kg");
    if (a.cg_height_m) add("cg height " + fixed(*a.cg_height_m, 3) + " m");
    if (a.front_weight) add("front weight " + fixed(100 * *a.front_weight, 1) + " %");
    if (a.inertia_factor) add("inertia factor " + fixed(*a.inertia_factor, 3));
    if (!own.empty()) out += "       the car's values this config overrides: " + own + "\n";
  }
  if (c.tyre_peak_load_n) {
    // A peak beyond the level top speed is not reached on a level straight: said so, with the
    // top speed beside it (the speed is where the aero load alone would get there).
    std::string at = "not within the envelope (level straight)";
    if (c.tyre_peak_speed_mps && *c.tyre_peak_speed_mps > c.top_speed_mps)
      at = "a level road would reach it at " + fixed(units::to_kph(*c.tyre_peak_speed_mps), 1) +
           " km/h, above this config's level top speed (" +
           fixed(units::to_kph(c.top_speed_mps), 1) + " km/h): no level straight gets there";
    else if (c.tyre_peak_speed_mps)
      at = "reached at " + fixed(units::to_kph(*c.tyre_peak_speed_mps), 1) +
           " km/h (level straight): faster, more load gives less force";
    out += "       tyre force peak (load sensitivity): " + fixed(*c.tyre_peak_load_n, 0) +
           " N a tyre, " + at + "\n";
  }
  auto percent = [](const std::optional<double>& v) {
    return v ? fixed(100 * *v, 1) : std::string("-");
  };
  std::vector<std::vector<std::string>> rows;
  for (const AeroAtSpeed& s : c.at_speeds) {
    std::vector<std::string> row{fixed(s.speed_kph, 0),
                                 fixed(s.downforce_n, 0),
                                 fixed(s.drag_n, 0),
                                 percent(s.front_share),
                                 percent(s.front_share_with_drag_moment),
                                 fixed(s.front_aero_load_n, 0)};
    if (s.ride_heights)
      row.push_back(fixed(1000 * s.ride_heights->front_m, 1) + " / " +
                    fixed(1000 * s.ride_heights->rear_m, 1) +
                    (s.ride_heights->off_map ? " off map" : "") +
                    (s.ride_heights->grounded ? " grounded" : ""));
    rows.push_back(row);
  }
  std::vector<std::string> header{"speed km/h",    "downforce N",        "drag N",
                                  "front share %", "with drag moment %", "front aero load N"};
  if (c.has_map) header.push_back("ride height F / R mm");
  out += text_table(header, rows);
  for (const auto& n : config_notes(c)) out += "       note: " + n + "\n";
  return out;
}

std::string track_text(const Car& car, double rated_w, const Circuit& t, const TrackCheck& tc,
                       const InputWords& input_words) {
  const Closure& cl = tc.closure;
  std::string out = "\ntrack  " + t.track.name + " (" + t.track.file + ")\n";
  // The closure gap is what a lap must bring to zero: an open track has none to report.
  out += "       " + std::string(t.track.closed ? "closed lap" : "open (sprint)") + ", length " +
         fixed(t.mesh.length_m, 1) + " m" +
         (t.track.closed ? ", closure gap " + fixed(cl.position_gap_m, 3) + " m / " +
                               fixed(cl.heading_gap_rad / units::deg, 2) + " deg, elevation gap " +
                               fixed(cl.elevation_gap_m, 2) + " m"
                         : std::string(", rise ") + fixed(cl.elevation_gap_m, 2) + " m") +
         ", corners " + std::to_string(tc.corner_count) + "\n       air " + air_text(t.air) +
         ", mesh " + fixed(t.mesh.step_m, 4) + " m (" + std::to_string(t.mesh.intervals()) +
         " steps)\n";
  if (t.track.profile) {
    const PathProfile& p = *t.track.profile;
    const bool fitted = p.source == PathProfile::Source::centerline;
    out += "       from " + p.data_file +
           (fitted ? std::string(p.geodetic ? " (WGS-84 lat/lon, tangent plane)" : "") +
                         ": smoothing " + smoothing_text(p) + ", fit residual " +
                         fixed(1000 * p.fit_residual_rms_m, 1) + " mm rms, curvature noise " +
                         fixed(p.curvature_noise_rms_1pm, 5) + " 1/m rms"
                   : std::string(": curvature as given")) +
           "\n";
    for (const auto& n : p.notes) out += "       note: " + n + "\n";
  }
  for (const auto& w : tc.warnings) out += "       warning: " + w + "\n";
  if (t.track.line_path) out += "       " + line_text(t.track) + "\n";
  out += "       engine (" + label(car.powertrain.aspiration) +
         ") in this air: " + fixed(tc.engine_power_ratio * rated_w / 1000, 1) + " kW of " +
         fixed(rated_w / 1000, 1) + " kW rated (" + fixed(100 * tc.engine_power_ratio, 1) + " %)\n";
  if (t.track.wind) {
    out += "       wind " + fixed(t.track.wind->speed_mps, 1) + " m/s from " +
           fixed(t.track.wind->from_rad / units::deg, 0) + " deg: ";
    if (const std::optional<double> head = tc.head_wind_longest_straight_mps)
      out += std::string(*head >= 0 ? "head" : "tail") + " wind " + fixed(std::abs(*head), 1) +
             " m/s on the longest straight (" + fixed(tc.straight_start_m, 0) + " to " +
             fixed(tc.straight_end_m, 0) + " m)\n";
    else
      out += "no straight (no two points with |curvature| under 1/800 m) to read it on\n";
  }
  if (!t.track.trim_zones.empty())
    out += "       trim zones: " + std::to_string(t.track.trim_zones.size()) + ", " +
           fixed(100 * tc.trim_zone_share, 1) +
           " % of the lap (the straight-line trim opens only there)\n";
  if (tc.smoothing) {
    const SmoothingStudy& s = *tc.smoothing;
    auto cell = [](const std::optional<double>& v) { return v ? fixed(*v, 3) : std::string("-"); };
    std::vector<std::vector<std::string>> srows;
    for (const auto& q : tc.qualities)
      srows.push_back({q.config, cell(q.lap_half_s), cell(q.lap_s), cell(q.lap_double_s),
                       q.spread ? fixed(100 * *q.spread, 2) : std::string("-")});
    out +=
        "       lap time with the centerline smoothed at half, the chosen and double the "
        "strength (lambda)\n" +
        text_table({"config", "lap s at " + fixed(s.half_length_m, 1) + " m",
                    "at " + fixed(s.smoothing_m, 1) + " m",
                    "at " + fixed(s.double_length_m, 1) + " m", "spread %"},
                   srows);
    for (const auto& n : s.notes) out += "       note: " + n + "\n";
  }
  for (const LapFailure& f : tc.failures)
    out += "       note: config " + f.config +
           (f.input ? " cannot lap the track: " +
                          (input_words ? input_words(*f.input) : f.input->message())
                    : " cannot complete the track: " + f.cannot_move) +
           "\n";
  if (tc.shown) out += "       " + quality_line(tc.qualities[*tc.shown]) + "\n";
  std::vector<std::vector<std::string>> trows;
  for (const TrackConfigCheck& c : tc.configs)
    trows.push_back({c.config, fixed(units::to_kph(c.top_speed_mps), 1),
                     limit_text(c.top_speed_limit, car, c.top_speed_mps)});
  out += text_table({"config", "top speed km/h (this air, level)", "limit"}, trows);
  return out;
}

void optional_value(JsonWriter& j, const char* key, const std::optional<double>& v) {
  j.key(key);
  if (v)
    j.value(*v);
  else
    j.null();
}

void config_json(JsonWriter& j, const ConfigCheck& c) {
  j.begin_object()
      .field("name", c.name)
      .field("form", form_name(c.form))
      .field("cda_m2", c.cda_m2)
      .field("cla_m2", c.cla_m2);
  // null where CdA is 0: the ratio is undefined or infinite (the text's "-"), and 0 would read
  // as the worst of all.
  optional_value(j, "lift_to_drag", c.lift_to_drag);
  j.field("aero_balance", c.aero_balance)
      .field("drag_height_m", c.drag_height_m)
      .field("top_speed_kph", units::to_kph(c.top_speed_mps))
      .field("top_speed_limit", top_speed_limit_name(c.top_speed_limit));
  optional_value(j, "tyre_peak_load_n", c.tyre_peak_load_n);
  optional_value(j, "tyre_peak_kph",
                 c.tyre_peak_speed_mps
                     ? std::optional<double>(units::to_kph(*c.tyre_peak_speed_mps))
                     : std::nullopt);
  j.key("at_speeds").begin_array();
  for (const AeroAtSpeed& s : c.at_speeds) {
    j.begin_object()
        .field("speed_kph", s.speed_kph)
        .field("downforce_n", s.downforce_n)
        .field("drag_n", s.drag_n);
    optional_value(j, "front_share", s.front_share);
    optional_value(j, "front_share_with_drag_moment", s.front_share_with_drag_moment);
    j.field("front_aero_load_n", s.front_aero_load_n);
    if (s.ride_heights)
      j.field("front_ride_height_m", s.ride_heights->front_m)
          .field("rear_ride_height_m", s.ride_heights->rear_m);
    j.end_object();
  }
  j.end_array();
  j.key("notes").begin_array();
  for (const auto& n : config_notes(c)) j.value(n);
  j.end_array().end_object();
}

void track_json(JsonWriter& j, const Circuit& t, const TrackCheck& tc) {
  const Closure& cl = tc.closure;
  j.begin_object()
      .field("name", t.track.name)
      .field("file", t.track.file)
      .field("closed", t.track.closed)
      .field("length_m", t.mesh.length_m);
  if (t.track.closed)
    j.field("closure_gap_m", cl.position_gap_m)
        .field("closure_heading_deg", cl.heading_gap_rad / units::deg)
        .field("elevation_gap_m", cl.elevation_gap_m);
  else
    j.key("closure_gap_m")
        .null()
        .key("closure_heading_deg")
        .null()
        .field("rise_m", cl.elevation_gap_m);
  j.field("corner_count", static_cast<int>(tc.corner_count))
      .field("air_density_kg_m3", t.air.density_kg_m3)
      .field("engine_power_ratio", tc.engine_power_ratio);
  optional_value(j, "head_wind_longest_straight_mps", tc.head_wind_longest_straight_mps);
  j.field("trim_zone_share", tc.trim_zone_share);
  j.key("notes").begin_array();
  if (t.track.profile)
    for (const auto& n : t.track.profile->notes) j.value(n);
  j.end_array();
  j.key("warnings").begin_array();
  for (const auto& w : tc.warnings) j.value(w);
  j.end_array();
  j.key("configs").begin_array();
  for (const TrackConfigCheck& c : tc.configs)
    j.begin_object()
        .field("name", c.config)
        .field("top_speed_kph", units::to_kph(c.top_speed_mps))
        .field("top_speed_limit", top_speed_limit_name(c.top_speed_limit))
        .end_object();
  j.end_array();
  if (tc.smoothing) {
    const SmoothingStudy& s = *tc.smoothing;
    j.key("smoothing_sensitivity").begin_array();
    for (const auto& q : tc.qualities) {
      j.begin_object().field("config", q.config);
      optional_value(j, "half_s", q.lap_half_s);
      optional_value(j, "as_given_s", q.lap_s);
      optional_value(j, "double_s", q.lap_double_s);
      j.end_object();
    }
    j.end_array();
    j.field("smoothing_m", s.smoothing_m).field("smoothing_auto", s.automatic);
    j.field("smoothing_half_m", s.half_length_m).field("smoothing_double_m", s.double_length_m);
    j.key("smoothing_sensitivity_notes").begin_array();
    for (const auto& n : s.notes) j.value(n);
    j.end_array();
  }
  if (tc.shown) write_track_quality(j, tc.qualities[*tc.shown]);
  j.end_object();
}

}  // namespace

std::string check_text(const Car& car, const std::vector<Circuit>& circuits,
                       const CheckSummary& summary, const InputWords& input_words) {
  std::string out;
  out += "car    " + car.name + " (" + car.file + ")\n";
  out += "       mass " + fixed(car.mass_kg, 1) + " kg, static front weight " +
         fixed(100 * car.front_weight, 1) + " %, wheelbase " + fixed(car.wheelbase_m, 3) +
         " m, cg height " + fixed(car.cg_height_m, 3) + " m\n";
  if (summary.transfer_at_1g_n) {
    const RollGeometry& g = *car.roll;
    out += "       lateral load transfer: tracks " + fixed(g.track_front_m, 3) + " / " +
           fixed(g.track_rear_m, 3) + " m, front roll stiffness " +
           fixed(100 * g.roll_stiffness_front, 1) + " %, roll centres " +
           fixed(g.roll_centre_front_m, 3) + " / " + fixed(g.roll_centre_rear_m, 3) +
           " m: at 1 g, " + fixed(summary.transfer_at_1g_n->front, 0) + " N front, " +
           fixed(summary.transfer_at_1g_n->rear, 0) + " N rear to the outer tyre\n";
  } else {
    out += "       no lateral load transfer (no track_width, roll_stiffness_front)\n";
  }
  out += "       model " + std::string(car.model == VehicleModel::axle ? "axle" : "point-mass") +
         ", engine " + label(car.powertrain.aspiration) + "\n";
  out += "       aero figures in air of " + air_text(summary.reference_air) + "\n";
  for (const ConfigCheck& c : summary.configs) out += config_text(c, car);
  for (std::size_t t = 0; t < circuits.size(); ++t)
    out += track_text(car, summary.rated_power_w, circuits[t], summary.tracks[t], input_words);
  return out;
}

std::string check_json(const Car& car, const std::vector<Circuit>& circuits,
                       const CheckSummary& summary) {
  JsonWriter j;
  j.begin_object().field("lapwing", version());
  j.key("car")
      .begin_object()
      .field("name", car.name)
      .field("mass_kg", car.mass_kg)
      .field("front_weight", car.front_weight)
      .field("wheelbase_m", car.wheelbase_m)
      .field("cg_height_m", car.cg_height_m)
      .field("air_density_kg_m3", summary.reference_air.density_kg_m3)
      .field("lateral_load_transfer", summary.transfer_at_1g_n.has_value())
      .field("aspiration", label(car.powertrain.aspiration));
  j.key("configs").begin_array();
  for (const ConfigCheck& c : summary.configs) config_json(j, c);
  j.end_array().end_object();
  j.key("tracks").begin_array();
  for (std::size_t t = 0; t < circuits.size(); ++t) track_json(j, circuits[t], summary.tracks[t]);
  j.end_array().end_object();
  return j.str();
}

}  // namespace lapwing
