#include "lapwing/report/html_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/svg.hpp"

namespace lapwing {

namespace {

using svg::escape;
using svg::Plot;
using svg::Series;

constexpr std::size_t trace_points = 1500;  // points per series drawn (decimated evenly)
constexpr std::size_t gg_points = 700;

std::size_t stride(std::size_t n, std::size_t want) {
  return std::max<std::size_t>(1, n / want);
}

// Decimated (x, y) of a channel along the lap, keeping the last point.
Series along(const Mesh& mesh, const std::vector<double>& y, double scale, std::string name,
             std::size_t colour) {
  Series s{std::move(name), {}, {}, colour, false, 1.6};
  const std::size_t k = stride(mesh.size(), trace_points);
  for (std::size_t i = 0; i < mesh.size(); i += k) {
    s.x.push_back(mesh.s_m[i]);
    s.y.push_back(y[i] * scale);
  }
  if ((mesh.size() - 1) % k) {
    s.x.push_back(mesh.s_m.back());
    s.y.push_back(y.back() * scale);
  }
  return s;
}

std::string table(const std::vector<std::string>& header,
                  const std::vector<std::vector<std::string>>& rows, const std::string& cls = "") {
  std::string o =
      "<table" + (cls.empty() ? std::string() : " class=\"" + cls + "\"") + "><thead><tr>";
  for (const auto& h : header) o += "<th>" + escape(h) + "</th>";
  o += "</tr></thead><tbody>\n";
  for (const auto& r : rows) {
    o += "<tr>";
    for (std::size_t c = 0; c < r.size(); ++c)
      o += (c ? "<td class=\"n\">" : "<td>") + escape(r[c]) + "</td>";
    o += "</tr>\n";
  }
  return o + "</tbody></table>\n";
}

std::string figure(const std::string& svg_text, const std::string& caption) {
  return "<figure>" + svg_text + "<figcaption>" + escape(caption) + "</figcaption></figure>\n";
}

const char* css = R"(
:root { --ink: #1d2430; --muted: #5b6577; --rule: #d9dee7; --paper: #ffffff; --band: #f4f6f9; }
* { box-sizing: border-box; }
body { margin: 0; background: var(--paper); color: var(--ink);
       font: 14px/1.45 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; }
header { padding: 20px 32px 12px; border-bottom: 3px solid #0072B2; }
header h1 { margin: 0 0 4px; font-size: 22px; letter-spacing: 0.01em; }
header p { margin: 2px 0; color: var(--muted); }
.caution { margin: 12px 32px; padding: 8px 12px; border-left: 4px solid #D55E00; background: #fbf1ea; }
main { padding: 0 32px 32px; }
section { margin-top: 24px; }
h2 { font-size: 18px; margin: 28px 0 8px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); }
h3 { font-size: 15px; margin: 18px 0 6px; color: var(--muted); }
table { border-collapse: collapse; margin: 6px 0 14px; font-variant-numeric: tabular-nums;
        display: block; max-width: 100%; overflow-x: auto; }
th, td { padding: 3px 10px; border-bottom: 1px solid var(--rule); text-align: left; white-space: nowrap; }
th { background: var(--band); font-weight: 600; }
td.n { text-align: right; }
figure { margin: 8px 0 18px; }
figcaption { color: var(--muted); font-size: 12px; margin-top: 2px; }
p.note { color: var(--muted); font-size: 12px; margin: -8px 0 14px; }
svg.plot { display: block; max-width: 100%; height: auto; background: var(--paper); }
svg .grid line { stroke: #e6e9ef; stroke-width: 1; }
svg .frame { fill: none; stroke: #9aa3b2; stroke-width: 1; }
svg .tick, svg .legend, svg .label, svg .marker-text { font-size: 11px; fill: var(--ink); }
svg .axis-title { font-size: 12px; fill: var(--muted); }
svg .plot-title { font-size: 13px; font-weight: 600; fill: var(--ink); }
svg .marker { stroke: #b9c0cc; stroke-width: 0.8; stroke-dasharray: 3 3; }
svg .contour { fill: none; stroke: #1d2430; stroke-width: 0.7; stroke-opacity: 0.55; }
svg .breakeven { stroke: #D55E00; stroke-width: 1.6; stroke-dasharray: 6 4; }
@media print {
  body { font-size: 11px; }
  header, main { padding-left: 0; padding-right: 0; }
  .caution { margin-left: 0; margin-right: 0; }
  figure, table { break-inside: avoid; }
  h2 { break-before: auto; break-after: avoid; }
}
)";

std::string speed_plot(const Circuit& c, const Comparison::PerTrack& pt, const Car& car,
                       const std::vector<std::size_t>& configs) {
  Plot p("speed-" + c.track.id, "Speed along the lap: " + c.track.name, "distance (m)",
         "speed (km/h)");
  for (std::size_t k = 0; k < pt.entries.size(); ++k)
    p.add(along(c.mesh, pt.entries[k].run.lap.speed_mps, 1.0 / units::kph,
                car.configs[configs[k]].name, k));
  for (const auto& corner : pt.entries[pt.best].run.summary.corners)
    p.marker(corner.apex_m, std::to_string(corner.id));
  return figure(p.render(), std::string(pt.entries.size() > 1 ? "Every config overlaid; n" : "N") +
                                "umbered lines mark the corners' apexes.");
}

std::string delta_plot(const Circuit& c, const Comparison::PerTrack& pt, const Car& car,
                       const std::vector<std::size_t>& configs) {
  const Lap& best = pt.entries[pt.best].run.lap;
  Plot p("delta-" + c.track.id,
         "Time delta to " + car.configs[configs[pt.best]].name + ": " + c.track.name,
         "distance (m)", "cumulative delta (s)");
  for (std::size_t k = 0; k < pt.entries.size(); ++k) {
    if (k == pt.best) continue;
    p.add(along(c.mesh, delta_trace(best, pt.entries[k].run.lap), 1.0, car.configs[configs[k]].name,
                k));
  }
  for (const auto& corner : pt.entries[pt.best].run.summary.corners)
    p.marker(corner.apex_m, std::to_string(corner.id));
  return figure(p.render(),
                "Rising: the config loses time there against the best; falling: it gains.");
}

std::string map_plot(const Circuit& c, const Comparison::PerTrack& pt, const Car& car,
                     const std::vector<std::size_t>& configs) {
  const Lap& lap = pt.entries[pt.best].run.lap;
  Plot p("map-" + c.track.id,
         "Track map coloured by speed (" + car.configs[configs[pt.best]].name + ")", "x (m)",
         "y (m)", 860, 520);
  p.equal_aspect();
  Series outline{"", {}, {}, 6, false, 0.8};
  const std::size_t k = stride(c.mesh.size(), trace_points);
  for (std::size_t i = 0; i < c.mesh.size(); i += k) {
    outline.x.push_back(c.mesh.x_m[i]);
    outline.y.push_back(c.mesh.y_m[i]);
  }
  outline.x.push_back(c.mesh.x_m.back());
  outline.y.push_back(c.mesh.y_m.back());
  p.add(outline);
  const double vmin = *std::min_element(lap.speed_mps.begin(), lap.speed_mps.end());
  const double vmax = *std::max_element(lap.speed_mps.begin(), lap.speed_mps.end());
  const svg::Scale sx = p.x_scale(), sy = p.y_scale();
  std::string cells;
  char buf[160];
  for (std::size_t i = 0; i + k < c.mesh.size(); i += k) {
    const double t = vmax > vmin ? (lap.speed_mps[i] - vmin) / (vmax - vmin) : 0.5;
    std::snprintf(buf, sizeof buf,
                  "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"%s\" "
                  "stroke-width=\"6\" stroke-linecap=\"round\"/>",
                  sx(c.mesh.x_m[i]), sy(c.mesh.y_m[i]), sx(c.mesh.x_m[i + k]),
                  sy(c.mesh.y_m[i + k]), svg::ramp_colour(t).c_str());
    cells += buf;
  }
  cells += "\n";
  p.underlay(cells);
  cells.clear();
  // Colour key in the plot's right margin.
  for (int s = 0; s <= 10; ++s) {
    std::snprintf(buf, sizeof buf,
                  "<rect x=\"%.1f\" y=\"%.1f\" width=\"14\" height=\"12\" fill=\"%s\"/>",
                  sx.p1 + 12.0, sy.p1 + 40.0 + 12.0 * (10 - s), svg::ramp_colour(s / 10.0).c_str());
    cells += buf;
  }
  std::snprintf(buf, sizeof buf,
                "<text class=\"legend\" x=\"%.1f\" y=\"%.1f\">%.0f km/h</text><text "
                "class=\"legend\" x=\"%.1f\" y=\"%.1f\">%.0f km/h</text>\n",
                sx.p1 + 30.0, sy.p1 + 50.0, units::to_kph(vmax), sx.p1 + 30.0, sy.p1 + 170.0,
                units::to_kph(vmin));
  p.overlay(cells);
  for (const auto& corner : pt.entries[pt.best].run.summary.corners) {
    const std::size_t i = std::min(
        c.mesh.size() - 1, static_cast<std::size_t>(std::lround(corner.apex_m / c.mesh.step_m)));
    // Label off the line, towards the inside of the turn.
    const double nx = -std::sin(c.mesh.heading_rad[i]) * corner.direction;
    const double ny = std::cos(c.mesh.heading_rad[i]) * corner.direction;
    const double off = 0.035 * (p.x_scale().d1 - p.x_scale().d0);
    p.label(c.mesh.x_m[i] + nx * off, c.mesh.y_m[i] + ny * off, std::to_string(corner.id));
  }
  return figure(p.render(),
                "Dark: slow, light: fast. Numbers are corners; the lap starts at (0, 0).");
}

std::string front_share_plot(const Circuit& c, const Comparison::PerTrack& pt, const Car& car,
                             const std::vector<std::size_t>& configs) {
  Plot p("front-share-" + c.track.id, "Front axle share of the load: " + c.track.name,
         "distance (m)", "front share (%)");
  for (std::size_t k = 0; k < pt.entries.size(); ++k)
    p.add(along(c.mesh, pt.entries[k].run.lap.front_share, 100.0, car.configs[configs[k]].name, k));
  for (const auto& corner : pt.entries[pt.best].run.summary.corners)
    p.marker(corner.apex_m, std::to_string(corner.id));
  return figure(
      p.render(),
      "Weight, downforce by the aero balance, the drag moment and load transfer; it falls "
      "where drag and acceleration take load off the front at speed.");
}

std::string gg_plot(const Circuit& c, const Comparison::PerTrack& pt, const Car& car,
                    const std::vector<std::size_t>& configs) {
  Plot p("gg-" + c.track.id, "g-g diagram: " + c.track.name, "lateral acceleration (g)",
         "longitudinal acceleration (g)", 520, 440);
  p.equal_aspect();
  for (std::size_t k = 0; k < pt.entries.size(); ++k) {
    const Lap& lap = pt.entries[k].run.lap;
    Series s{car.configs[configs[k]].name, {}, {}, k, true, 0.0};
    const std::size_t st = stride(lap.speed_mps.size(), gg_points);
    for (std::size_t i = 0; i < lap.speed_mps.size(); i += st) {
      s.x.push_back(lap.lat_accel_mps2[i] / units::g0);
      s.y.push_back(lap.long_accel_mps2[i] / units::g0);
    }
    p.add(s);
  }
  return figure(p.render(), "One point per stretch of the lap; left turns to the right of zero.");
}

std::string trade_plot(const Circuit& c, const TradeGrid& g, const Trade& t, const Car& car) {
  Plot p("trade-map-" + c.track.id, "Trade map: lap time over ClA x CdA, " + c.track.name,
         "ClA (m2)", "CdA (m2)", 640, 480);
  p.x_range(g.cla_m2.front(), g.cla_m2.back());
  p.y_range(g.cda_m2.front(), g.cda_m2.back());
  const svg::Scale sx = p.x_scale(), sy = p.y_scale();
  const double tmin = *std::min_element(g.lap_time_s.begin(), g.lap_time_s.end());
  const double tmax = *std::max_element(g.lap_time_s.begin(), g.lap_time_s.end());
  std::string cells;
  char buf[200];
  const std::size_t n = g.cla_m2.size(), m = g.cda_m2.size();
  // Heat cells around each grid node (light: faster).
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t j = 0; j < m; ++j) {
      const double x0 = i ? 0.5 * (g.cla_m2[i - 1] + g.cla_m2[i]) : g.cla_m2[i];
      const double x1 = i + 1 < n ? 0.5 * (g.cla_m2[i] + g.cla_m2[i + 1]) : g.cla_m2[i];
      const double y0 = j ? 0.5 * (g.cda_m2[j - 1] + g.cda_m2[j]) : g.cda_m2[j];
      const double y1 = j + 1 < m ? 0.5 * (g.cda_m2[j] + g.cda_m2[j + 1]) : g.cda_m2[j];
      const double tt = tmax > tmin ? (g.lap_time_s[i * m + j] - tmin) / (tmax - tmin) : 0.5;
      std::snprintf(buf, sizeof buf,
                    "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" fill=\"%s\"/>",
                    sx(x0), sy(y1), sx(x1) - sx(x0), sy(y0) - sy(y1),
                    svg::ramp_colour(1.0 - tt).c_str());
      cells += buf;
    }
  cells += "\n";
  // Contour lines at round lap times.
  for (double level : svg::nice_ticks(tmin, tmax, 8)) {
    for (const auto& s : svg::contour_segments(g.cla_m2, g.cda_m2, g.lap_time_s, level)) {
      std::snprintf(buf, sizeof buf,
                    "<line class=\"contour\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>",
                    sx(s[0]), sy(s[1]), sx(s[2]), sy(s[3]));
      cells += buf;
    }
  }
  cells += "\n";
  // The break-even line through the traded config: CdA - CdA0 = b (ClA - ClA0).
  for (const auto& s : t.sensitivities) {
    if (s.track != g.track || s.config != g.config) continue;
    const double b = s.breakeven_dcda_per_dcla;
    const double xa = g.cla_m2.front(), xb = g.cla_m2.back();
    std::snprintf(buf, sizeof buf,
                  "<line class=\"breakeven\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n",
                  sx(xa), sy(s.cda_m2 + b * (xa - s.cla_m2)), sx(xb),
                  sy(s.cda_m2 + b * (xb - s.cla_m2)));
    cells += buf;
  }
  p.underlay(cells);
  // The car's configs where they fall on the map.
  Series marks{"configs", {}, {}, 6, true, 0.0, 4.0};
  for (std::size_t k = 0; k < car.configs.size(); ++k) {
    const AeroConfig& a = car.configs[k];
    const AeroOperatingPoint& op = t.operating[g.track * car.configs.size() + k];
    const double x = op.cla_m2, y = op.cda_m2;
    if (x < g.cla_m2.front() || x > g.cla_m2.back() || y < g.cda_m2.front() || y > g.cda_m2.back())
      continue;
    marks.x.push_back(x);
    marks.y.push_back(y);
    p.label(x, y + 0.035 * (g.cda_m2.back() - g.cda_m2.front()), a.name);
  }
  p.add(marks);
  return figure(p.render(),
                "Light: faster. Thin lines join equal lap times; the dashed line is the break-even "
                "through " +
                    car.configs[g.config].name +
                    ": above it extra downforce costs more drag than it pays.");
}

}  // namespace

Comparison single_lap_comparison(std::size_t config, LapRun run, const Circuit& circuit) {
  Comparison c;
  c.configs = {config};
  Comparison::Entry e;
  e.delta_to_best_s = 0.0;
  e.pieces = piece_deltas(run.lap, run.lap, circuit.mesh, circuit.corners);
  e.run = std::move(run);
  Comparison::PerTrack pt;
  pt.entries.push_back(std::move(e));
  pt.best = 0;
  pt.margin_s = 0.0;
  c.tracks.push_back(std::move(pt));
  return c;
}

std::string html_report(const ReportInput& in) {
  const Car& car = *in.car;
  const auto& circuits = *in.circuits;
  std::string o = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n";
  o += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n";
  o += "<title>" + escape("lapwing report: " + car.name) + "</title>\n<style>" + css +
       "</style>\n</head>\n<body>\n";
  o += "<header><h1>" + escape(car.name) + "</h1><p>lapwing " + escape(version()) + " &#183; " +
       escape(in.command) + "</p></header>\n";
  o +=
      "<p class=\"caution\">Model estimates from a quasi-steady lap simulation. Confirm any change "
      "to a real car by testing, under the series&#8217; rules and the team&#8217;s safety "
      "procedures.</p>\n<main>\n";

  // Inputs.
  {
    std::vector<std::vector<std::string>> rows;
    rows.push_back({"car", car.file, car.name, ""});
    for (const auto& c : circuits)
      rows.push_back(
          {"track", c.track.file, c.track.name,
           fixed(c.mesh.length_m, 1) + " m, air " + fixed(c.air.density_kg_m3, 4) + " kg/m3"});
    o += "<section id=\"inputs\"><h2>Inputs</h2>" + table({"", "file", "name", ""}, rows) +
         "</section>\n";
  }

  if (in.comparison) {
    const Comparison& cmp = *in.comparison;
    // Summary matrix and bars.
    std::vector<std::string> header{"config"};
    for (const auto& c : circuits) header.push_back(c.track.name + " (s)");
    std::vector<std::vector<std::string>> rows;
    std::vector<std::vector<double>> deltas(circuits.size());
    std::vector<std::string> names;
    for (std::size_t k = 0; k < cmp.configs.size(); ++k) {
      names.push_back(car.configs[cmp.configs[k]].name);
      std::vector<std::string> row{names.back()};
      for (std::size_t t = 0; t < cmp.tracks.size(); ++t) {
        const auto& e = cmp.tracks[t].entries[k];
        row.push_back(fixed(e.run.summary.lap_time_s, 3) +
                      (cmp.configs.size() == 1   ? ""
                       : cmp.tracks[t].best == k ? " best"
                                                 : " +" + fixed(e.delta_to_best_s, 3)));
        deltas[t].push_back(e.delta_to_best_s);
      }
      rows.push_back(row);
    }
    o += "<section id=\"summary\"><h2>Lap times</h2>" + table(header, rows, "matrix");
    std::vector<std::string> groups;
    for (const auto& c : circuits) groups.push_back(c.track.name);
    // Bars of the delta to the best need two configs (one lap alone is its own best).
    if (cmp.configs.size() > 1)
      o += figure(svg::bar_chart("lap-bars", "Lap time against the best config on each track",
                                 "delta to the best (s)", groups, names, deltas),
                  "Zero: the best config on that track.");
    o += "</section>\n";

    for (std::size_t t = 0; t < cmp.tracks.size(); ++t) {
      const Circuit& c = circuits[t];
      const auto& pt = cmp.tracks[t];
      o += "<section id=\"track-" + escape(c.track.id) + "\"><h2>" + escape(c.track.name) +
           "</h2>\n";
      o += speed_plot(c, pt, car, cmp.configs);
      if (pt.entries.size() > 1) o += delta_plot(c, pt, car, cmp.configs);
      o += map_plot(c, pt, car, cmp.configs);
      o += front_share_plot(c, pt, car, cmp.configs);
      o += gg_plot(c, pt, car, cmp.configs);
      // Corners: the best config's, with every config's apex speed.
      std::vector<std::string> ch{"corner", "apex m"};
      for (std::size_t k = 0; k < pt.entries.size(); ++k) ch.push_back(names[k] + " apex km/h");
      ch.push_back("limit (" + names[pt.best] + ")");
      ch.push_back("axle entry/apex/exit");
      ch.push_back("front-rear usage entry/apex/exit");
      std::vector<std::vector<std::string>> crows;
      const auto& bc = pt.entries[pt.best].run.summary.corners;
      for (std::size_t i = 0; i < bc.size(); ++i) {
        std::vector<std::string> row{std::to_string(bc[i].id) + (bc[i].direction > 0 ? " L" : " R"),
                                     fixed(bc[i].apex_m, 0)};
        for (const auto& e : pt.entries)
          row.push_back(fixed(units::to_kph(e.run.summary.corners[i].apex_mps), 1));
        row.push_back(label(bc[i].limit));
        row.push_back(axle_cell(bc[i]));
        row.push_back(balance_index_cell(bc[i]));
        crows.push_back(row);
      }
      o += "<h3 id=\"corners-" + escape(c.track.id) + "\">Corners</h3>" + table(ch, crows) +
           "<p class=\"note\">" + escape(axle_legend() + " (" + names[pt.best] + ")") + "</p>\n";
      // Balance per config.
      std::vector<std::vector<std::string>> brows;
      for (std::size_t k = 0; k < pt.entries.size(); ++k) {
        std::vector<std::string> row{names[k]};
        const auto cells = balance_cells(pt.entries[k].run.summary.balance);
        row.insert(row.end(), cells.begin(), cells.end());
        brows.push_back(row);
      }
      o += "<h3 id=\"balance-" + escape(c.track.id) + "\">Balance</h3>" +
           table({"config", "static front %", "aero 150 km/h % (with drag moment)",
                  "aero 250 km/h % (with drag moment)", "lowest front share > 200 km/h",
                  "front-limited corners", "front-limited m"},
                 brows);
      o += "</section>\n";
    }
  }

  if (in.trade) {
    const Trade& t = *in.trade;
    std::vector<std::vector<std::string>> rows;
    for (const auto& s : t.sensitivities)
      rows.push_back({circuits[s.track].track.name, car.configs[s.config].name,
                      fixed(s.lap_time_s, 3), fixed(0.1 * s.dt_dcla_s_per_m2, 4),
                      fixed(0.1 * s.dt_dcda_s_per_m2, 4), fixed(10 * s.dt_dmass_s_per_kg, 4),
                      fixed(s.dt_dpower_s_per_percent, 4), fixed(s.breakeven_dcda_per_dcla, 3)});
    o += "<section id=\"trade\"><h2>Sensitivities</h2>" +
         table({"track", "config", "lap s", "s per +0.1 m2 ClA", "s per +0.1 m2 CdA",
                "s per +10 kg", "s per +1 % power", "CdA m2 one m2 of ClA may cost"},
               rows);
    for (const auto& g : t.grids) o += trade_plot(circuits[g.track], g, t, car);
    o += "</section>\n";
  }
  o += "</main>\n</body>\n</html>\n";
  return o;
}

}  // namespace lapwing
