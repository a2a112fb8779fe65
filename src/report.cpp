#include "lapwing/report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "lapwing/csv_writer.hpp"
#include "lapwing/json.hpp"
#include "lapwing/units.hpp"

#ifndef LAPWING_VERSION
#define LAPWING_VERSION "0.0.0"
#endif

namespace lapwing {

std::string version() {
  return LAPWING_VERSION;
}

// A number, or null where it is undefined.
static void optional_field(JsonWriter& w, std::string_view key, const std::optional<double>& v) {
  w.key(key);
  if (v)
    w.value(*v);
  else
    w.null();
}

// Percent with one decimal, or "-" where undefined.
static std::string percent_or_dash(const std::optional<double>& v) {
  return v ? fixed(100 * *v, 1) : std::string("-");
}

static void write_balance(JsonWriter& w, const BalanceSummary& b) {
  w.key("balance")
      .begin_object()
      .field("static_front_share", b.static_front_share)
      .field("aero_balance_150_kph", b.aero_balance_150);
  optional_field(w, "aero_balance_with_drag_150_kph", b.aero_balance_eff_150);
  w.field("aero_balance_250_kph", b.aero_balance_250);
  optional_field(w, "aero_balance_with_drag_250_kph", b.aero_balance_eff_250);
  w.key("lowest_front_share_accelerating_above_200_kph");
  if (b.has_fast_acceleration)
    w.value(b.lowest_front_share_fast);
  else
    w.null();
  w.key("lowest_front_share_at_m");
  if (b.has_fast_acceleration)
    w.value(b.lowest_front_share_at_m);
  else
    w.null();
  w.key("front_limited_corners").begin_array();
  for (int id : b.front_limited_corners) w.value(id);
  w.end_array()
      .field("balance_index_threshold", b.threshold)
      .field("front_limited_length_m", b.front_limited_length_m)
      .end_object();
}

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
        .field("top_speed_kph", units::to_kph(s.top_speed_mps))
        .field("min_speed_kph", units::to_kph(s.min_speed_mps))
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
          .field("entry_kph", units::to_kph(c.entry_mps))
          .field("apex_kph", units::to_kph(c.apex_mps))
          .field("exit_kph", units::to_kph(c.exit_mps))
          .field("time_s", c.time_s)
          .field("limit", c.limit)
          .field("entry_axle", c.entry_axle)
          .field("apex_axle", c.apex_axle)
          .field("exit_axle", c.exit_axle)
          .field("entry_balance_index", c.entry_balance_index)
          .field("apex_balance_index", c.apex_balance_index)
          .field("exit_balance_index", c.exit_balance_index)
          .end_object();
    }
    w.end_array();
    write_balance(w, s.balance);
    w.end_object();
  }
  w.end_array().end_object();
  return w.str();
}

namespace {

// trace-TRACK-CONFIG.csv: one row per mesh point.
struct TraceRow {
  const Lap& lap;
  const Mesh& mesh;
  std::size_t i;
};
using TraceColumn = CsvColumn<TraceRow>;
constexpr TraceColumn trace_columns[] = {
    {"distance_m", [](std::string& o, const TraceRow& r) { csv_number(o, r.mesh.s_m[r.i]); }},
    {"time_s", [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.time_s[r.i]); }},
    {"x_m", [](std::string& o, const TraceRow& r) { csv_number(o, r.mesh.x_m[r.i]); }},
    {"y_m", [](std::string& o, const TraceRow& r) { csv_number(o, r.mesh.y_m[r.i]); }},
    {"curvature_1pm",
     [](std::string& o, const TraceRow& r) { csv_number(o, r.mesh.curvature_1pm[r.i]); }},
    {"speed_kph",
     [](std::string& o, const TraceRow& r) { csv_number(o, units::to_kph(r.lap.speed_mps[r.i])); }},
    {"long_accel_g",
     [](std::string& o, const TraceRow& r) {
       csv_number(o, r.lap.long_accel_mps2[r.i] / units::g0);
     }},
    {"lat_accel_g",
     [](std::string& o, const TraceRow& r) {
       csv_number(o, r.lap.lat_accel_mps2[r.i] / units::g0);
     }},
    {"gear", [](std::string& o, const TraceRow& r) { o += std::to_string(r.lap.gear[r.i]); }},
    {"rpm", [](std::string& o,
               const TraceRow& r) { csv_number(o, r.lap.engine_radps[r.i] / units::rpm); }},
    {"phase", [](std::string& o, const TraceRow& r) { o += phase_name(r.lap.phase[r.i]); }},
    {"drag_N", [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.drag_n[r.i]); }},
    {"downforce_N",
     [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.downforce_n[r.i]); }},
    {"front_load_N",
     [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.front_load_n[r.i]); }},
    {"rear_load_N",
     [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.rear_load_n[r.i]); }},
    {"front_share",
     [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.front_share[r.i]); }},
    // Empty where the car has no downforce (the share of no load is undefined).
    {"aero_balance_eff",
     [](std::string& o, const TraceRow& r) {
       csv_number_or_empty(o, r.lap.aero_balance_eff[r.i]);
     }},
    {"front_usage",
     [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.front_usage[r.i]); }},
    {"rear_usage", [](std::string& o, const TraceRow& r) { csv_number(o, r.lap.rear_usage[r.i]); }},
    {"balance_index",
     [](std::string& o, const TraceRow& r) {
       csv_number(o, r.lap.front_usage[r.i] - r.lap.rear_usage[r.i]);
     }},
};

// corners.csv: one row per corner of every result.
struct CornerRow {
  const LapSummary& s;
  const CornerResult& c;
};
using CornerColumn = CsvColumn<CornerRow>;
constexpr CornerColumn corner_columns[] = {
    {"track", [](std::string& o, const CornerRow& r) { csv_text(o, r.s.track_name); }},
    {"config", [](std::string& o, const CornerRow& r) { csv_text(o, r.s.config); }},
    {"id", [](std::string& o, const CornerRow& r) { o += std::to_string(r.c.id); }},
    {"start_m", [](std::string& o, const CornerRow& r) { csv_number(o, r.c.start_m); }},
    {"apex_m", [](std::string& o, const CornerRow& r) { csv_number(o, r.c.apex_m); }},
    {"end_m", [](std::string& o, const CornerRow& r) { csv_number(o, r.c.end_m); }},
    {"entry_kph",
     [](std::string& o, const CornerRow& r) { csv_number(o, units::to_kph(r.c.entry_mps)); }},
    {"apex_kph",
     [](std::string& o, const CornerRow& r) { csv_number(o, units::to_kph(r.c.apex_mps)); }},
    {"exit_kph",
     [](std::string& o, const CornerRow& r) { csv_number(o, units::to_kph(r.c.exit_mps)); }},
    {"time_s", [](std::string& o, const CornerRow& r) { csv_number(o, r.c.time_s); }},
    {"limit", [](std::string& o, const CornerRow& r) { csv_text(o, r.c.limit); }},
    {"entry_axle", [](std::string& o, const CornerRow& r) { csv_text(o, r.c.entry_axle); }},
    {"apex_axle", [](std::string& o, const CornerRow& r) { csv_text(o, r.c.apex_axle); }},
    {"exit_axle", [](std::string& o, const CornerRow& r) { csv_text(o, r.c.exit_axle); }},
    {"entry_balance_index",
     [](std::string& o, const CornerRow& r) { csv_number(o, r.c.entry_balance_index); }},
    {"apex_balance_index",
     [](std::string& o, const CornerRow& r) { csv_number(o, r.c.apex_balance_index); }},
    {"exit_balance_index",
     [](std::string& o, const CornerRow& r) { csv_number(o, r.c.exit_balance_index); }},
};

// delta-TRACK-A-B.csv: one row per mesh point.
struct DeltaRow {
  double s_m, delta_s;
};
constexpr CsvColumn<DeltaRow> delta_columns[] = {
    {"distance_m", [](std::string& o, const DeltaRow& r) { csv_number(o, r.s_m); }},
    {"delta_s", [](std::string& o, const DeltaRow& r) { csv_number(o, r.delta_s); }},
};

// trade-grid-TRACK.csv: one row per grid node.
struct GridRow {
  double cla_m2, cda_m2, lap_time_s;
};
constexpr CsvColumn<GridRow> grid_columns[] = {
    {"cla_m2", [](std::string& o, const GridRow& r) { csv_number(o, r.cla_m2); }},
    {"cda_m2", [](std::string& o, const GridRow& r) { csv_number(o, r.cda_m2); }},
    {"lap_time_s", [](std::string& o, const GridRow& r) { csv_number(o, r.lap_time_s); }},
};

}  // namespace

std::string trace_csv(const Lap& lap, const Mesh& mesh) {
  CsvWriter<TraceRow> w(trace_columns, mesh.size());
  for (std::size_t i = 0; i < mesh.size(); ++i) w.add({lap, mesh, i});
  return w.take();
}

std::string corners_csv(const std::vector<LapSummary>& results) {
  CsvWriter<CornerRow> w(corner_columns);
  for (const auto& s : results)
    for (const auto& c : s.corners) w.add({s, c});
  return w.take();
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

std::string id_list(const std::vector<int>& ids) {
  std::string o;
  for (int id : ids) o += (o.empty() ? "" : ", ") + std::to_string(id);
  return o.empty() ? "-" : o;
}

std::vector<std::string> balance_cells(const BalanceSummary& b) {
  return {fixed(100 * b.static_front_share, 1),
          fixed(100 * b.aero_balance_150, 1) + " / " + percent_or_dash(b.aero_balance_eff_150),
          fixed(100 * b.aero_balance_250, 1) + " / " + percent_or_dash(b.aero_balance_eff_250),
          b.has_fast_acceleration ? fixed(100 * b.lowest_front_share_fast, 1) + " at " +
                                        fixed(b.lowest_front_share_at_m, 0) + " m"
                                  : std::string("-"),
          id_list(b.front_limited_corners),
          fixed(b.front_limited_length_m, 0)};
}

std::string balance_text(const BalanceSummary& b) {
  std::string o = "balance: static front weight " + fixed(100 * b.static_front_share, 1) + " %; ";
  if (b.aero_balance_eff_150 && b.aero_balance_eff_250)
    o += "aero balance " + fixed(100 * b.aero_balance_150, 1) + " % (" +
         fixed(100 * *b.aero_balance_eff_150, 1) + " % with the drag moment) at 150 km/h, " +
         fixed(100 * b.aero_balance_250, 1) + " % (" + fixed(100 * *b.aero_balance_eff_250, 1) +
         " %) at 250 km/h\n";
  else
    o += "no downforce at 150 and 250 km/h: no aero balance (the drag moment only unloads the "
         "front axle)\n";
  if (b.has_fast_acceleration)
    o += "         lowest front share accelerating above 200 km/h: " +
         fixed(100 * b.lowest_front_share_fast, 1) + " % at " +
         fixed(b.lowest_front_share_at_m, 0) + " m\n";
  else
    o += "         the car does not accelerate above 200 km/h on this lap\n";
  std::string ids;
  for (int id : b.front_limited_corners) ids += (ids.empty() ? "" : ", ") + std::to_string(id);
  o +=
      "         front limits at the apex of corners: " + (ids.empty() ? std::string("none") : ids) +
      "; front ahead of the rear by more than " + fixed(b.threshold, 2) + " of usage over " +
      fixed(b.front_limited_length_m, 0) + " m of the lap\n";
  return o;
}

namespace {
std::string signed_fixed(double v, int decimals) {
  const std::string t = fixed(v, decimals);
  return (v >= 0 && t.find_first_not_of("0.") != std::string::npos ? "+" : "") + t;
}
}  // namespace

std::string axle_cell(const CornerResult& c) {
  return c.entry_axle + "/" + c.apex_axle + "/" + c.exit_axle;
}

std::string balance_index_cell(const CornerResult& c) {
  return signed_fixed(c.entry_balance_index, 3) + "/" + signed_fixed(c.apex_balance_index, 3) +
         "/" + signed_fixed(c.exit_balance_index, 3);
}

std::string axle_legend() {
  return "axle: the one using more of its grip (front - rear usage beside it); both within +-" +
         fixed(axle_neutral_band, 2);
}

std::string lap_table(const LapSummary& s) {
  std::string o;
  o += "lap time " + fixed(s.lap_time_s, 3) + " s   top speed " +
       fixed(units::to_kph(s.top_speed_mps), 1) + " km/h   min speed " +
       fixed(units::to_kph(s.min_speed_mps), 1) + " km/h   corners " +
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
                      fixed(c.apex_m, 1), fixed(c.end_m, 1), fixed(units::to_kph(c.entry_mps), 1),
                      fixed(units::to_kph(c.apex_mps), 1), fixed(units::to_kph(c.exit_mps), 1),
                      fixed(c.time_s, 3), c.limit, axle_cell(c), balance_index_cell(c)});
    o += "\n" + text_table({"corner", "turn", "start m", "apex m", "end m", "entry km/h",
                            "apex km/h", "exit km/h", "time s", "limit", "axle entry/apex/exit",
                            "front-rear usage entry/apex/exit"},
                           rows);
    o += axle_legend() + "\n";
  }
  o += "\n" + balance_text(s.balance);
  return o;
}

std::string compare_json(const Car& car, const Comparison& c,
                         const std::vector<Circuit>& circuits) {
  JsonWriter w;
  w.begin_object().field("lapwing", version()).field("car", car.name);
  w.key("tracks").begin_array();
  for (std::size_t t = 0; t < c.tracks.size(); ++t) {
    const auto& pt = c.tracks[t];
    w.begin_object()
        .field("track", circuits[t].track.name)
        .field("best", pt.entries[pt.best].run.summary.config)
        .field("margin_s", pt.margin_s);
    w.key("configs").begin_array();
    for (const auto& e : pt.entries) {
      const LapSummary& s = e.run.summary;
      w.begin_object()
          .field("config", s.config)
          .field("lap_time_s", s.lap_time_s)
          .field("delta_s", e.delta_to_best_s)
          .field("top_speed_kph", units::to_kph(s.top_speed_mps))
          .field("min_speed_kph", units::to_kph(s.min_speed_mps))
          .field("full_throttle_fraction", s.full_throttle_fraction);
      write_balance(w, s.balance);
      w.key("where_the_time_goes")
          .begin_object()
          .field("corners_s", e.split.corners_s)
          .field("braking_s", e.split.braking_s)
          .field("straights_s", e.split.straights_s)
          .end_object();
      w.key("pieces").begin_array();
      for (const auto& p : e.pieces)
        w.begin_object()
            .field("kind", p.kind)
            .field("id", p.id)
            .field("start_m", p.start_m)
            .field("end_m", p.end_m)
            .field("delta_s", p.delta_s)
            .end_object();
      w.end_array().end_object();
    }
    w.end_array().end_object();
  }
  w.end_array().end_object();
  return w.str();
}

std::string compare_table(const Car& car, const Comparison& c,
                          const std::vector<Circuit>& circuits) {
  std::string o = "car     " + car.name + " (" + car.file + ")\n";
  // The matrix first: lap time per track x config, the best marked.
  {
    std::vector<std::string> header{"config"};
    for (const auto& ci : circuits) header.push_back(ci.track.id);
    std::vector<std::vector<std::string>> rows;
    for (std::size_t k = 0; k < c.configs.size(); ++k) {
      std::vector<std::string> row{car.configs[c.configs[k]].name};
      for (const auto& pt : c.tracks)
        row.push_back(fixed(pt.entries[k].run.summary.lap_time_s, 3) +
                      (pt.best == k ? " *" : "  "));
      rows.push_back(row);
    }
    o += "\nlap time s (* best on the track)\n" + text_table(header, rows);
  }
  for (std::size_t t = 0; t < c.tracks.size(); ++t) {
    const auto& pt = c.tracks[t];
    const LapSummary& best = pt.entries[pt.best].run.summary;
    o += "\ntrack   " + circuits[t].track.name + " (" + circuits[t].track.file + "), air " +
         fixed(circuits[t].air.density_kg_m3, 4) + " kg/m3\n";
    o += "best    " + best.config +
         (pt.entries.size() > 1 ? " by " + fixed(pt.margin_s, 3) + " s" : std::string()) + "\n";
    std::vector<std::vector<std::string>> rows;
    for (const auto& e : pt.entries) {
      const LapSummary& s = e.run.summary;
      rows.push_back({s.config, fixed(s.lap_time_s, 3), signed_fixed(e.delta_to_best_s, 3),
                      fixed(units::to_kph(s.top_speed_mps), 1),
                      fixed(units::to_kph(s.min_speed_mps), 1),
                      fixed(100 * s.full_throttle_fraction, 1), signed_fixed(e.split.corners_s, 3),
                      signed_fixed(e.split.braking_s, 3), signed_fixed(e.split.straights_s, 3)});
    }
    o += text_table({"config", "lap s", "delta s", "top km/h", "min km/h", "full throttle %",
                     "delta in corners s", "delta under braking s", "delta on straights s"},
                    rows);
    // Balance per config, side by side.
    {
      std::vector<std::vector<std::string>> brows;
      for (const auto& e : pt.entries) {
        std::vector<std::string> row{e.run.summary.config};
        const auto cells = balance_cells(e.run.summary.balance);
        row.insert(row.end(), cells.begin() + 1, cells.end());  // the static share is the car's
        brows.push_back(row);
      }
      o += "\nbalance (aero balance % alone / with the drag moment; front share of the load)\n" +
           text_table({"config", "aero 150 km/h", "aero 250 km/h", "lowest front % > 200 km/h",
                       "front-limited corners", "front-limited m"},
                      brows);
    }
    // Per piece: which corners gain, which straights lose, against the best.
    if (pt.entries.size() > 1) {
      std::vector<std::string> header{"piece", "from m", "to m"};
      for (const auto& e : pt.entries)
        if (&e != &pt.entries[pt.best]) header.push_back(e.run.summary.config + " s");
      std::vector<std::vector<std::string>> prow;
      const auto& pieces = pt.entries.front().pieces;
      for (std::size_t p = 0; p < pieces.size(); ++p) {
        const LapPiece& lp = pieces[p];
        std::vector<std::string> row{
            lp.kind == "corner"
                ? "corner " + std::to_string(lp.id)
                : (lp.id ? "straight to " + std::to_string(lp.id) : "straight to line"),
            fixed(lp.start_m, 0), fixed(lp.end_m, 0)};
        for (const auto& e : pt.entries)
          if (&e != &pt.entries[pt.best]) row.push_back(signed_fixed(e.pieces[p].delta_s, 3));
        prow.push_back(row);
      }
      o += "\ntime lost (+) or gained (-) against " + best.config + ", piece by piece\n" +
           text_table(header, prow);
    }
  }
  return o;
}

std::string delta_csv(const Mesh& mesh, const std::vector<double>& delta_s) {
  CsvWriter<DeltaRow> w(delta_columns, mesh.size());
  for (std::size_t i = 0; i < mesh.size(); ++i) w.add({mesh.s_m[i], delta_s[i]});
  return w.take();
}

std::string attribution_note(const Attribution& a) {
  return a.first_order_reliable ? std::string() : "first-order split not reliable for this step";
}

std::string trade_json(const Car& car, const Trade& t, const std::vector<Circuit>& circuits) {
  JsonWriter w;
  w.begin_object().field("lapwing", version()).field("car", car.name).field("step", t.options.step);
  w.key("results").begin_array();
  for (const auto& s : t.sensitivities)
    w.begin_object()
        .field("track", circuits[s.track].track.name)
        .field("config", car.configs[s.config].name)
        .field("lap_time_s", s.lap_time_s)
        .field("cla_m2", s.cla_m2)
        .field("cda_m2", s.cda_m2)
        .field("mass_kg", s.mass_kg)
        .field("dt_dcla_s_per_m2", s.dt_dcla_s_per_m2)
        .field("dt_dcda_s_per_m2", s.dt_dcda_s_per_m2)
        .field("dt_dmass_s_per_kg", s.dt_dmass_s_per_kg)
        .field("dt_dpower_s_per_percent", s.dt_dpower_s_per_percent)
        .field("breakeven_dcda_per_dcla", s.breakeven_dcda_per_dcla)
        .end_object();
  w.end_array();
  w.key("attributions").begin_array();
  for (const auto& a : t.attributions)
    w.begin_object()
        .field("track", circuits[a.track].track.name)
        .field("from", car.configs[a.a].name)
        .field("to", car.configs[a.b].name)
        .field("sensitivities_of", car.configs[a.reference].name)
        .field("total_s", a.total_s)
        .field("from_cla_s", a.from_cla_s)
        .field("from_cda_s", a.from_cda_s)
        .field("residual_s", a.residual_s)
        .field("delta_cla_m2", a.delta_cla_m2)
        .field("delta_cda_m2", a.delta_cda_m2)
        .field("first_order_reliable", a.first_order_reliable)
        .field("note", attribution_note(a))
        .end_object();
  w.end_array().end_object();
  return w.str();
}

std::string trade_table(const Car& car, const Trade& t, const std::vector<Circuit>& circuits) {
  std::string o = "car     " + car.name + " (" + car.file + "), central differences of +-" +
                  fixed(100 * t.options.step, 1) + " %\n";
  std::vector<std::vector<std::string>> rows;
  for (const auto& s : t.sensitivities)
    rows.push_back(
        {circuits[s.track].track.id, car.configs[s.config].name, fixed(s.lap_time_s, 3),
         signed_fixed(0.1 * s.dt_dcla_s_per_m2, 4), signed_fixed(0.1 * s.dt_dcda_s_per_m2, 4),
         signed_fixed(10 * s.dt_dmass_s_per_kg, 4), signed_fixed(s.dt_dpower_s_per_percent, 4),
         fixed(s.breakeven_dcda_per_dcla, 3)});
  o += "\n" + text_table({"track", "config", "lap s", "s per +0.1 m2 ClA", "s per +0.1 m2 CdA",
                          "s per +10 kg", "s per +1 % power", "CdA m2 one m2 of ClA may cost"},
                         rows);
  o += "\nexchange rate: +1 m2 of ClA pays while it costs less than the last column in CdA\n";
  if (!t.attributions.empty()) {
    std::vector<std::vector<std::string>> arows;
    auto traded = [&](std::size_t c) {
      for (const auto& s : t.sensitivities)
        if (s.config == c) return true;
      return false;
    };
    for (const auto& a : t.attributions) {
      // The terminal shows the changes to or from a traded config; trade.json has them all.
      if (!traded(a.a) && !traded(a.b)) continue;
      // Shares of a total under attribution_share_min_total_s would be ratios of noise.
      const bool shares = std::abs(a.total_s) >= attribution_share_min_total_s;
      auto part = [&](double x) {
        return signed_fixed(x, 3) +
               (shares ? " (" + fixed(100 * x / a.total_s, 0) + " %)" : std::string());
      };
      arows.push_back(
          {circuits[a.track].track.id, car.configs[a.a].name + " -> " + car.configs[a.b].name,
           signed_fixed(a.total_s, 3), part(a.from_cla_s), part(a.from_cda_s),
           signed_fixed(a.residual_s, 3), car.configs[a.reference].name, attribution_note(a)});
    }
    o += "\nwhere a config change's lap time comes from (first order at the configs' operating "
         "points, with the residual; shares of totals of " +
         fixed(attribution_share_min_total_s, 2) + " s and more)\n" +
         text_table({"track", "change", "total s", "from ClA s", "from CdA s", "residual s",
                     "sensitivities of", "note"},
                    arows);
  }
  return o;
}

std::string trade_grid_csv(const TradeGrid& g) {
  CsvWriter<GridRow> w(grid_columns, g.lap_time_s.size());
  for (std::size_t i = 0; i < g.cla_m2.size(); ++i)
    for (std::size_t j = 0; j < g.cda_m2.size(); ++j)
      w.add({g.cla_m2[i], g.cda_m2[j], g.lap_time_s[i * g.cda_m2.size() + j]});
  return w.take();
}

}  // namespace lapwing
