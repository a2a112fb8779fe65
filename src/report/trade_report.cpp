#include "lapwing/report/trade_report.hpp"

#include <cmath>

#include "lapwing/base/format.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing {

namespace {

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

std::string attribution_note(const Attribution& a) {
  return a.first_order_reliable ? std::string() : "first-order split not reliable for this pair";
}

std::string trade_json(const Car& car, const Trade& t, const std::vector<Circuit>& circuits) {
  JsonWriter w;
  w.begin_object().field("lapwing", version()).field("car", car.name).field("step", t.options.step);
  w.key("results").begin_array();
  for (const auto& s : t.sensitivities) {
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
        .key("breakeven_dcda_per_dcla");
    if (s.breakeven_dcda_per_dcla)
      w.value(*s.breakeven_dcda_per_dcla);
    else
      w.null();
    // The track's warnings, then the config's own lap's, as summary.json gives a lap's (the
    // trade's laps share the track's; its perturbed laps are this lap moved a little).
    w.key("warnings").begin_array();
    for (const std::string& text : track_warnings(circuits[s.track].track)) w.value(text);
    for (const std::string& text : t.own_warnings[s.track * car.configs.size() + s.config])
      w.value(text);
    w.end_array();
    w.end_object();
  }
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

std::string attribution_caption() {
  return "where a config change's lap time comes from (first order at the configs' operating "
         "points, with the residual; shares of totals of " +
         fixed(attribution_share_min_total_s, 2) +
         " s and more; the changes to or from a traded config, every pair in trade.json)";
}

TextTable attribution_table(const Car& car, const Trade& t, const std::vector<Circuit>& circuits) {
  TextTable out;
  out.header = {"track",      "change",     "total s",          "from ClA s",
                "from CdA s", "residual s", "sensitivities of", "note"};
  auto traded = [&](std::size_t c) {
    for (const auto& s : t.sensitivities)
      if (s.config == c) return true;
    return false;
  };
  for (const auto& a : t.attributions) {
    // The changes to or from a traded config; trade.json has them all.
    if (!traded(a.a) && !traded(a.b)) continue;
    // Shares of a total under attribution_share_min_total_s would be ratios of noise.
    const bool shares = std::abs(a.total_s) >= attribution_share_min_total_s;
    auto part = [&](double x) {
      return signed_fixed(x, 3) +
             (shares ? " (" + fixed(100 * x / a.total_s, 0) + " %)" : std::string());
    };
    out.rows.push_back(
        {circuits[a.track].track.id, car.configs[a.a].name + " -> " + car.configs[a.b].name,
         signed_fixed(a.total_s, 3), part(a.from_cla_s), part(a.from_cda_s),
         signed_fixed(a.residual_s, 3), car.configs[a.reference].name, attribution_note(a)});
  }
  return out;
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
         s.breakeven_dcda_per_dcla ? fixed(*s.breakeven_dcda_per_dcla, 3) : "-"});
  o += "\n" + text_table({"track", "config", "lap s", "s per +0.1 m2 ClA", "s per +0.1 m2 CdA",
                          "s per +10 kg", "s per +1 % power", "CdA m2 one m2 of ClA may cost"},
                         rows);
  o += "\nexchange rate: +1 m2 of ClA pays while it costs less than the last column in CdA (-: no "
       "exchange, where downforce does not pay or drag does not cost)\n";
  for (std::size_t k = 0; k < circuits.size(); ++k) {
    const Circuit& c = circuits[k];
    for (const std::string& w : track_warnings(c.track))
      o += "warning: " + c.track.id + ": " + w + "\n";
    // Each config's own lap's (every config's is laped: the attributions read them all).
    for (std::size_t cfg = 0; cfg < car.configs.size(); ++cfg)
      for (const std::string& w : t.own_warnings[k * car.configs.size() + cfg])
        o += "warning: " + c.track.id + ", " + car.configs[cfg].name + ": " + w + "\n";
  }
  const TextTable a = attribution_table(car, t, circuits);
  if (!a.rows.empty()) o += "\n" + attribution_caption() + "\n" + text_table(a.header, a.rows);
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
