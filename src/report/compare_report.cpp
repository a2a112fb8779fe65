#include "lapwing/report/compare_report.hpp"

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/lap_files.hpp"
#include "lapwing/report/text_table.hpp"
#include "lapwing/report/verdict.hpp"

namespace lapwing {

namespace {

// delta-TRACK-A-B.csv: one row per mesh point.
struct DeltaRow {
  double s_m, delta_s;
};
constexpr CsvColumn<DeltaRow> delta_columns[] = {
    {"distance_m", [](std::string& o, const DeltaRow& r) { csv_number(o, r.s_m); }},
    {"delta_s", [](std::string& o, const DeltaRow& r) { csv_number(o, r.delta_s); }},
};

}  // namespace

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
            .field("kind", label(p.kind))
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
  std::vector<std::string> names;
  for (std::size_t k : c.configs) names.push_back(car.configs[k].name);
  // The answer first: a sentence per track, and the balance window's verdict.
  o += std::string("\nverdict (") + verdict_sign_note + ")\n";
  for (std::size_t t = 0; t < c.tracks.size(); ++t) {
    o += circuits[t].track.name + ": " + verdict_sentence(c.tracks[t], names) + ".\n";
    const std::string b = balance_verdict(c.tracks[t], names);
    if (!b.empty()) o += "  " + b + ".\n";
  }
  // Then the matrix: lap time per track x config, the best marked.
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
    // The track's own doubts (a closure gap, a dropout): every config's lap carries them.
    for (const std::string& w : track_warnings(circuits[t].track)) o += "warning: " + w + "\n";
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
           text_table({"config", "aero 150 km/h", "aero 250 km/h",
                       "lowest front % accelerating > 200 km/h", "front-limited corners",
                       "front-limited m"},
                      brows);
    }
    // The balance window per config.
    if (best.balance.window) {
      std::vector<std::vector<std::string>> wrows;
      for (const auto& e : pt.entries) {
        std::vector<std::string> row{e.run.summary.config};
        const auto cells = window_cells(*e.run.summary.balance.window);
        row.insert(row.end(), cells.begin(), cells.end());
        wrows.push_back(row);
      }
      std::vector<std::string> header{"config"};
      for (const auto& h : window_header()) header.push_back(h);
      o += "\nbalance window " + window_text(best.balance.window->window) +
           " (braking / drive: mean front share above its speed)\n" + text_table(header, wrows);
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
            lp.kind == PieceKind::corner
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

void delta_csv(const Mesh& mesh, const std::vector<double>& delta_s, const OutputSink& sink) {
  CsvWriter<DeltaRow> w(delta_columns);
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    w.add({mesh.s_m[i], delta_s[i]});
    w.flush(sink);
  }
  w.flush(sink, 0);
}

}  // namespace lapwing
