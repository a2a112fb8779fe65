#include "commands.hpp"

#include <iostream>

#include "lapwing/air.hpp"
#include "lapwing/car.hpp"
#include "lapwing/corners.hpp"
#include "lapwing/envelope.hpp"
#include "lapwing/error.hpp"
#include "lapwing/json.hpp"
#include "lapwing/mesh.hpp"
#include "lapwing/output.hpp"
#include "lapwing/report.hpp"
#include "lapwing/solver.hpp"
#include "lapwing/summary.hpp"
#include "lapwing/track.hpp"
#include "lapwing/units.hpp"

namespace lapwing::cli {

namespace {

double kph(double mps) {
  return mps / units::kph;
}

std::string describe_air(const Air& a) {
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

// A track with its mesh and corners, ready to solve.
struct LaidTrack {
  Track track;
  Mesh mesh;
  Air air;
  std::vector<CornerSpan> corners;
};

LaidTrack lay_out(const std::string& file) {
  LaidTrack t{load_track(file), {}, {}, {}};
  t.mesh = build_mesh(t.track, t.track.mesh_m);
  t.air = make_air(t.track.air);
  t.corners = find_corners(t.mesh);
  return t;
}

std::size_t pick_config(const Car& car, const std::string& name) {
  if (name.empty()) return 0;
  const int i = car.config_index(name);
  if (i < 0) {
    std::string list;
    for (const auto& n : car.config_names()) list += (list.empty() ? "" : ", ") + n;
    throw InputError(car.file, Mark{}, "no config named '" + name + "' (the car has " + list + ")",
                     "aero.configs");
  }
  return static_cast<std::size_t>(i);
}

}  // namespace

int check(const CheckOptions& o) {
  const Car car = load_car(o.car);
  std::vector<LaidTrack> tracks;
  for (const auto& f : o.tracks) tracks.push_back(lay_out(f));
  const Air sea_level = make_air(AirSpec{});

  std::string out;
  out += "car    " + car.name + " (" + car.file + ")\n";
  out += "       mass " + fixed(car.mass_kg, 1) + " kg, static front weight " +
         fixed(100 * car.front_weight, 1) + " %, wheelbase " + fixed(car.wheelbase_m, 3) +
         " m, cg height " + fixed(car.cg_height_m, 3) + " m\n\n";
  std::vector<std::vector<std::string>> rows;
  JsonWriter j;
  j.begin_object().field("lapwing", version());
  j.key("car")
      .begin_object()
      .field("name", car.name)
      .field("mass_kg", car.mass_kg)
      .field("front_weight", car.front_weight)
      .field("wheelbase_m", car.wheelbase_m)
      .field("cg_height_m", car.cg_height_m);
  j.key("configs").begin_array();
  for (std::size_t c = 0; c < car.configs.size(); ++c) {
    const Car cc = car.configured(c);
    const AeroConfig& a = cc.configs.front();
    const Envelope env(cc, sea_level);
    const double cda = a.cda_m2.front(), cla = a.cla_m2.front();
    rows.push_back({a.name, fixed(cda, 3), fixed(cla, 3), cda > 0 ? fixed(cla / cda, 2) : "-",
                    fixed(100 * a.balance.front(), 1), fixed(kph(env.top_speed_level_mps()), 1),
                    env.rev_limited() ? "rev limit" : "drag"});
    j.begin_object()
        .field("name", a.name)
        .field("cda_m2", cda)
        .field("cla_m2", cla)
        .field("aero_balance", a.balance.front())
        .field("top_speed_sea_level_kph", kph(env.top_speed_level_mps()))
        .field("top_speed_limit", env.rev_limited() ? "rev limit" : "drag")
        .end_object();
  }
  j.end_array().end_object();
  out += text_table({"config", "CdA m2", "ClA m2", "L/D", "aero balance %",
                     "top speed km/h (ISA sea level)", "set by"},
                    rows);

  j.key("tracks").begin_array();
  for (const auto& t : tracks) {
    const Closure cl = closure(t.track);
    out += "\ntrack  " + t.track.name + " (" + t.track.file + ")\n";
    out += "       " + std::string(t.track.closed ? "closed lap" : "open (sprint)") + ", length " +
           fixed(t.mesh.length_m, 1) + " m, closure gap " + fixed(cl.position_gap_m, 3) + " m / " +
           fixed(cl.heading_gap_rad / units::deg, 2) + " deg, elevation gap " +
           fixed(cl.elevation_gap_m, 2) + " m, corners " + std::to_string(t.corners.size()) +
           "\n       air " + describe_air(t.air) + ", mesh " + fixed(t.mesh.step_m, 4) + " m (" +
           std::to_string(t.mesh.intervals()) + " steps)\n";
    std::vector<std::vector<std::string>> trows;
    j.begin_object()
        .field("name", t.track.name)
        .field("file", t.track.file)
        .field("closed", t.track.closed)
        .field("length_m", t.mesh.length_m)
        .field("closure_gap_m", cl.position_gap_m)
        .field("closure_heading_deg", cl.heading_gap_rad / units::deg)
        .field("elevation_gap_m", cl.elevation_gap_m)
        .field("corner_count", static_cast<int>(t.corners.size()))
        .field("air_density_kg_m3", t.air.density_kg_m3);
    j.key("configs").begin_array();
    for (std::size_t c = 0; c < car.configs.size(); ++c) {
      const Envelope env(car.configured(c), t.air);
      trows.push_back({car.configs[c].name, fixed(kph(env.top_speed_level_mps()), 1)});
      j.begin_object()
          .field("name", car.configs[c].name)
          .field("top_speed_kph", kph(env.top_speed_level_mps()))
          .end_object();
    }
    j.end_array().end_object();
    out += text_table({"config", "top speed km/h (this air, level)"}, trows);
  }
  j.end_array().end_object();

  if (!o.json.empty()) write_file_atomic(o.json, j.str());
  std::cout << out;
  return 0;
}

int run(const RunOptions& o) {
  const Car car = load_car(o.car);
  const std::size_t ci = pick_config(car, o.config);
  const LaidTrack t = lay_out(o.track);
  const Car configured = car.configured(ci);
  const Envelope env(configured, t.air);
  const Lap lap = solve_lap(env, t.mesh, t.track.start_speed_mps);
  if (!t.track.closed && t.track.start_speed_mps > lap.steady.speed_mps.front() * (1 + 1e-9))
    throw InputError(t.track.file, t.track.start_speed_mark,
                     "start_speed " + fixed(kph(t.track.start_speed_mps), 1) +
                         " km/h is more than the car can hold at the start (" +
                         fixed(kph(lap.steady.speed_mps.front()), 1) + " km/h)",
                     "start_speed");
  const LapSummary s = summarize(lap, t.mesh, t.track, t.corners, env);

  std::string out;
  out += "car     " + car.name + " (" + car.file + "), config " + s.config + "\n";
  out += "track   " + t.track.name + " (" + t.track.file + "), " + fixed(t.mesh.length_m, 1) +
         " m, " + (t.track.closed ? "closed lap" : "open") + "\n";
  out += "air     " + describe_air(t.air) + "\n\n";
  out += lap_table(s);

  if (!o.out.empty()) {
    write_outputs(o.out, {{"summary.json", summary_json(car.name, {s})},
                          {"trace-" + t.track.id + "-" + s.config + ".csv", trace_csv(lap, t.mesh)},
                          {"corners.csv", corners_csv({s})}});
  }
  std::cout << out;
  return 0;
}

}  // namespace lapwing::cli
