#include "lapwing/report/lap_files.hpp"

#include <array>
#include <iterator>
#include <utility>

#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/track_quality_text.hpp"

namespace lapwing {

void optional_field(JsonWriter& w, std::string_view key, const std::optional<double>& v) {
  w.key(key);
  if (v)
    w.value(*v);
  else
    w.null();
}

void write_balance(JsonWriter& w, const BalanceSummary& b) {
  w.key("balance").begin_object().field("static_front_share", b.static_front_share);
  optional_field(w, "aero_balance_150_kph", b.aero_balance_150);
  optional_field(w, "aero_balance_with_drag_150_kph", b.aero_balance_eff_150);
  optional_field(w, "aero_balance_250_kph", b.aero_balance_250);
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
      .field("front_limited_length_m", b.front_limited_length_m);
  w.key("window");
  if (b.window)
    write_balance_window(w, *b.window);
  else
    w.null();
  w.end_object();
}

void write_balance_window(JsonWriter& w, const BalanceWindowResult& r) {
  const bool tested = r.time_s > 0.0;
  w.begin_object()
      .field("front_share_min", r.window.front_share_min)
      .field("front_share_max", r.window.front_share_max)
      .field("above_kph", units::to_kph(r.window.above_mps))
      .field("lateral_above_g", balance_window_lateral_g)
      .field("result", window_result_name(r))
      .field("time_s", r.time_s);
  // Fields about the window's points are null when the lap never meets its conditions.
  auto tested_field = [&](const char* key, double v) {
    w.key(key);
    if (tested)
      w.value(v);
    else
      w.null();
  };
  tested_field("outside_fraction", r.outside_fraction);
  tested_field("lowest_front_share", r.lowest_share);
  tested_field("highest_front_share", r.highest_share);
  tested_field("worst_excursion", r.worst_excursion);
  tested_field("margin", r.margin);
  tested_field("worst_at_m", r.worst_at_m);
  tested_field("worst_speed_kph", units::to_kph(r.worst_speed_mps));
  w.key("worst_phase");
  if (tested)
    w.value(std::string(phase_name(r.worst_phase)));
  else
    w.null();
  w.key("worst_corner");
  if (tested && r.worst_corner)
    w.value(r.worst_corner);
  else
    w.null();
  w.key("worst_before_corner");
  if (tested && !r.worst_corner && r.next_corner)
    w.value(r.next_corner);
  else
    w.null();
  optional_field(w, "braking_front_share", r.braking_share);
  optional_field(w, "accelerating_front_share", r.accelerating_share);
  w.key("share_movement");
  if (r.braking_share && r.accelerating_share)
    w.value(*r.braking_share - *r.accelerating_share);
  else
    w.null();
  w.end_object();
}

std::string summary_json(const std::string& car_name, const std::vector<LapSummary>& results,
                         const std::vector<TrackQuality>& qualities) {
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
          .field("limit", label(c.limit))
          .field("entry_axle", label(c.entry_axle))
          .field("apex_axle", label(c.apex_axle))
          .field("exit_axle", label(c.exit_axle))
          .field("entry_balance_index", c.entry_balance_index)
          .field("apex_balance_index", c.apex_balance_index)
          .field("exit_balance_index", c.exit_balance_index)
          .end_object();
    }
    w.end_array();
    write_balance(w, s.balance);
    for (const auto& q : qualities)
      if (q.track_id == s.track_id && q.config == s.config) write_track_quality(w, q);
    w.end_object();
  }
  w.end_array().end_object();
  return w.str();
}

namespace {

// trace-TRACK-CONFIG.csv: one row per mesh point, its columns the trace's channels (below).
struct TraceRow {
  const Lap& lap;
  const Mesh& mesh;
  std::size_t i;
};
using TraceColumn = CsvColumn<TraceRow>;

double number_at(const TraceChannel& c, const TraceRow& r) {
  return c.number(r.lap, r.mesh, r.i);
}

// The channels, in the file's order: one list for the CSV's header and rows and for
// trace_channels()' users (the Python module's arrays).
constexpr TraceChannel trace_channel_list[] = {
    {"distance_m", TraceChannel::Kind::number,
     [](const Lap&, const Mesh& m, std::size_t i) { return m.s_m[i]; }},
    {"time_s", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.time_s[i]; }},
    {"x_m", TraceChannel::Kind::number,
     [](const Lap&, const Mesh& m, std::size_t i) { return m.x_m[i]; }},
    {"y_m", TraceChannel::Kind::number,
     [](const Lap&, const Mesh& m, std::size_t i) { return m.y_m[i]; }},
    {"curvature_1pm", TraceChannel::Kind::number,
     [](const Lap&, const Mesh& m, std::size_t i) { return m.curvature_1pm[i]; }},
    {"speed_kph", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return units::to_kph(l.speed_mps[i]); }},
    {"long_accel_g", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.long_accel_mps2[i] / units::g0; }},
    {"lat_accel_g", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.lat_accel_mps2[i] / units::g0; }},
    {"gear", TraceChannel::Kind::integer,
     [](const Lap& l, const Mesh&, std::size_t i) { return static_cast<double>(l.gear[i]); }},
    {"rpm", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.engine_radps[i] / units::rpm; }},
    {"phase", TraceChannel::Kind::phase,
     [](const Lap& l, const Mesh&, std::size_t i) { return static_cast<double>(l.phase[i]); }},
    {"drag_N", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.drag_n[i]; }},
    {"downforce_N", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.downforce_n[i]; }},
    {"front_load_N", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.front_load_n[i]; }},
    {"rear_load_N", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.rear_load_n[i]; }},
    {"front_share", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return front_share(l, i); }},
    // Undefined (empty in the file) where the car has no downforce: a share of no load.
    {"aero_balance_eff", TraceChannel::Kind::number_or_empty,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.aero_balance_eff[i]; }},
    {"front_usage", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.front_usage[i]; }},
    {"rear_usage", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.rear_usage[i]; }},
    {"balance_index", TraceChannel::Kind::number,
     [](const Lap& l, const Mesh&, std::size_t i) { return l.front_usage[i] - l.rear_usage[i]; }},
};

// A channel's field in the CSV: full precision; the gear a whole number; the phase its word.
template <std::size_t I>
void write_channel(std::string& o, const TraceRow& r) {
  const TraceChannel& c = trace_channel_list[I];
  const double v = number_at(c, r);
  switch (c.kind) {
    case TraceChannel::Kind::number:
      csv_number(o, v);
      break;
    case TraceChannel::Kind::number_or_empty:
      csv_number_or_empty(o, v);
      break;
    case TraceChannel::Kind::integer:
      o += std::to_string(static_cast<long long>(v));
      break;
    case TraceChannel::Kind::phase:
      o += phase_name(r.lap.phase[r.i]);
      break;
  }
}
template <std::size_t... I>
constexpr std::array<TraceColumn, sizeof...(I)> make_trace_columns(std::index_sequence<I...>) {
  return {{{trace_channel_list[I].name, &write_channel<I>}...}};
}
constexpr auto trace_columns =
    make_trace_columns(std::make_index_sequence<std::size(trace_channel_list)>{});

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
    {"limit", [](std::string& o, const CornerRow& r) { csv_text(o, label(r.c.limit)); }},
    {"entry_axle", [](std::string& o, const CornerRow& r) { csv_text(o, label(r.c.entry_axle)); }},
    {"apex_axle", [](std::string& o, const CornerRow& r) { csv_text(o, label(r.c.apex_axle)); }},
    {"exit_axle", [](std::string& o, const CornerRow& r) { csv_text(o, label(r.c.exit_axle)); }},
    {"entry_balance_index",
     [](std::string& o, const CornerRow& r) { csv_number(o, r.c.entry_balance_index); }},
    {"apex_balance_index",
     [](std::string& o, const CornerRow& r) { csv_number(o, r.c.apex_balance_index); }},
    {"exit_balance_index",
     [](std::string& o, const CornerRow& r) { csv_number(o, r.c.exit_balance_index); }},
};

}  // namespace

std::span<const TraceChannel> trace_channels() {
  return trace_channel_list;
}

void trace_csv(const Lap& lap, const Mesh& mesh, const OutputSink& sink) {
  require_positions(mesh, "a trace");
  CsvWriter<TraceRow> w(trace_columns);
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    w.add({lap, mesh, i});
    w.flush(sink);
  }
  w.flush(sink, 0);
}

std::string corners_csv(const std::vector<LapSummary>& results) {
  CsvWriter<CornerRow> w(corner_columns);
  for (const auto& s : results)
    for (const auto& c : s.corners) w.add({s, c});
  return w.take();
}

}  // namespace lapwing
