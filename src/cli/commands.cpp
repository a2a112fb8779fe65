#include "commands.hpp"

#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <csignal>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <sstream>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/hash.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/io/log_file.hpp"
#include "lapwing/io/output.hpp"
#include "lapwing/io/track_data.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/model/aero.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/corners.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/report/compare_report.hpp"
#include "lapwing/report/html_report.hpp"
#include "lapwing/report/lap_files.hpp"
#include "lapwing/report/lap_text.hpp"
#include "lapwing/report/text_table.hpp"
#include "lapwing/report/trade_report.hpp"
#include "lapwing/solve/axle.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"
#include "lapwing/store/sweep_store.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/compare.hpp"
#include "lapwing/study/sweep.hpp"
#include "lapwing/study/thread_pool.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing::cli {

namespace {

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

// The air overrides parsed against their quantities.
struct AirOverride {
  std::optional<double> altitude_m, temperature_k, pressure_pa, humidity;
};

// The units a quantity accepts, as a list ("m", "mm", ...).
std::vector<std::string> unit_names(Quantity q) {
  std::vector<std::string> out;
  const std::string all = accepted_units(q);
  for (std::size_t a = 0; a < all.size();) {
    const std::size_t b = std::min(all.find(", ", a), all.size());
    out.push_back(all.substr(a, b - a));
    a = b + 2;
  }
  return out;
}

// A range given in SI, described in the unit a reader types: the quantity's default unit (the
// one a plain number is read in), or % for a fraction. E.g. "(0, 50] %", "[-50, 70] C".
std::string describe_in_units(Quantity q, const Range& r) {
  const std::string unit = q == Quantity::fraction ? "%" : unit_names(q).front();
  // si = value scale + offset, so value = (si - offset) / scale.
  const double offset = *to_si(0.0, unit, q), scale = *to_si(1.0, unit, q) - offset;
  Range shown = r;
  shown.lo = (r.lo - offset) / scale;
  shown.hi = (r.hi - offset) / scale;
  return shown.describe() + " " + unit;
}

std::optional<double> option_value(const std::string& text, const char* option, Quantity q,
                                   Range r) {
  if (text.empty()) return std::nullopt;
  std::string err;
  auto v = parse_quantity(text, q, err);
  if (!v) throw UsageError{std::string(option) + ": " + err};
  if (!r.contains(*v)) {
    std::string msg =
        std::string(option) + ": " + text + " is out of range (" + describe_in_units(q, r) + ")";
    // A plain number out of range is most often a number typed in another unit (2 for 2 %):
    // suggest every unit in which it is in range.
    if (const auto plain = parse_number(text)) {
      std::string suggestions;
      for (const auto& unit : unit_names(q)) {
        const auto si = to_si(*plain, unit, q);
        if (si && r.contains(*si))
          suggestions += (suggestions.empty() ? "" : " or ") + format_number(*plain) + " " + unit;
      }
      if (!suggestions.empty()) msg += "; did you mean " + suggestions + "?";
    }
    throw UsageError{msg};
  }
  return v;
}

AirOverride parse_air(const AirOptions& o) {
  return {option_value(o.altitude, "--altitude", Quantity::length, AirSpec::altitude_range),
          option_value(o.temperature, "--temperature", Quantity::temperature,
                       AirSpec::temperature_range),
          option_value(o.pressure, "--pressure", Quantity::pressure, AirSpec::pressure_range),
          option_value(o.humidity, "--humidity", Quantity::fraction, AirSpec::humidity_range)};
}

AirSpec apply(AirSpec spec, const AirOverride& o) {
  if (o.altitude_m) spec.altitude_m = *o.altitude_m;
  if (o.temperature_k) spec.temperature_k = o.temperature_k;
  if (o.pressure_pa) spec.pressure_pa = o.pressure_pa;
  if (o.humidity) spec.relative_humidity = *o.humidity;
  return spec;
}

// The files a command loads, and where each of their values stands: an error the library finds
// in them later (an InvalidInput: a start speed too high, a ride-height map that does not
// converge) is reported at its place in the file, as the loader's own errors are.
class Inputs {
 public:
  Car car(const std::string& file) {
    CarFile f = read_car_file(file);
    sources_.add(std::move(f.sources));
    return std::move(f.car);
  }
  Circuit lay_out(const std::string& file, const AirOverride& air) {
    TrackFile f = read_track_file(file);
    sources_.add(std::move(f.sources));
    return lapwing::lay_out(f.track, make_air(apply(f.track.air, air)));
  }
  std::vector<Circuit> lay_out_all(const std::vector<std::string>& files, const AirOverride& air);
  InputError error(const InvalidInput& e) const { return sources_.error(e); }

 private:
  SourceMaps sources_;
};

// Runs a command with its Inputs; an InvalidInput becomes the input error at its place.
template <typename Options>
int located(int (*command)(const Options&, Inputs&), const Options& o) {
  Inputs in;
  try {
    return command(o, in);
  } catch (const InvalidInput& e) {
    throw in.error(e);
  }
}

std::vector<Circuit> Inputs::lay_out_all(const std::vector<std::string>& files,
                                         const AirOverride& air) {
  std::vector<Circuit> out;
  for (std::size_t i = 0; i < files.size(); ++i) {
    for (std::size_t j = 0; j < i; ++j) {
      std::error_code e1, e2;
      const auto a = std::filesystem::weakly_canonical(files[i], e1);
      const auto b = std::filesystem::weakly_canonical(files[j], e2);
      if (files[i] == files[j] || (!e1 && !e2 && a == b))
        throw UsageError{"--track " + files[i] + " is given twice"};
    }
    out.push_back(this->lay_out(files[i], air));
  }
  return out;
}

std::size_t pick_config(const Car& car, const std::string& name) {
  if (name.empty()) return 0;
  const int i = car.config_index(name);
  if (i < 0) {
    const std::vector<std::string> names = car.config_names();
    std::string list;
    for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
    // The nearest name by spelling, else the one name that starts with what was typed.
    std::string near = closest(name, names);
    if (near.empty()) {
      std::vector<std::string> starting;
      for (const auto& n : names)
        if (n.rfind(name, 0) == 0) starting.push_back(n);
      if (starting.size() == 1) near = starting.front();
    }
    throw InputError(car.file, Mark{},
                     "no config named '" + name + "'" +
                         (near.empty() ? "" : "; did you mean '" + near + "'?") + " (the car has " +
                         list + ")",
                     "aero.configs");
  }
  return static_cast<std::size_t>(i);
}

}  // namespace

namespace {

// Per config: what check reports of its aero at a few speeds in one air.
void describe_config(const Car& car, std::size_t index, const Air& air, std::string& out,
                     JsonWriter& j) {
  const Car cc = car.configured(index);
  const AeroConfig& a = cc.configs.front();
  const Envelope env(cc, air);
  const AeroPoint rest = env.aero_point(0.0);
  j.begin_object()
      .field("name", a.name)
      .field("form", form_name(a.form))
      .field("cda_m2", rest.cda_m2)
      .field("cla_m2", rest.cla_m2)
      .field("lift_to_drag", rest.cda_m2 > 0 ? rest.cla_m2 / rest.cda_m2 : 0.0)
      .field("aero_balance", rest.balance)
      .field("drag_height_m", cc.drag_height_m)
      .field("top_speed_kph", units::to_kph(env.top_speed_level_mps()))
      .field("top_speed_limit", top_speed_limit_name(env.top_speed_limit()));
  out += "\nconfig " + a.name + " (" + std::string(form_name(a.form)) + "): CdA " +
         fixed(rest.cda_m2, 3) + " m2, ClA " + fixed(rest.cla_m2, 3) + " m2, L/D " +
         (rest.cda_m2 > 0 ? fixed(rest.cla_m2 / rest.cda_m2, 2) : std::string("-")) +
         ", aero balance " + fixed(100 * rest.balance, 1) + " %" +
         (env.has_map()         ? " (at rest)"
          : a.speed_mps.empty() ? ""
                                : " (first row)") +
         ", drag height " + fixed(cc.drag_height_m, 3) + " m, top speed " +
         fixed(units::to_kph(env.top_speed_level_mps()), 1) + " km/h (" +
         top_speed_limit_name(env.top_speed_limit()) + ")\n";
  std::vector<std::vector<std::string>> rows;
  bool no_downforce = false;
  j.key("at_speeds").begin_array();
  for (double speed_kph : {100.0, 200.0, 300.0}) {
    const double v = speed_kph * units::kph;
    const AeroPoint p = env.aero_point(v);
    const double q = 0.5 * air.density_kg_m3 * v * v;
    const double down = q * p.cla_m2, drag = q * p.cda_m2;
    // Front axle share of the aero load: the balance alone, then with the drag moment
    // (drag x drag height / wheelbase off the front axle); undefined without downforce. The
    // aero load on the front axle itself, DF bal - D z_D / L, is defined either way.
    const double share = p.balance;
    const std::optional<double> with_moment = aero_balance_with_drag_moment(
        p.cla_m2, p.cda_m2, p.balance, cc.drag_height_m, cc.wheelbase_m);
    const double front_aero = down * p.balance - drag * cc.drag_height_m / cc.wheelbase_m;
    if (!with_moment) no_downforce = true;
    std::vector<std::string> row{fixed(speed_kph, 0),
                                 fixed(down, 0),
                                 fixed(drag, 0),
                                 with_moment ? fixed(100 * share, 1) : std::string("-"),
                                 with_moment ? fixed(100 * *with_moment, 1) : std::string("-"),
                                 fixed(front_aero, 0)};
    j.begin_object().field("speed_kph", speed_kph).field("downforce_n", down).field("drag_n", drag);
    j.key("front_share");
    if (with_moment)
      j.value(share);
    else
      j.null();
    j.key("front_share_with_drag_moment");
    if (with_moment)
      j.value(*with_moment);
    else
      j.null();
    j.field("front_aero_load_n", front_aero);
    if (env.has_map()) {
      row.push_back(fixed(1000 * p.front_ride_m, 1) + " / " + fixed(1000 * p.rear_ride_m, 1) +
                    (p.off_map ? " off map" : "") + (p.grounded ? " grounded" : ""));
      j.field("front_ride_height_m", p.front_ride_m).field("rear_ride_height_m", p.rear_ride_m);
    }
    j.end_object();
    rows.push_back(row);
  }
  j.end_array();
  std::vector<std::string> header{"speed km/h",    "downforce N",        "drag N",
                                  "front share %", "with drag moment %", "front aero load N"};
  if (env.has_map()) header.push_back("ride height F / R mm");
  out += text_table(header, rows);
  // Notes: what the data does outside its range, said once (the same notes a lap that reaches
  // them is warned of, summary.hpp).
  std::vector<std::string> notes;
  for (const RangeNote& n : range_notes(env)) notes.push_back(n.text);
  if (no_downforce)
    notes.push_back(
        "no downforce: the front share of the aero load is undefined ('-'); the drag moment "
        "alone takes drag x drag height / wheelbase off the front axle (front aero load)");
  if (a.trim)
    notes.push_back("straight-line trim: CdA " + fixed(a.trim->dcda_m2, 3) + " m2, ClA " +
                    fixed(a.trim->dcla_m2, 3) + " m2, balance " + fixed(100 * a.trim->dbalance, 1) +
                    " points where |curvature| < " + fixed(a.trim->below_curvature_1pm, 4) +
                    " 1/m under full drive");
  j.key("notes").begin_array();
  for (const auto& n : notes) {
    out += "       note: " + n + "\n";
    j.value(n);
  }
  j.end_array().end_object();
}

}  // namespace

namespace {
int check(const CheckOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  const Car car = in.car(o.car);
  const std::vector<Circuit> tracks = in.lay_out_all(o.tracks, air);
  // The car's own figures in ISO 2533 sea-level air, or in the air the options give.
  const Air reference = make_air(apply(AirSpec{}, air));

  std::string out;
  out += "car    " + car.name + " (" + car.file + ")\n";
  out += "       mass " + fixed(car.mass_kg, 1) + " kg, static front weight " +
         fixed(100 * car.front_weight, 1) + " %, wheelbase " + fixed(car.wheelbase_m, 3) +
         " m, cg height " + fixed(car.cg_height_m, 3) + " m\n";
  out += "       aero figures in air of " + describe_air(reference) + "\n";
  JsonWriter j;
  j.begin_object().field("lapwing", version());
  j.key("car")
      .begin_object()
      .field("name", car.name)
      .field("mass_kg", car.mass_kg)
      .field("front_weight", car.front_weight)
      .field("wheelbase_m", car.wheelbase_m)
      .field("cg_height_m", car.cg_height_m)
      .field("air_density_kg_m3", reference.density_kg_m3);
  j.key("configs").begin_array();
  for (std::size_t c = 0; c < car.configs.size(); ++c) describe_config(car, c, reference, out, j);
  j.end_array().end_object();

  j.key("tracks").begin_array();
  for (const auto& t : tracks) {
    const Closure cl = closure(t.track);
    out += "\ntrack  " + t.track.name + " (" + t.track.file + ")\n";
    // The closure gap is what a lap must bring to zero: an open track has none to report.
    out += "       " + std::string(t.track.closed ? "closed lap" : "open (sprint)") + ", length " +
           fixed(t.mesh.length_m, 1) + " m" +
           (t.track.closed ? ", closure gap " + fixed(cl.position_gap_m, 3) + " m / " +
                                 fixed(cl.heading_gap_rad / units::deg, 2) +
                                 " deg, elevation gap " + fixed(cl.elevation_gap_m, 2) + " m"
                           : std::string(", rise ") + fixed(cl.elevation_gap_m, 2) + " m") +
           ", corners " + std::to_string(t.corners.size()) + "\n       air " + describe_air(t.air) +
           ", mesh " + fixed(t.mesh.step_m, 4) + " m (" + std::to_string(t.mesh.intervals()) +
           " steps)\n";
    if (t.track.profile) {
      const PathProfile& p = *t.track.profile;
      const bool fitted = p.source == PathProfile::Source::centerline;
      out += "       from " + p.data_file +
             (fitted ? std::string(p.geodetic ? " (WGS-84 lat/lon, tangent plane)" : "") +
                           ": smoothing " + fixed(p.smoothing_m, 1) + " m, fit residual " +
                           fixed(1000 * p.fit_residual_rms_m, 1) + " mm rms, curvature noise " +
                           fixed(p.curvature_noise_rms_1pm, 5) + " 1/m rms"
                     : std::string(": curvature as given") +
                           (p.has_bank ? "; bank_deg read but not modelled" : "")) +
             "\n";
      for (const auto& n : p.notes) out += "       note: " + n + "\n";
    }
    std::vector<std::vector<std::string>> trows;
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
    j.field("corner_count", static_cast<int>(t.corners.size()))
        .field("air_density_kg_m3", t.air.density_kg_m3);
    j.key("notes").begin_array();
    if (t.track.profile)
      for (const auto& n : t.track.profile->notes) j.value(n);
    j.end_array();
    j.key("configs").begin_array();
    for (std::size_t c = 0; c < car.configs.size(); ++c) {
      const Envelope env(car.configured(c), t.air);
      trows.push_back({car.configs[c].name, fixed(units::to_kph(env.top_speed_level_mps()), 1),
                       top_speed_limit_name(env.top_speed_limit())});
      j.begin_object()
          .field("name", car.configs[c].name)
          .field("top_speed_kph", units::to_kph(env.top_speed_level_mps()))
          .field("top_speed_limit", top_speed_limit_name(env.top_speed_limit()))
          .end_object();
    }
    j.end_array();
    if (t.track.profile && t.track.profile->source == PathProfile::Source::centerline) {
      // How much the smoothing choice matters: the lap at half and double the length. A variant
      // that cannot be laid out or solved (a tighter fit can make a start speed too high, or a
      // lap not close) is a note naming it: the track itself is what run takes.
      const PathProfile& p = *t.track.profile;
      const double factors[3] = {0.5, 1.0, 2.0};
      const char* variant_names[3] = {"half", "as given", "double"};
      std::vector<std::string> notes;
      auto variant_label = [&](int k) {
        return "the centerline smoothed over " + fixed(factors[k] * p.smoothing_m, 1) + " m (" +
               variant_names[k] + ")";
      };
      std::optional<Circuit> variants[3];
      for (int k = 0; k < 3; ++k) {
        if (factors[k] == 1.0) {
          variants[k] = t;
          continue;
        }
        try {
          Track v = t.track;
          CenterlineOptions co;
          co.smoothing_m = p.smoothing_m * factors[k];
          co.elevation_smoothing_m = p.elevation_smoothing_m;
          v.profile = import_centerline(p.data_file, v.closed, co);
          variants[k] = lapwing::lay_out(v, t.air);
        } catch (const InputError& e) {
          notes.push_back(variant_label(k) + " cannot be laid out: " + e.message());
        } catch (const InvalidInput& e) {
          notes.push_back(variant_label(k) + " cannot be laid out: " + in.error(e).message());
        }
      }
      std::vector<std::vector<std::string>> srows;
      j.key("smoothing_sensitivity").begin_array();
      for (std::size_t c = 0; c < car.configs.size(); ++c) {
        const Car cc = car.configured(c);
        std::optional<double> laps[3];
        for (int k = 0; k < 3; ++k) {
          if (!variants[k]) continue;
          try {
            laps[k] = run_lap(cc, *variants[k]).summary.lap_time_s;
          } catch (const InputError& e) {
            notes.push_back(variant_label(k) + " cannot be solved with config " +
                            car.configs[c].name + ": " + e.message());
          } catch (const InvalidInput& e) {
            notes.push_back(variant_label(k) + " cannot be solved with config " +
                            car.configs[c].name + ": " + in.error(e).message());
          } catch (const CannotMove& e) {
            notes.push_back(variant_label(k) + " cannot be solved with config " +
                            car.configs[c].name + ": the car cannot complete it: " + e.what());
          }
        }
        auto cell = [](const std::optional<double>& v) {
          return v ? fixed(*v, 3) : std::string("-");
        };
        srows.push_back({car.configs[c].name, cell(laps[0]), cell(laps[1]), cell(laps[2]),
                         laps[0] && laps[1] && laps[2]
                             ? fixed(100 * (*laps[2] - *laps[0]) / *laps[1], 2)
                             : std::string("-")});
        j.begin_object().field("config", car.configs[c].name);
        const char* keys[3] = {"half_s", "as_given_s", "double_s"};
        for (int k = 0; k < 3; ++k) {
          j.key(keys[k]);
          if (laps[k])
            j.value(*laps[k]);
          else
            j.null();
        }
        j.end_object();
      }
      j.end_array();
      j.key("smoothing_sensitivity_notes").begin_array();
      for (const auto& n : notes) j.value(n);
      j.end_array();
      out +=
          "       lap time with the centerline smoothed over half, the given and double length\n" +
          text_table({"config", "lap s at " + fixed(0.5 * p.smoothing_m, 1) + " m",
                      "at " + fixed(p.smoothing_m, 1) + " m",
                      "at " + fixed(2 * p.smoothing_m, 1) + " m", "spread %"},
                     srows);
      for (const auto& n : notes) out += "       note: " + n + "\n";
    }
    j.end_object();
    out += text_table({"config", "top speed km/h (this air, level)", "limit"}, trows);
  }
  j.end_array().end_object();

  if (!o.json.empty()) write_file_atomic(o.json, j.str());
  std::cout << out;
  return 0;
}
}  // namespace

int check(const CheckOptions& o) {
  return located(&check, o);
}

void apply_model(const std::string& model, Car& car) {
  if (model.empty()) return;
  if (model == "point-mass")
    car.model = VehicleModel::point_mass;
  else if (model == "axle")
    car.model = VehicleModel::axle;
  else
    throw UsageError{"--model: '" + model + "' is not one of point-mass | axle"};
}

namespace {
int run(const RunOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  Car car = in.car(o.car);
  apply_model(o.model, car);
  const std::size_t ci = pick_config(car, o.config);
  const Circuit t = in.lay_out(o.track, air);
  LapRun r = run_lap(car.configured(ci), t);
  const LapSummary s = r.summary;

  std::string out;
  out += "car     " + car.name + " (" + car.file + "), config " + s.config + ", " +
         (car.model == VehicleModel::axle ? "axle" : "point-mass") + " model\n";
  out += "track   " + t.track.name + " (" + t.track.file + "), " + fixed(t.mesh.length_m, 1) +
         " m, " + (t.track.closed ? "closed lap" : "open") + "\n";
  out += "air     " + describe_air(t.air) + "\n";
  if (t.track.profile)
    for (const auto& n : t.track.profile->notes) out += "note    " + n + "\n";
  out += "\n";
  out += lap_table(s);

  if (!o.out.empty()) {
    std::vector<std::pair<std::string, std::string>> files{
        {"summary.json", summary_json(car.name, {s})},
        {"trace-" + t.track.id + "-" + s.config + ".csv", trace_csv(r.lap, t.mesh)},
        {"corners.csv", corners_csv({s})}};
    // The single-lap page: the comparison report of one config on one track.
    const std::vector<Circuit> circuits{t};
    const Comparison one = single_lap_comparison(ci, std::move(r), t);
    files.push_back(
        {"report.html",
         html_report({&car, &circuits, &one, nullptr,
                      "run, config " + s.config + ", " +
                          (car.model == VehicleModel::axle ? "axle" : "point-mass") + " model"})});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}
}  // namespace

int run(const RunOptions& o) {
  return located(&run, o);
}

namespace {
std::vector<std::size_t> pick_configs(const Car& car, const std::vector<std::string>& names) {
  std::vector<std::size_t> out;
  if (names.empty())
    for (std::size_t i = 0; i < car.configs.size(); ++i) out.push_back(i);
  for (const auto& n : names) {
    const std::size_t i = pick_config(car, n);
    if (std::find(out.begin(), out.end(), i) != out.end())
      throw UsageError{"--config " + n + " is given twice"};
    out.push_back(i);
  }
  return out;
}

double parse_fraction_option(const std::string& text, const char* option, Range r) {
  auto v = option_value(text, option, Quantity::fraction, r);
  return *v;
}

int compare(const CompareOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  Car car = in.car(o.car);
  apply_model(o.model, car);
  const std::vector<std::size_t> configs = pick_configs(car, o.configs);
  const std::vector<Circuit> circuits = in.lay_out_all(o.tracks, air);
  const Comparison c = lapwing::compare(car, configs, circuits, o.threads);
  const std::string out = compare_table(car, c, circuits);
  if (!o.out.empty()) {
    std::vector<std::pair<std::string, std::string>> files;
    std::vector<LapSummary> all;
    for (std::size_t t = 0; t < c.tracks.size(); ++t) {
      const auto& entries = c.tracks[t].entries;
      for (const auto& e : entries) {
        all.push_back(e.run.summary);
        files.push_back({"trace-" + circuits[t].track.id + "-" + e.run.summary.config + ".csv",
                         trace_csv(e.run.lap, circuits[t].mesh)});
      }
      for (std::size_t a = 0; a < entries.size(); ++a)
        for (std::size_t b = a + 1; b < entries.size(); ++b)
          files.push_back(
              {"delta-" + circuits[t].track.id + "-" + entries[a].run.summary.config + "-" +
                   entries[b].run.summary.config + ".csv",
               delta_csv(circuits[t].mesh, delta_trace(entries[a].run.lap, entries[b].run.lap))});
    }
    files.push_back({"summary.json", summary_json(car.name, all)});
    files.push_back({"corners.csv", corners_csv(all)});
    files.push_back({"compare.json", compare_json(car, c, circuits)});
    files.push_back({"report.html", html_report({&car, &circuits, &c, nullptr, "compare"})});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}

int trade(const TradeOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  lapwing::TradeOptions options;
  options.step = parse_fraction_option(o.step, "--step", lapwing::TradeOptions::step_range);
  options.grid_span =
      parse_fraction_option(o.span, "--span", lapwing::TradeOptions::grid_span_range);
  options.grid_points = o.grid;
  Car car = in.car(o.car);
  apply_model(o.model, car);
  std::vector<std::size_t> configs;
  if (o.config.empty())
    for (std::size_t i = 0; i < car.configs.size(); ++i) configs.push_back(i);
  else
    configs.push_back(pick_config(car, o.config));
  const std::vector<Circuit> circuits = in.lay_out_all(o.tracks, air);
  const Trade t = lapwing::trade(car, configs, circuits, options, o.threads);
  const std::string out = trade_table(car, t, circuits);
  if (!o.out.empty()) {
    std::vector<std::pair<std::string, std::string>> files{
        {"trade.json", trade_json(car, t, circuits)}};
    for (const auto& g : t.grids)
      files.push_back({"trade-grid-" + circuits[g.track].track.id + ".csv", trade_grid_csv(g)});
    files.push_back(
        {"report.html", html_report({&car, &circuits, nullptr, &t,
                                     "trade, steps of " + fixed(100 * options.step, 1) + " %"})});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}

// --- sweep -------------------------------------------------------------------------------------

std::atomic<bool> sweep_interrupted{false};
extern "C" void on_sigint(int) {
  sweep_interrupted.store(true);
}

std::string read_bytes(const std::string& file) {
  std::ifstream in(file, std::ios::binary);
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

// A point's car refused by the car file's rules, said as the set (or the point's values) that
// made it: "--set mass=500kg:700kg:3: value 500 kg: ... (mass)".
UsageError point_error(const SweepPlan& plan, const std::vector<std::string>& paths,
                       std::size_t point, const InputError& e) {
  for (std::size_t s = 0; s < paths.size(); ++s) {
    const std::string& p = paths[s];
    const std::string& k = e.key_path();
    if (k == p || k.rfind(p + ".", 0) == 0 || k.rfind(p + "[", 0) == 0)
      return UsageError{"--set " + plan.sets()[s].text + ": at " + plan.value(point, s).text +
                        ": " + e.message() + " (" + k + ")"};
  }
  std::string values;
  for (std::size_t s = 0; s < paths.size(); ++s)
    values += (values.empty() ? "" : ", ") + plan.sets()[s].key + " = " + plan.value(point, s).text;
  return UsageError{"--set: the point " + values + ": " + e.message() +
                    (e.key_path().empty() ? "" : " (" + e.key_path() + ")")};
}

int sweep(const SweepOptions& o, Inputs& in) {
  if (o.car.empty()) throw UsageError{"sweep: --car is required"};
  if (o.tracks.empty()) throw UsageError{"sweep: --track is required"};
  if (o.sets.empty()) throw UsageError{"sweep: give at least one --set KEY=VALUES"};
  if (o.out.empty()) throw UsageError{"sweep: --out FILE.sqlite is required"};
  const AirOverride air = parse_air(o.air);
  std::vector<SweepSet> sets;
  for (const auto& text : o.sets) sets.push_back(parse_set(text));
  const SweepDesign design = parse_design(o.design);
  const Shard shard = parse_shard(o.shard);
  const SweepPlan plan(sets, design);

  // The car file as a document: each point sets its values there and is read like a car file.
  const Document doc = load_document(o.car);
  Car base = in.car(o.car);
  apply_model(o.model, base);
  std::vector<std::string> paths;
  std::vector<std::string> configs = o.configs;
  for (const auto& s : plan.sets()) {
    paths.push_back(car_key_path(doc, s.key));
    const std::string fam = "aero.families." + s.key + ".at";
    // Without --config, a swept family's config is what is run.
    if (o.configs.empty() && paths.back() == fam) configs.push_back(s.key);
  }
  if (configs.empty()) configs.push_back(base.configs.front().name);
  for (const auto& c : configs) pick_config(base, c);
  for (std::size_t i = 0; i < configs.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (configs[i] == configs[j]) throw UsageError{"--config " + configs[i] + " is given twice"};
  const std::vector<Circuit> circuits = in.lay_out_all(o.tracks, air);

  const auto car_at = [&](std::size_t point) {
    Document d = doc;
    for (std::size_t s = 0; s < paths.size(); ++s)
      set_car_value(d, paths[s], plan.value(point, s).text);
    Car car = read_car_document(d).car;
    apply_model(o.model, car);
    return car;
  };
  // Every point of the shard is read and checked before any lap is run.
  std::vector<std::size_t> mine;
  for (std::size_t p = 0; p < plan.points(); ++p)
    if (shard.contains(p)) mine.push_back(p);
  parallel_for(mine.size(), o.threads, [&](std::size_t i, LapSolver&) {
    try {
      const Car car = car_at(mine[i]);
      for (const auto& c : configs)
        if (car.config_index(c) < 0) throw InputError(o.car, Mark{}, "no config named '" + c + "'");
    } catch (const InputError& e) {
      throw point_error(plan, paths, mine[i], e);
    }
  });

  StudyRecord study;
  study.version = version();
  study.command = o.command;
  study.design = design.text();
  study.shard = shard.text();
  study.points = plan.points();
  std::string identity = "lapwing " + study.version + "\n";
  const std::string car_bytes = read_bytes(o.car);
  study.inputs.push_back({"car", o.car, hex64(fnv1a64(car_bytes))});
  identity += "car " + study.inputs.back().fnv1a64 + "\n";
  for (std::size_t t = 0; t < circuits.size(); ++t) {
    study.inputs.push_back({"track", o.tracks[t], hex64(fnv1a64(read_bytes(o.tracks[t])))});
    identity += "track " + study.inputs.back().fnv1a64 + "\n";
    // A track's data (centerline or curvature CSV) is an input too: a changed file is another
    // study.
    if (const auto& p = circuits[t].track.profile; p && !p->data_file.empty()) {
      study.inputs.push_back(
          {"track-data", p->data_file, hex64(fnv1a64(read_bytes(p->data_file)))});
      identity += "track-data " + study.inputs.back().fnv1a64 + "\n";
    }
    study.tracks.push_back(circuits[t].track.id);
  }
  study.configs = configs;
  for (const auto& c : configs) identity += "config " + c + "\n";
  for (const auto& s : plan.sets()) identity += "set " + s.text + "\n";
  identity += "design " + design.text() + "\nmodel " + o.model + "\nair " + o.air.altitude + "|" +
              o.air.temperature + "|" + o.air.pressure + "|" + o.air.humidity + "\n";
  study.study_id = hex64(fnv1a64(identity));
  for (std::size_t t = 0; t < study.tracks.size(); ++t)
    for (std::size_t j = 0; j < t; ++j)
      if (study.tracks[t] == study.tracks[j])
        throw UsageError{"--track: two tracks share the name '" + study.tracks[t] +
                         "' (the results name tracks by file name)"};

  SweepStore store(o.out, study, plan);
  lapwing::SweepOptions run;
  run.shard = shard;
  run.threads = o.threads;
  run.stop = &sweep_interrupted;
  const bool terminal = isatty(STDERR_FILENO);
  if (terminal)
    run.progress = [](const SweepProgress& p) {
      const double rate = p.elapsed_s > 0 ? p.laps / p.elapsed_s : 0.0;
      const double left =
          p.done ? p.elapsed_s * static_cast<double>(p.total - p.done) / p.done : 0.0;
      std::cerr << "\r" << p.done << "/" << p.total << " points   " << fixed(rate, 1)
                << " laps/s   " << fixed(left, 0) << " s left   " << std::flush;
    };
  sweep_interrupted.store(false);
  const auto previous = std::signal(SIGINT, on_sigint);
  const auto start = std::chrono::steady_clock::now();
  SweepOutcome r;
  try {
    r = run_sweep(plan, circuits, configs, car_at, store, run);
  } catch (...) {
    std::signal(SIGINT, previous);
    throw;
  }
  std::signal(SIGINT, previous);
  const double secs =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  if (terminal) std::cerr << "\n";

  std::cout << "study   " << study.study_id << ", " << plan.points() << " points x "
            << circuits.size() << " tracks x " << configs.size() << " configs, design "
            << design.text() << (shard.n > 1 ? ", shard " + shard.text() : "") << "\n"
            << "laps    " << r.laps << " in " << fixed(secs, 1) << " s ("
            << fixed(secs > 0 ? static_cast<double>(r.laps) / secs : 0.0, 1) << " laps/s); points "
            << r.run << " run, " << r.skipped << " already in " << o.out << "\n";
  const StoreCounts counts = store_counts(o.out);
  if (counts.not_ok)
    std::cout << "note    " << counts.not_ok
              << " laps cannot complete their track (status cannot-move in the laps table)\n";
  std::vector<std::vector<std::string>> rows;
  std::vector<std::string> header{"track", "config", "lap s"};
  for (const auto& s : plan.sets()) header.push_back(s.key + (s.unit.empty() ? "" : " " + s.unit));
  header.push_back("point");
  for (const BestPoint& b : best_points(o.out)) {
    std::vector<std::string> row{b.track, b.config, fixed(b.lap_time_s, 3)};
    for (const auto& v : b.values) row.push_back(v.second);
    row.push_back(std::to_string(b.point));
    rows.push_back(row);
  }
  std::cout << "\nbest point per track (" << o.out << ")\n" << text_table(header, rows);
  if (r.stopped) {
    std::cout << "stopped: " << r.run << " of " << (r.in_shard - r.skipped)
              << " points done and committed; run the same command again to resume\n";
    return 130;
  }
  return 0;
}
}  // namespace

int compare(const CompareOptions& o) {
  return located(&compare, o);
}

int trade(const TradeOptions& o) {
  return located(&trade, o);
}

int sweep(const SweepOptions& o) {
  return located(&sweep, o);
}

int sweep_merge(const SweepMergeOptions& o) {
  merge_stores(o.out, o.inputs);
  const StoreCounts c = store_counts(o.out);
  std::cout << "merged  " << o.inputs.size() << " files into " << o.out << ": " << c.rows << " of "
            << c.expected << " laps of the study"
            << (c.rows == c.expected ? " (complete)"
                                     : " (incomplete: run the missing shards, then merge them in)")
            << "\n";
  return 0;
}

int sweep_export(const SweepExportOptions& o) {
  if (o.csv.empty()) throw UsageError{"sweep export: --csv OUT.csv is required"};
  export_csv(o.file, o.csv);
  std::cout << "wrote   " << o.csv << "\n";
  return 0;
}

}  // namespace lapwing::cli

namespace lapwing::cli {

int track_from_log(const FromLogOptions& o) {
  if (o.distance.empty() == o.time.empty())
    throw UsageError{"give one of --distance COL and --time COL"};
  if (o.lat_accel.empty() && o.yaw_rate.empty())
    throw UsageError{"give --lat-accel COL (or --yaw-rate COL)"};
  const std::filesystem::path out(o.out);
  if (out.extension() != ".yaml") throw UsageError{"--out must name a .yaml track file"};
  LogOptions l;
  l.log = o.log;
  l.speed = o.speed;
  l.lat_accel = o.lat_accel;
  l.yaw_rate = o.yaw_rate;
  l.distance = o.distance;
  l.time = o.time;
  l.speed_unit = o.speed_unit;
  l.accel_unit = o.accel_unit;
  l.yaw_unit = o.yaw_unit;
  l.closed = o.closed;
  l.name = o.name;
  l.smoothing_m =
      *option_value(o.smoothing, "--smoothing", Quantity::length, LogOptions::smoothing_range);
  l.air = apply(AirSpec{}, parse_air(o.air));
  const std::string csv_name = out.stem().string() + ".csv";
  const LogTrack t = lapwing::track_from_log(l, csv_name);
  const std::filesystem::path dir = out.parent_path().empty() ? "." : out.parent_path();
  write_outputs(dir, {{out.filename().string(), t.yaml}, {csv_name, t.csv}});
  std::cout << "track   " << o.out << " and " << (dir / csv_name).string() << "\n"
            << "length  " << fixed(t.length_m, 1) << " m"
            << (o.closed
                    ? ", closure spread along the lap: heading " + fixed(t.closure_heading_deg, 2) +
                          " deg, position " + fixed(t.closure_gap_m, 1) + " m"
                    : ", start speed " + fixed(units::to_kph(t.start_speed_mps), 1) +
                          " km/h (the log's first)")
            << ", peak lateral acceleration " << fixed(t.peak_lateral_g, 2) << " g\n";
  return 0;
}

}  // namespace lapwing::cli
