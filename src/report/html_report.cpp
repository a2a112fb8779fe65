#include "lapwing/report/html_report.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <functional>
#include <initializer_list>

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/svg.hpp"
#include "lapwing/report/text_table.hpp"
#include "lapwing/report/track_quality_text.hpp"
#include "lapwing/report/trade_report.hpp"
#include "lapwing/report/verdict.hpp"
#include "traces_js.hpp"

namespace lapwing {

namespace {

using svg::escape;
using svg::Plot;
using svg::Series;

constexpr std::size_t trace_points = 1500;  // points per series in a static plot (decimated)
constexpr std::size_t live_points = 4000;   // points per series the live plots read
constexpr std::size_t gg_points = 700;
constexpr int trace_width = 1240;        // design width of the static traces (scaled to fit)
constexpr std::size_t name_chars = 16;   // config names in tables, shortened beyond
constexpr std::size_t track_chars = 28;  // track names in table headers and labels

std::size_t stride(std::size_t n, std::size_t want) {
  return std::max<std::size_t>(1, (n + want - 1) / want);
}

// Indices of a decimated trace: every k-th point and the last.
std::vector<std::size_t> picks(std::size_t n, std::size_t want) {
  std::vector<std::size_t> out;
  const std::size_t k = stride(n, want);
  for (std::size_t i = 0; i < n; i += k) out.push_back(i);
  if (out.back() != n - 1) out.push_back(n - 1);
  return out;
}

// A channel's value at point i: a stored channel (a vector), or one worked point by point (a
// function of the index: the front share from the axle loads, its shifts bridged), so that no
// channel is copied whole for a plot.
double value_at(const std::vector<double>& y, std::size_t i) {
  return y[i];
}
template <typename F>
double value_at(const F& y, std::size_t i) {
  return y(i);
}

// Decimated (x, y) of a channel along the lap, keeping the last point.
template <typename Y>
Series along(const Mesh& mesh, const Y& y, double scale, std::string name, std::size_t colour) {
  Series s{std::move(name), {}, {}, colour, false, 1.6};
  for (std::size_t i : picks(mesh.size(), trace_points)) {
    s.x.push_back(mesh.s_m[i]);
    s.y.push_back(value_at(y, i) * scale);
  }
  return s;
}

// A name as HTML, shortened past `max` code points with the full name on hover.
std::string nm(const std::string& name, std::size_t max = name_chars) {
  const std::string shown = shorten_middle(name, max);
  if (shown == name) return escape(name);
  return "<span title=\"" + escape(name) + "\">" + escape(shown) + "</span>";
}

std::vector<std::string> escaped(const std::vector<std::string>& v) {
  std::vector<std::string> o;
  for (const auto& x : v) o.push_back(escape(x));
  return o;
}

// A table of cells already in HTML. Columns listed in `wrap` may wrap their text; the rest
// stay on one line (numbers). The first column is left-aligned, the others right-aligned,
// except wrapping ones.
// `top`: an optional first header row (cells with their rowspan/colspan), in HTML.
std::string table(const std::vector<std::string>& header,
                  const std::vector<std::vector<std::string>>& rows, const std::string& cls = "",
                  const std::vector<std::size_t>& wrap = {}, const std::string& top = "",
                  const std::vector<std::size_t>& soft = {}) {
  std::string o = "<table" + (cls.empty() ? std::string() : " class=\"" + cls + "\"") + "><thead>" +
                  (top.empty() ? std::string() : "<tr>" + top + "</tr>") + "<tr>";
  for (const auto& h : header) o += "<th>" + h + "</th>";
  o += "</tr></thead><tbody>\n";
  for (const auto& r : rows) {
    o += "<tr>";
    for (std::size_t c = 0; c < r.size(); ++c) {
      const bool w = std::find(wrap.begin(), wrap.end(), c) != wrap.end();
      const bool b = std::find(soft.begin(), soft.end(), c) != soft.end();
      o += std::string(w   ? "<td class=\"w\">"
                       : b ? "<td class=\"n b\">"
                       : c ? "<td class=\"n\">"
                           : "<td>") +
           r[c] + "</td>";
    }
    o += "</tr>\n";
  }
  return o + "</tbody></table>\n";
}

std::string figure(const std::string& svg_text, const std::string& caption,
                   const std::string& cls = "") {
  return "<figure" + (cls.empty() ? std::string() : " class=\"" + cls + "\"") + ">" + svg_text +
         "<figcaption>" + escape(caption) + "</figcaption></figure>\n";
}

// Text as a JSON string for an inline <script>: '<' escaped so that no "</script>" can end it.
std::string js_string(const std::string& s) {
  std::string o = json_quote(s), out;
  for (char c : o) out += c == '<' ? std::string("\\u003c") : std::string(1, c);
  return out;
}

// Numbers at fixed decimals, comma-separated (the same bytes for the same lap).
template <typename Y>
std::string js_numbers(const Y& v, const std::vector<std::size_t>& at, double scale, int decimals) {
  std::string o = "[";
  for (std::size_t k = 0; k < at.size(); ++k) {
    if (k) o += ',';
    append_fixed(o, value_at(v, at[k]) * scale, decimals, MinusZero::fold);
  }
  return o + "]";
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
h2 { font-size: 18px; margin: 28px 0 8px; padding-bottom: 4px; border-bottom: 1px solid var(--rule);
     overflow-wrap: anywhere; }
h3 { font-size: 15px; margin: 18px 0 6px; color: var(--muted); }
p.verdict { margin: 6px 0 2px; font-size: 15px; }
p.verdict-balance { margin: 0 0 10px 18px; color: var(--ink); }
p.verdict b { overflow-wrap: anywhere; }
table { border-collapse: collapse; margin: 6px 0 14px; font-size: 13px;
        font-variant-numeric: tabular-nums; display: block; max-width: 100%; overflow-x: auto; }
th, td { padding: 3px 6px; border-bottom: 1px solid var(--rule); text-align: left; }
th { background: var(--band); font-weight: 600; vertical-align: bottom; white-space: normal;
     overflow-wrap: anywhere; }
td { white-space: nowrap; }
td.n { text-align: right; }
td.w { white-space: normal; min-width: 11em; }
td.b { white-space: normal; }
td a.corner-link { color: #0072B2; }
figure { margin: 8px 0 18px; min-width: 0; }
figcaption { color: var(--muted); font-size: 12px; margin-top: 2px; }
p.note { color: var(--muted); font-size: 12px; margin: -8px 0 14px; }
p.quality { font-size: 13px; }
.pair { display: grid; gap: 8px 24px;
        grid-template-columns: repeat(auto-fill, minmax(min(100%, 520px), 1fr)); }
svg.plot { display: block; width: 100%; height: auto; background: var(--paper); }
svg .grid line { stroke: #e6e9ef; stroke-width: 1; }
svg .frame { fill: none; stroke: #9aa3b2; stroke-width: 1; }
svg .tick, svg .legend, svg .label, svg .marker-text { font-size: 11px; fill: var(--ink); }
svg .axis-title { font-size: 12px; fill: var(--muted); }
svg .plot-title { font-size: 13px; font-weight: 600; fill: var(--ink); }
svg .marker { stroke: #b9c0cc; stroke-width: 0.8; stroke-dasharray: 3 3; }
svg .contour { fill: none; stroke: #1d2430; stroke-width: 0.7; stroke-opacity: 0.55; }
svg .contour-label { font-size: 10px; fill: #1d2430; stroke: #ffffff; stroke-width: 3px;
                     stroke-opacity: 0.85; paint-order: stroke; }
svg .label { stroke: #ffffff; stroke-width: 3px; stroke-opacity: 0.85; paint-order: stroke; }
svg .breakeven { stroke: #D55E00; stroke-width: 1.6; stroke-dasharray: 6 4; }
svg .colour-bar { stroke: #9aa3b2; stroke-width: 0.5; }
svg .bar-tick { stroke: #5b6577; stroke-width: 1; }
svg .bar-value { font-size: 10px; fill: var(--ink); }
svg .bar-best { font-size: 11px; font-weight: 600; fill: var(--ink); }
svg .window-band { fill: #009E73; fill-opacity: 0.12; }
svg .window-edge { stroke: #009E73; stroke-width: 1; stroke-dasharray: 4 3; }
svg .worst-mark { fill: none; stroke-width: 2; }
svg .raw { stroke-opacity: 0.35; }
.zoom-bar { font-size: 12px; color: var(--muted); margin: 4px 0; }
.zoom-bar button { font: inherit; margin: 0 6px; }
.zoom-range { font-weight: 600; color: var(--ink); }
.live { display: none; position: relative; }
.live-traces .live { display: block; }
.live-traces .static { display: none; }
.live-plot { touch-action: none; user-select: none; }
svg .cursor { stroke: #1d2430; stroke-width: 1; stroke-dasharray: 2 2; }
svg .selection { fill: #0072B2; fill-opacity: 0.12; }
svg .corner-link { cursor: pointer; fill: #0072B2; text-decoration: underline; }
.readout { position: absolute; z-index: 2; pointer-events: none; background: rgba(255,255,255,0.94);
           border: 1px solid var(--rule); border-radius: 3px; padding: 3px 6px; font-size: 12px;
           white-space: nowrap; box-shadow: 0 1px 3px rgba(0,0,0,0.12); }
.readout-head { font-weight: 600; }
.readout-row { display: flex; gap: 6px; align-items: center; }
.readout-name { flex: 1; }
.readout-value { font-variant-numeric: tabular-nums; text-align: right; min-width: 6em; }
.swatch { display: inline-block; width: 10px; height: 3px; }
@media (max-width: 900px) {
  main { padding: 0 16px 24px; }
  header { padding: 16px 16px 10px; }
  .caution { margin: 12px 16px; }
  table { font-size: 12px; }
  th { font-size: 11px; }
  th, td { padding: 2px 4px; }
}
@media print {
  body { font-size: 11px; }
  header, main { padding-left: 0; padding-right: 0; }
  .caution { margin-left: 0; margin-right: 0; }
  figure, table { break-inside: avoid; }
  h2 { break-before: auto; break-after: avoid; }
  .live-traces .live, .zoom-bar { display: none !important; }
  .live-traces .static { display: block !important; }
}
)";

// The front share with each gear shift's drive cut bridged: the points of a shift and one
// either side (where the acceleration changes sign) replaced by a straight line between the
// points around them. The cut is 0.04 s or so of load moving forward and back; bridged, the
// trend through the lap is what shows. Worked point by point from the runs of bridged points
// (one per upshift), not copied whole: a long lap's report holds no channel of its length.
class BridgedShifts {
 public:
  BridgedShifts(std::function<double(std::size_t)> y, const std::vector<Phase>& phase)
      : y_(std::move(y)), n_(phase.size()) {
    for (std::size_t i = 0; i < n_; ++i) {
      if (phase[i] != Phase::shift) continue;
      const std::size_t a = i ? i - 1 : 0, b = std::min(n_ - 1, i + 1) + 1;  // [a, b) bridged
      if (!runs_.empty() && a <= runs_.back().second)
        runs_.back().second = std::max(runs_.back().second, b);  // one run with the last
      else
        runs_.push_back({a, b});
    }
  }
  double operator()(std::size_t k) const {
    // The run [i, j) that holds k, if one does.
    const auto after = std::upper_bound(
        runs_.begin(), runs_.end(), k,
        [](std::size_t p, const std::pair<std::size_t, std::size_t>& r) { return p < r.first; });
    if (after == runs_.begin() || k >= std::prev(after)->second) return y_(k);
    const auto [i, j] = *std::prev(after);
    const bool has_a = i > 0, has_b = j < n_;
    if (has_a && has_b) {
      const double w = static_cast<double>(k - (i - 1)) / static_cast<double>(j - (i - 1));
      return y_(i - 1) + w * (y_(j) - y_(i - 1));
    }
    return has_a ? y_(i - 1) : has_b ? y_(j) : y_(k);
  }

 private:
  std::function<double(std::size_t)> y_;
  std::size_t n_;
  std::vector<std::pair<std::size_t, std::size_t>> runs_;
};

// Decimated values of a raw channel of n points that keep its spikes: in each stretch of `k`
// points, the value farthest from the trend (so that the cuts behind the trend still show).
template <typename R, typename T>
std::vector<double> spikes_kept(const R& raw, const T& trend, const std::vector<std::size_t>& at,
                                std::size_t n) {
  std::vector<double> out;
  for (std::size_t p = 0; p < at.size(); ++p) {
    const std::size_t a = at[p], b = p + 1 < at.size() ? at[p + 1] : at[p] + 1;
    std::size_t best = a;
    for (std::size_t i = a; i < b && i < n; ++i)
      if (std::abs(value_at(raw, i) - value_at(trend, i)) >
          std::abs(value_at(raw, best) - value_at(trend, best)))
        best = i;
    out.push_back(value_at(raw, best));
  }
  return out;
}

// An element id made from a track's id (its file's stem, which may hold a space or any text):
// every byte outside [A-Za-z0-9-] written _XX (its hex), so that two track ids stay two element
// ids and url(#...) references resolve (an id with a space broke the map's colour bar and the
// plots' clipping: a helper's finding).
std::string html_id(const std::string& s) {
  static const char hex[] = "0123456789ABCDEF";
  std::string out;
  for (const char ch : s) {
    const auto u = static_cast<unsigned char>(ch);
    if (std::isalnum(u) != 0 && u < 0x80) {
      out.push_back(ch);
    } else if (ch == '-') {
      out.push_back(ch);
    } else {
      out.push_back('_');
      out.push_back(hex[u >> 4]);
      out.push_back(hex[u & 0xF]);
    }
  }
  return out;
}

struct TrackView {
  const Circuit& c;
  const Comparison::PerTrack& pt;
  std::vector<std::string> names;  // configs, in entry order
  std::string id;                  // the track's id, for element ids
};

std::string corner_marks(Plot& p, const TrackView& v) {
  for (const auto& corner : v.pt.entries[v.pt.best].run.summary.corners)
    p.marker(corner.apex_m, std::to_string(corner.id));
  return {};
}

std::string speed_plot(const TrackView& v) {
  Plot p("speed-" + v.id, "Speed along the lap: " + shorten_middle(v.c.track.name, 60),
         "distance (m)", "speed (km/h)", trace_width, 320);
  for (std::size_t k = 0; k < v.pt.entries.size(); ++k)
    p.add(along(v.c.mesh, v.pt.entries[k].run.lap.speed_mps, 1.0 / units::kph, v.names[k], k));
  corner_marks(p, v);
  return p.render();
}

std::string delta_plot(const TrackView& v) {
  const Lap& best = v.pt.entries[v.pt.best].run.lap;
  Plot p("delta-" + v.id, "Time delta to " + v.names[v.pt.best], "distance (m)",
         "cumulative delta (s)", trace_width, 300);
  for (std::size_t k = 0; k < v.pt.entries.size(); ++k) {
    if (k == v.pt.best) continue;
    p.add(along(v.c.mesh, delta_trace(best, v.pt.entries[k].run.lap), 1.0, v.names[k], k));
  }
  corner_marks(p, v);
  return p.render();
}

// correlate: the simulated and the logged speed overlaid, and the running time difference, over
// the points the log covers (decimated as the other traces).
std::string correlation_section(const Circuit& c, const Lap& lap, const Correlation& k) {
  const Mesh& mesh = c.mesh;
  Plot speed("correlate-speed", "Speed, simulated and logged: " + shorten_middle(c.track.name, 60),
             "distance (m)", "speed (km/h)", trace_width, 320);
  Plot dt("correlate-delta", "Time difference, simulated - logged", "distance (m)",
          "cumulative delta (s)", trace_width, 300);
  // One line per run of covered points: nothing is drawn across a stretch the log does not
  // cover (a gap in it), and each trace is in the legend once.
  std::size_t runs = 0;
  const std::vector<std::size_t> shown = picks(mesh.size(), trace_points);
  for (std::size_t p = 0; p < shown.size();) {
    if (!k.covered[shown[p]]) {
      ++p;
      continue;
    }
    Series sim{"simulated", {}, {}, 0, false, 1.6}, log{"logged", {}, {}, 1, false, 1.2};
    Series delta{"sim - log", {}, {}, 0, false, 1.6};
    sim.in_legend = log.in_legend = delta.in_legend = runs++ == 0;
    for (; p < shown.size(); ++p) {
      const std::size_t i = shown[p];
      if (!k.covered[i]) break;
      // Points skipped by the decimation must be covered too, or the run ends here.
      if (!sim.x.empty()) {
        bool all = true;
        for (std::size_t j = shown[p - 1]; j <= i; ++j) all = all && k.covered[j];
        if (!all) break;
      }
      sim.x.push_back(mesh.s_m[i]);
      sim.y.push_back(units::to_kph(lap.speed_mps[i]));
      log.x.push_back(mesh.s_m[i]);
      log.y.push_back(units::to_kph(k.log_speed_mps[i]));
      delta.x.push_back(mesh.s_m[i]);
      delta.y.push_back(k.time_delta_s[i]);
    }
    speed.add(std::move(sim));
    speed.add(std::move(log));
    dt.add(std::move(delta));
  }
  for (const CornerSpan& span : c.corners) {
    speed.marker(mesh.s_m[span.start], std::to_string(span.id));
    dt.marker(mesh.s_m[span.start], std::to_string(span.id));
  }
  std::string o = "<section id=\"correlation\"><h2>Against the log</h2>\n";
  for (const std::string& w : k.warnings)
    o += "<p class=\"quality\"><strong>warning:</strong> " + escape(w) + "</p>\n";
  o +=
      table(escaped({"", "value"}),
            {{"alignment", escape("offset " + fixed(k.alignment.offset_m, 2) + " m, scale " +
                                  fixed(k.alignment.scale, 4) + ", speed correlation " +
                                  fixed(k.alignment.correlation, 4))},
             {"lap time", escape("simulated " + fixed(k.lap_time_sim_s, 3) + " s, logged " +
                                 fixed(k.lap_time_log_s, 3) + " s, difference " +
                                 signed_fixed(k.lap_time_sim_s - k.lap_time_log_s, 3) + " s")},
             {"RMS speed error", escape(fixed(units::to_kph(k.rms_speed_error_mps), 2) + " km/h")}},
            "", {1});
  o += figure(speed.render(), "Numbered lines mark where the corners begin.");
  o += figure(dt.render(),
              "Rising: the simulated car is slower there than the logged one; "
              "falling: faster.");
  std::vector<std::vector<std::string>> rows;
  for (std::size_t i = 0; i < k.sectors.size(); ++i) {
    const SectorError& s = k.sectors[i];
    // The share of the sector the log covers (the times are over that part), as the text's.
    const double length = s.end_m - s.start_m;
    const std::string logged = s.covered_m >= length - 1e-6 * std::max(1.0, length)
                                   ? "100 %"
                                   : fixed(std::min(99.9, 100.0 * s.covered_m / length), 1) + " %";
    rows.push_back({std::to_string(i + 1), fixed(s.start_m, 0) + "-" + fixed(s.end_m, 0) + " m",
                    logged, fixed(s.sim_s, 3), fixed(s.log_s, 3), signed_fixed(s.error_s, 3)});
  }
  o += "<h3>Sectors</h3>" +
       table(escaped({"sector", "where", "logged", "sim s", "log s", "error s"}), rows);
  rows.clear();
  auto d = [](double mps) { return signed_fixed(units::to_kph(mps), 1); };
  for (const CornerError& e : k.corners) {
    const auto b = e.braking_error_m();
    rows.push_back({std::to_string(e.id), fixed(e.apex_m, 0), d(e.sim_entry_mps - e.log_entry_mps),
                    d(e.sim_apex_mps - e.log_apex_mps), d(e.sim_exit_mps - e.log_exit_mps),
                    b ? signed_fixed(*b, 1) : "-"});
  }
  if (rows.empty())
    o += "<h3>Corners</h3><p class=\"note\">no corners</p></section>\n";
  else
    o += "<h3>Corners</h3>" +
         table(escaped({"corner", "apex m", "entry error km/h", "apex error km/h",
                        "exit error km/h", "braking point error m"}),
               rows) +
         "<p class=\"note\">Errors are simulated - logged; a braking point error &gt; 0: the "
         "simulated car brakes later.</p></section>\n";
  return o;
}

const BalanceWindowResult* window_of(const Comparison::Entry& e) {
  const auto& w = e.run.summary.balance.window;
  return w ? &*w : nullptr;
}

std::string front_share_plot(const TrackView& v) {
  Plot p("front-share-" + v.id, "Front axle share of the load", "distance (m)", "front share (%)",
         trace_width, 340);
  const BalanceWindowResult* win = window_of(v.pt.entries[v.pt.best]);
  for (std::size_t k = 0; k < v.pt.entries.size(); ++k) {
    const Lap& lap = v.pt.entries[k].run.lap;
    const auto share = [&lap](std::size_t i) { return front_share(lap, i); };
    const BridgedShifts trend(share, lap.phase);
    Series raw = along(v.c.mesh, share, 100.0, v.names[k], k);
    const auto at = picks(v.c.mesh.size(), trace_points);
    raw.y = spikes_kept(share, trend, at, lap.phase.size());
    for (double& y : raw.y) y *= 100.0;
    raw.width = 0.8;
    raw.opacity = 0.35;
    raw.in_legend = false;
    p.add(raw);
  }
  for (std::size_t k = 0; k < v.pt.entries.size(); ++k) {
    const Lap& lap = v.pt.entries[k].run.lap;
    const BridgedShifts trend([&lap](std::size_t i) { return front_share(lap, i); }, lap.phase);
    p.add(along(v.c.mesh, trend, 100.0, v.names[k], k));
  }
  p.key({"as solved (shift cuts)",
         "<line x1=\"0\" y1=\"5\" x2=\"16\" y2=\"5\" stroke=\"#5b6577\" "
         "stroke-width=\"0.8\" stroke-opacity=\"0.6\"/>"});
  if (win) {
    // The window as a band; the y range takes it in.
    double lo = 100 * win->window.front_share_min, hi = 100 * win->window.front_share_max;
    double y0 = lo, y1 = hi;
    for (const auto& e : v.pt.entries)
      for (std::size_t i = 0; i < e.run.lap.front_load_n.size(); ++i) {
        const double f = front_share(e.run.lap, i);
        y0 = std::min(y0, 100 * f);
        y1 = std::max(y1, 100 * f);
      }
    const double step = svg::nice_ticks(y0, y1, 5).size() > 1
                            ? svg::nice_ticks(y0, y1, 5)[1] - svg::nice_ticks(y0, y1, 5)[0]
                            : 1.0;
    p.y_range(std::floor(y0 / step) * step, std::ceil(y1 / step) * step);
    const svg::Scale sx = p.x_scale(), sy = p.y_scale();
    char buf[320];
    std::snprintf(buf, sizeof buf,
                  "<rect class=\"window-band\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" "
                  "height=\"%.1f\"/><line class=\"window-edge\" x1=\"%.1f\" y1=\"%.1f\" "
                  "x2=\"%.1f\" y2=\"%.1f\"/><line class=\"window-edge\" x1=\"%.1f\" y1=\"%.1f\" "
                  "x2=\"%.1f\" y2=\"%.1f\"/>\n",
                  sx.p0, sy(hi), sx.p1 - sx.p0, sy(lo) - sy(hi), sx.p0, sy(hi), sx.p1, sy(hi),
                  sx.p0, sy(lo), sx.p1, sy(lo));
    p.underlay(buf);
    p.key({"balance window (above " + fixed(units::to_kph(win->window.above_mps), 0) + " km/h, > " +
               fixed(balance_window_lateral_g, 1) + " g)",
           "<rect x=\"0\" y=\"1\" width=\"16\" height=\"8\" class=\"window-band\"/>"});
    // Each config's worst point in the window, ringed in its colour.
    std::string marks;
    for (std::size_t k = 0; k < v.pt.entries.size(); ++k) {
      const BalanceWindowResult* w = window_of(v.pt.entries[k]);
      if (!w || !(w->time_s > 0.0)) continue;
      const double share =
          w->worst_excursion +
          (w->worst_excursion < 0 ? w->window.front_share_min : w->window.front_share_max);
      const double y = w->pass ? 0.0 : share;
      if (w->pass) continue;
      std::snprintf(buf, sizeof buf,
                    "<circle class=\"worst-mark\" cx=\"%.1f\" cy=\"%.1f\" r=\"4.5\" "
                    "stroke=\"%s\"><title>",
                    sx(w->worst_at_m), sy(100 * y), svg::series_colour(k).c_str());
      marks += buf + escape(v.names[k] + ": " + window_worst(*w)) + "</title></circle>";
    }
    p.overlay("<g clip-path=\"url(#front-share-" + escape(v.id) + "-clip)\">" + marks + "</g>\n");
    p.key({"worst point outside the window",
           "<circle cx=\"8\" cy=\"5\" r=\"4\" fill=\"none\" stroke=\"#5b6577\" "
           "stroke-width=\"2\"/>"});
  }
  corner_marks(p, v);
  return p.render();
}

// The data the live traces read: distance, the corners, and per plot each config's values.
std::string trace_data(const TrackView& v) {
  const Mesh& mesh = v.c.mesh;
  const auto at = picks(mesh.size(), live_points);
  const auto& pt = v.pt;
  std::string o = "{\"x\":" + js_numbers(mesh.s_m, at, 1.0, 2) + ",\"corners\":[";
  const auto& corners = pt.entries[pt.best].run.summary.corners;
  for (std::size_t i = 0; i < corners.size(); ++i)
    o += std::string(i ? "," : "") + "[" + std::to_string(corners[i].id) + "," +
         fixed(corners[i].start_m, 1) + "," + fixed(corners[i].apex_m, 1) + "," +
         fixed(corners[i].end_m, 1) + "]";
  o += "],\"colours\":[";
  for (std::size_t k = 0; k < 8; ++k)
    o += std::string(k ? "," : "") + js_string(svg::series_colour(k));
  o += "],\"plots\":{";
  auto series_head = [&](std::size_t k) {
    return "{\"name\":" + js_string(v.names[k]) +
           ",\"short\":" + js_string(shorten_middle(v.names[k], svg::legend_chars)) +
           ",\"c\":" + std::to_string(k % 8);
  };
  auto plot_head = [&](const std::string& key, const std::string& title, const std::string& ytitle,
                       const std::string& unit, int decimals, int height) {
    return js_string(key) + ":{\"title\":" + js_string(title) + ",\"ytitle\":" + js_string(ytitle) +
           ",\"unit\":" + js_string(unit) + ",\"decimals\":" + std::to_string(decimals) +
           ",\"height\":" + std::to_string(height);
  };
  // Speed.
  o += plot_head("speed", "Speed along the lap", "speed (km/h)", "km/h", 1, 320) + ",\"series\":[";
  for (std::size_t k = 0; k < pt.entries.size(); ++k)
    o += std::string(k ? "," : "") + series_head(k) +
         ",\"y\":" + js_numbers(pt.entries[k].run.lap.speed_mps, at, 1.0 / units::kph, 2) + "}";
  o += "]}";
  // Delta.
  if (pt.entries.size() > 1) {
    o += "," +
         plot_head("delta", "Time delta to " + v.names[pt.best], "cumulative delta (s)", "s", 3,
                   300) +
         ",\"series\":[";
    bool first = true;
    for (std::size_t k = 0; k < pt.entries.size(); ++k) {
      if (k == pt.best) continue;
      o += std::string(first ? "" : ",") + series_head(k) + ",\"y\":" +
           js_numbers(delta_trace(pt.entries[pt.best].run.lap, pt.entries[k].run.lap), at, 1.0, 4) +
           "}";
      first = false;
    }
    o += "]}";
  }
  // Front share: the bridged trend read out, the raw behind it.
  o += "," + plot_head("front", "Front axle share of the load", "front share (%)", "%", 1, 340);
  if (const BalanceWindowResult* w = window_of(pt.entries[pt.best]))
    o += ",\"band\":[" + fixed(100 * w->window.front_share_min, 2) + "," +
         fixed(100 * w->window.front_share_max, 2) + "]";
  o += ",\"marks\":[";
  bool first = true;
  for (std::size_t k = 0; k < pt.entries.size(); ++k) {
    const BalanceWindowResult* w = window_of(pt.entries[k]);
    if (!w || w->pass || !(w->time_s > 0.0)) continue;
    const double share = w->worst_excursion + (w->worst_excursion < 0 ? w->window.front_share_min
                                                                      : w->window.front_share_max);
    o += std::string(first ? "" : ",") + "[" + fixed(w->worst_at_m, 1) + "," +
         fixed(100 * share, 2) + "," + std::to_string(k % 8) + "," +
         js_string(v.names[k] + ": " + window_worst(*w)) + "]";
    first = false;
  }
  o += "],\"series\":[";
  for (std::size_t k = 0; k < pt.entries.size(); ++k) {
    const Lap& lap = pt.entries[k].run.lap;
    const auto share = [&lap](std::size_t i) { return front_share(lap, i); };
    const BridgedShifts trend(share, lap.phase);
    std::vector<double> raw = spikes_kept(share, trend, at, lap.phase.size());
    std::vector<std::size_t> all(raw.size());
    for (std::size_t i = 0; i < all.size(); ++i) all[i] = i;
    o += std::string(k ? "," : "") + series_head(k) + ",\"y\":" + js_numbers(trend, at, 100.0, 2) +
         ",\"raw\":" + js_numbers(raw, all, 100.0, 2) + "}";
  }
  o += "]}}}";
  return o;
}

std::string map_plot(const TrackView& v) {
  const Lap& lap = v.pt.entries[v.pt.best].run.lap;
  const Mesh& mesh = v.c.mesh;
  require_positions(mesh, "the report's map");
  Plot p("map-" + v.id,
         "Track map coloured by speed (" + shorten_middle(v.names[v.pt.best], 24) + ")", "x (m)",
         "y (m)", 640, 520);
  p.equal_aspect();
  const bool edges = !mesh.width_left_m.empty();
  // A thin dark outline of the path; with edges it is not drawn (the coloured path shows between
  // them) but still sets the plot's extent, edges included.
  Series outline{"", {}, {}, 6, false, edges ? 0.0 : 0.8};
  const auto at = picks(mesh.size(), trace_points);
  for (std::size_t i : at) {
    outline.x.push_back(mesh.x_m[i]);
    outline.y.push_back(mesh.y_m[i]);
  }
  if (edges)
    for (std::size_t i : at)
      for (const double w : {mesh.width_left_m[i], -mesh.width_right_m[i]}) {
        outline.x.push_back(mesh.x_m[i] - w * std::sin(mesh.heading_rad[i]));
        outline.y.push_back(mesh.y_m[i] + w * std::cos(mesh.heading_rad[i]));
      }
  p.add(outline);
  const double vmin = *std::min_element(lap.speed_mps.begin(), lap.speed_mps.end());
  const double vmax = *std::max_element(lap.speed_mps.begin(), lap.speed_mps.end());
  const svg::Scale sx = p.x_scale(), sy = p.y_scale();
  std::string cells;
  if (edges) {
    // The track's edges: left and right of the path lapped along its normal, x - w sin(heading),
    // y + w cos(heading) to the left; thin grey lines either side of the path.
    for (const int side : {1, -1}) {
      cells += "<polyline fill=\"none\" stroke=\"#8a8a8a\" stroke-width=\"1\" points=\"";
      for (std::size_t i : at) {
        const double w = side > 0 ? mesh.width_left_m[i] : -mesh.width_right_m[i];
        append_fixed(cells, sx(mesh.x_m[i] - w * std::sin(mesh.heading_rad[i])), 1);
        cells += ',';
        append_fixed(cells, sy(mesh.y_m[i] + w * std::cos(mesh.heading_rad[i])), 1);
        cells += ' ';
      }
      cells += "\"/>";
    }
  }
  // The path coloured by speed: narrower between the edges, so that they show.
  const char* path_width = edges ? "3" : "6";
  for (std::size_t a = 0; a + 1 < at.size(); ++a) {
    const std::size_t i = at[a], j = at[a + 1];
    const double t = vmax > vmin ? (lap.speed_mps[i] - vmin) / (vmax - vmin) : 0.5;
    cells += "<line x1=\"";
    append_fixed(cells, sx(mesh.x_m[i]), 1);
    cells += "\" y1=\"";
    append_fixed(cells, sy(mesh.y_m[i]), 1);
    cells += "\" x2=\"";
    append_fixed(cells, sx(mesh.x_m[j]), 1);
    cells += "\" y2=\"";
    append_fixed(cells, sy(mesh.y_m[j]), 1);
    cells += "\" stroke=\"";
    cells += svg::ramp_colour(t);
    cells += "\" stroke-width=\"";
    cells += path_width;
    cells += "\" stroke-linecap=\"round\"/>";
  }
  p.underlay(cells + "\n");
  // The colour bar in the right margin: speed in km/h, fast (light) at the top.
  p.overlay(svg::colour_bar("map-" + v.id + "-ramp", sx.p1 + 16, sy.p1 + 24, 14, 220,
                            units::to_kph(vmin), units::to_kph(vmax), true, "speed (km/h)"));
  for (const auto& corner : v.pt.entries[v.pt.best].run.summary.corners) {
    const std::size_t i = std::min(
        mesh.size() - 1, static_cast<std::size_t>(std::lround(corner.apex_m / mesh.step_m)));
    // Label off the line, towards the inside of the turn.
    const double nx = -std::sin(mesh.heading_rad[i]) * corner.direction;
    const double ny = std::cos(mesh.heading_rad[i]) * corner.direction;
    const double off = 0.035 * (sx.d1 - sx.d0);
    p.label(mesh.x_m[i] + nx * off, mesh.y_m[i] + ny * off, std::to_string(corner.id));
  }
  return figure(p.render(), "Colour: speed of " + v.names[v.pt.best] +
                                " (scale beside the map). Numbers are corners; the lap starts "
                                "at (0, 0)." +
                                (edges ? v.c.track.line_path
                                             ? " Thin grey lines: the track's edges; the coloured "
                                               "path is the racing line lapped."
                                             : " Thin grey lines: the track's edges; the coloured "
                                               "path is the one lapped (its centerline, or a line "
                                               "written as one)."
                                       : ""));
}

std::string gg_plot(const TrackView& v) {
  Plot p("gg-" + v.id, "g-g diagram", "lateral acceleration (g)", "longitudinal acceleration (g)",
         640, 520);
  p.equal_aspect();
  for (std::size_t k = 0; k < v.pt.entries.size(); ++k) {
    const Lap& lap = v.pt.entries[k].run.lap;
    Series s{v.names[k], {}, {}, k, true, 0.0};
    for (std::size_t i : picks(lap.speed_mps.size(), gg_points)) {
      s.x.push_back(lap.lat_accel_mps2[i] / units::g0);
      s.y.push_back(lap.long_accel_mps2[i] / units::g0);
    }
    p.add(s);
  }
  return figure(p.render(), "One point per stretch of the lap; left turns to the right of zero.");
}

std::string trade_plot(const Circuit& c, const TradeGrid& g, const Trade& t, const Car& car) {
  Plot p("trade-map-" + html_id(c.track.id), "Trade map: lap time over ClA x CdA", "ClA (m2)",
         "CdA (m2)", 700, 560);
  p.x_range(g.cla_m2.front(), g.cla_m2.back());
  p.y_range(g.cda_m2.front(), g.cda_m2.back());
  const svg::Scale sx = p.x_scale(), sy = p.y_scale();
  const double tmin = *std::min_element(g.lap_time_s.begin(), g.lap_time_s.end());
  const double tmax = *std::max_element(g.lap_time_s.begin(), g.lap_time_s.end());
  std::string cells;
  char buf[240];
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
  // Contour lines at round lap times, each labelled with its time where it passes nearest the
  // middle of the map.
  const auto levels = svg::nice_ticks(tmin, tmax, 8);
  const double level_step = levels.size() > 1 ? levels[1] - levels[0] : 1.0;
  const int decimals =
      level_step >= 1.0 ? 0 : static_cast<int>(std::ceil(-std::log10(level_step) - 1e-9));
  std::string labels;
  const double cx = 0.5 * (sx.p0 + sx.p1), cy = 0.5 * (sy.p0 + sy.p1);
  // Boxes of the labels placed so far (pixels: x0, y0, x1, y1), so that none covers another.
  std::vector<std::array<double, 4>> taken;
  auto free_at = [&](const std::array<double, 4>& b) {
    if (b[0] < sx.p0 + 2 || b[2] > sx.p1 - 2 || b[1] < sy.p1 + 2 || b[3] > sy.p0 - 2) return false;
    for (const auto& o : taken)
      if (b[0] < o[2] && o[0] < b[2] && b[1] < o[3] && o[1] < b[3]) return false;
    return true;
  };
  constexpr double char_px = 6.4, label_h = 12.0;  // 10-11 px text
  for (double level : levels) {
    const auto segs = svg::contour_segments(g.cla_m2, g.cda_m2, g.lap_time_s, level);
    double best_d = 1e300, lx = 0, ly = 0;
    for (const auto& s : segs) {
      std::snprintf(buf, sizeof buf,
                    "<line class=\"contour\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>",
                    sx(s[0]), sy(s[1]), sx(s[2]), sy(s[3]));
      cells += buf;
      const double mx = 0.5 * (sx(s[0]) + sx(s[2])), my = 0.5 * (sy(s[1]) + sy(s[3]));
      const double d = std::hypot(mx - cx, my - cy);
      // Away from the edges, where the label would be cut.
      const bool inside = mx > sx.p0 + 24 && mx < sx.p1 - 24 && my > sy.p1 + 10 && my < sy.p0 - 10;
      if (inside && d < best_d) {
        best_d = d;
        lx = mx;
        ly = my;
      }
    }
    if (best_d < 1e300) {
      taken.push_back({lx - 22, ly - 6, lx + 22, ly + 6});
      std::snprintf(buf, sizeof buf,
                    "<text class=\"contour-label\" x=\"%.1f\" y=\"%.1f\" text-anchor=\"middle\">"
                    "%.*f s</text>",
                    lx, ly + 3.5, decimals, level);
      labels += buf;
    }
  }
  cells += "\n";
  // The break-even line through the traded config: CdA - CdA0 = b (ClA - ClA0).
  for (const auto& s : t.sensitivities) {
    if (s.track != g.track || s.config != g.config || !s.breakeven_dcda_per_dcla) continue;
    const double b = *s.breakeven_dcda_per_dcla;
    const double xa = g.cla_m2.front(), xb = g.cla_m2.back();
    std::snprintf(buf, sizeof buf,
                  "<line class=\"breakeven\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n",
                  sx(xa), sy(s.cda_m2 + b * (xa - s.cla_m2)), sx(xb),
                  sy(s.cda_m2 + b * (xb - s.cla_m2)));
    cells += buf;
  }
  p.underlay(cells + labels);
  // Every config of the car at its operating point on this track, labelled with its name and
  // its own lap time: each label at the first place around its mark (right, left, above,
  // below, then farther out) that no other label or mark covers.
  Series marks{"configs: own lap (s)", {}, {}, 6, true, 0.0, 4.0};
  const std::size_t nc = car.configs.size();
  for (std::size_t k = 0; k < nc; ++k) {
    const AeroOperatingPoint& op = t.operating[g.track * nc + k];
    marks.x.push_back(op.cla_m2);
    marks.y.push_back(op.cda_m2);
    taken.push_back({sx(op.cla_m2) - 4, sy(op.cda_m2) - 4, sx(op.cla_m2) + 4, sy(op.cda_m2) + 4});
  }
  std::string config_labels;
  for (std::size_t k = 0; k < nc; ++k) {
    const std::string text = shorten_middle(car.configs[k].name, 14) + " " +
                             fixed(t.own_lap_time_s[g.track * nc + k], 2);
    const double w = char_px * static_cast<double>(display_width(text)), h = label_h;
    const double mx = sx(marks.x[k]), my = sy(marks.y[k]);
    std::array<double, 4> box{};
    bool placed = false;
    for (double r = 1.0; r <= 4.0 && !placed; r += 1.0)
      for (const auto& [dx, dy] : std::initializer_list<std::pair<double, double>>{{7, -h / 2},
                                                                                   {-7 - w, -h / 2},
                                                                                   {-w / 2, -7 - h},
                                                                                   {-w / 2, 7},
                                                                                   {7, -7 - h},
                                                                                   {-7 - w, -7 - h},
                                                                                   {7, 7},
                                                                                   {-7 - w, 7}}) {
        const double ox = dx + (dx > 0 ? 1 : dx < -w / 2 - 1 ? -1 : 0) * (r - 1) * 14;
        const double oy = dy + (dy > 0 ? 1 : dy < -h / 2 - 1 ? -1 : 0) * (r - 1) * 10;
        box = {mx + ox, my + oy, mx + ox + w, my + oy + h};
        if (free_at(box)) {
          placed = true;
          break;
        }
      }
    if (!placed) box = {mx + 7, my - h / 2, mx + 7 + w, my + h / 2};  // crowded: beside the mark
    taken.push_back(box);
    std::snprintf(buf, sizeof buf, "<text class=\"label\" x=\"%.1f\" y=\"%.1f\">", box[0],
                  box[3] - 2.5);
    config_labels += buf + svg::text_with_title(text, 40) + "</text>";
  }
  p.overlay("<g clip-path=\"url(#trade-map-" + html_id(c.track.id) + "-clip)\">" + config_labels +
            "</g>\n");
  p.add(marks);
  // The break-even line is drawn only where there is an exchange (Sensitivity).
  const bool breakeven =
      std::any_of(t.sensitivities.begin(), t.sensitivities.end(), [&](const auto& s) {
        return s.track == g.track && s.config == g.config && s.breakeven_dcda_per_dcla.has_value();
      });
  if (breakeven)
    p.key({"break-even: " + car.configs[g.config].name,
           "<line x1=\"0\" y1=\"5\" x2=\"16\" y2=\"5\" class=\"breakeven\"/>"});
  p.key({"equal lap time (s)", "<line x1=\"0\" y1=\"5\" x2=\"16\" y2=\"5\" class=\"contour\"/>"});
  p.overlay(svg::colour_bar("trade-map-" + html_id(c.track.id) + "-ramp", sx.p1 + 16, sy.p1 + 90,
                            14, 200, tmin, tmax, false, "lap time (s)"));
  return figure(
      p.render(),
      shorten_middle(c.track.name, 60) + ": lap time of " + car.configs[g.config].name +
          " with its ClA and CdA moved over the map (light: faster; thin lines join "
          "equal lap times, labelled in s). Every config is marked at its operating point "
          "with its own lap time; the others differ from " +
          car.configs[g.config].name + " in more than ClA and CdA (balance, mass)." +
          (breakeven ? " The dashed line is the break-even through " + car.configs[g.config].name +
                           ": above it extra downforce costs more drag than it pays."
                     : " No break-even line: here downforce does not pay or drag does not cost."));
}

std::string verdict_html(const std::string& track_name, const Comparison::PerTrack& pt,
                         const std::vector<std::string>& names) {
  std::string o = "<p class=\"verdict\"><b>" + escape(track_name) +
                  "</b>: " + escape(verdict_sentence(pt, names)) + ".</p>\n";
  const std::string b = balance_verdict(pt, names);
  if (!b.empty()) o += "<p class=\"verdict-balance\">" + escape(b) + ".</p>\n";
  return o;
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
  pt.runner_up = 0;
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

  std::vector<std::string> names;
  if (in.comparison)
    for (std::size_t k : in.comparison->configs) names.push_back(car.configs[k].name);

  // The answer first: a verdict per track.
  if (in.comparison && in.comparison->configs.size() > 1) {
    o += "<section id=\"verdict\"><h2>Verdict</h2>\n";
    for (std::size_t t = 0; t < circuits.size(); ++t)
      o += verdict_html(circuits[t].track.name, in.comparison->tracks[t], names);
    o += "<p class=\"note\">" +
         escape(std::string(verdict_sign_note) +
                "; corners, braking and straights add up to the margin.") +
         "</p></section>\n";
  }

  // Inputs.
  {
    std::vector<std::vector<std::string>> rows;
    rows.push_back({"car", escape(car.file), escape(car.name), ""});
    for (const auto& c : circuits)
      rows.push_back({"track", escape(c.track.file), escape(c.track.name),
                      escape(fixed(c.mesh.length_m, 1) + " m, air " +
                             fixed(c.air.density_kg_m3, 4) + " kg/m3")});
    if (car.balance_window)
      rows.push_back({"balance window", "", escape(window_text(*car.balance_window)), ""});
    o += "<section id=\"inputs\"><h2>Inputs</h2>" +
         table({"", "file", "name", "length, air"}, rows, "", {1, 2}) + "</section>\n";
  }

  if (in.comparison) {
    const Comparison& cmp = *in.comparison;
    // Summary matrix and bars.
    std::vector<std::string> header{"config"};
    for (const auto& c : circuits) header.push_back(nm(c.track.name, track_chars) + " (s)");
    std::vector<std::vector<std::string>> rows;
    std::vector<std::vector<double>> deltas(circuits.size());
    for (std::size_t k = 0; k < cmp.configs.size(); ++k) {
      std::vector<std::string> row{nm(names[k])};
      for (std::size_t t = 0; t < cmp.tracks.size(); ++t) {
        const auto& e = cmp.tracks[t].entries[k];
        row.push_back(escape(fixed(e.run.summary.lap_time_s, 3) +
                             (cmp.configs.size() == 1   ? ""
                              : cmp.tracks[t].best == k ? " best"
                                                        : " +" + fixed(e.delta_to_best_s, 3))));
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
                                 "delta to the best (s)", groups, names, deltas, trace_width, 320),
                  "Each bar: the config's lap time minus the track's best; the best is marked "
                  "\"best\" at zero.");
    o += "</section>\n";

    for (std::size_t t = 0; t < cmp.tracks.size(); ++t) {
      const Circuit& c = circuits[t];
      const auto& pt = cmp.tracks[t];
      const TrackView v{c, pt, names, html_id(c.track.id)};
      const std::string id = html_id(c.track.id);
      o += "<section id=\"track-" + id + "\"><h2>" + escape(c.track.name) + "</h2>\n";
      // The data's verdict: the worst of the configs' (they differ only in the lap spread).
      if (in.qualities) {
        const TrackQuality* shown = nullptr;
        for (const auto& q : *in.qualities)
          if (q.track_id == c.track.id &&
              (!shown || q.verdict > shown->verdict ||
               (q.verdict == shown->verdict && q.spread.value_or(0) > shown->spread.value_or(0))))
            shown = &q;
        if (shown)
          o += "<p class=\"quality\" id=\"quality-" + id + "\">" +
               (shown->verdict == Verdict::poor ? "<strong>warning:</strong> " : "") +
               escape(quality_line(*shown)) + "</p>\n";
      }
      // The laps' warnings (a table's end reached, an axle beyond its grip), as the text and
      // summary.json give them: each once, with the configs it applies to where there are
      // several (the data's verdict is the line above).
      std::vector<std::string> skip;
      if (in.qualities)
        for (const auto& q : *in.qualities)
          if (q.track_id == c.track.id) skip.push_back(quality_warning(q));
      std::vector<std::pair<std::string, std::vector<std::string>>> warnings;
      for (std::size_t k = 0; k < pt.entries.size(); ++k)
        for (const std::string& w : pt.entries[k].run.summary.warnings) {
          if (std::find(skip.begin(), skip.end(), w) != skip.end()) continue;
          auto it = std::find_if(warnings.begin(), warnings.end(),
                                 [&](const auto& x) { return x.first == w; });
          if (it == warnings.end()) it = warnings.insert(warnings.end(), {w, {}});
          it->second.push_back(names[k]);
        }
      for (const auto& [w, configs] : warnings) {
        std::string which;
        for (const auto& n : configs) which += (which.empty() ? "" : ", ") + n;
        o += "<p class=\"quality\"><strong>warning" +
             (names.size() > 1 ? " (" + escape(which) + ")" : std::string()) + ":</strong> " +
             escape(w) + "</p>\n";
      }
      if (pt.entries.size() > 1) o += verdict_html(c.track.name, pt, names);
      // The traces: static SVG, and the data the script draws the live plots from.
      o += "<div class=\"traces\" id=\"traces-" + id + "\">\n";
      o += "<p class=\"zoom-bar\" hidden=\"hidden\">Traces from <span class=\"zoom-range\"></span>"
           "<button type=\"button\">whole lap</button>drag across a trace to zoom, double-click "
           "for the whole lap, click a corner&#8217;s number to zoom to it; the cursor reads out "
           "every config.</p>\n";
      o +=
          "<script type=\"application/json\" class=\"trace-data\">" + trace_data(v) + "</script>\n";
      o += "<figure class=\"trace\" data-plot=\"speed\"><div class=\"static\">" + speed_plot(v) +
           "</div><figcaption>" +
           escape(std::string(pt.entries.size() > 1 ? "Every config overlaid; n" : "N") +
                  "umbered lines mark the corners' apexes.") +
           "</figcaption></figure>\n";
      if (pt.entries.size() > 1)
        o += "<figure class=\"trace\" data-plot=\"delta\"><div class=\"static\">" + delta_plot(v) +
             "</div><figcaption>Rising: the config loses time there against " +
             escape(names[pt.best]) + "; falling: it gains.</figcaption></figure>\n";
      o += "<figure class=\"trace\" data-plot=\"front\"><div class=\"static\">" +
           front_share_plot(v) + "</div><figcaption>" +
           escape(
               "Weight, downforce by the aero balance, the drag moment and load transfer. Gear "
               "shifts: each shift's drive cut is bridged by a straight line (the shift's points "
               "and one either side) in the solid lines; the faint lines behind are the trace as "
               "solved, with the cuts' spikes. The cursor reads the solid lines." +
               std::string(window_of(pt.entries[pt.best])
                               ? " The band is the car's balance window (it applies above its "
                                 "speed while cornering); rings mark each failing config's worst "
                                 "point."
                               : "")) +
           "</figcaption></figure>\n";
      o += "</div>\n";
      o += "<div class=\"pair\">" + map_plot(v) + gg_plot(v) + "</div>\n";
      // Corners: the best config's, with every config's apex speed; each number zooms the traces.
      // Two header rows: the apex speeds grouped under one heading, one column per config.
      std::vector<std::string> ch;
      for (std::size_t k = 0; k < pt.entries.size(); ++k) ch.push_back(nm(names[k], 14));
      const std::string top =
          "<th rowspan=\"2\">corner</th><th rowspan=\"2\">apex m</th><th colspan=\"" +
          std::to_string(pt.entries.size()) +
          "\">apex speed (km/h)</th><th rowspan=\"2\">limit</th><th rowspan=\"2\">axle "
          "entry/apex/exit</th><th rowspan=\"2\">front-rear usage entry/apex/exit</th>";
      std::vector<std::vector<std::string>> crows;
      const auto& bc = pt.entries[pt.best].run.summary.corners;
      for (std::size_t i = 0; i < bc.size(); ++i) {
        std::vector<std::string> row{"<a class=\"corner-link\" href=\"#traces-" + id +
                                         "\" data-corner=\"" + std::to_string(bc[i].id) + "\">" +
                                         std::to_string(bc[i].id) +
                                         (bc[i].direction > 0 ? " L" : " R") + "</a>",
                                     fixed(bc[i].apex_m, 0)};
        for (const auto& e : pt.entries)
          row.push_back(fixed(units::to_kph(e.run.summary.corners[i].apex_mps), 1));
        row.push_back(escape(std::string(label(bc[i].limit))));
        // Breaks allowed after each '/' so that a narrow page wraps the three values.
        auto breakable = [](const std::string& text) {
          std::string out;
          for (char ch_ : text)
            out += ch_ == '/' ? std::string("/<wbr/>") : escape(std::string(1, ch_));
          return out;
        };
        row.push_back(breakable(axle_cell(bc[i])));
        row.push_back(breakable(balance_index_cell(bc[i])));
        crows.push_back(row);
      }
      // A track without corners (a straight) says so rather than showing a header of no rows.
      if (crows.empty())
        o += "<h3 id=\"corners-" + id + "\">Corners</h3><p class=\"note\">no corners</p>\n";
      else
        o += "<h3 id=\"corners-" + id + "\">Corners</h3>" + table(ch, crows, "", {}, top) +
             "<p class=\"note\">" +
             escape("Corners, limit, axles and usage of the best config, " + names[pt.best] + "; " +
                    axle_legend() + ". A corner's number zooms the traces to it.") +
             "</p>\n";
      // Balance per config.
      std::vector<std::vector<std::string>> brows;
      for (std::size_t k = 0; k < pt.entries.size(); ++k) {
        std::vector<std::string> row{nm(names[k])};
        for (const auto& cell : balance_cells(pt.entries[k].run.summary.balance))
          row.push_back(escape(cell));
        brows.push_back(row);
      }
      o += "<h3 id=\"balance-" + id + "\">Balance</h3>" +
           table(escaped({"config", "static front %", "aero 150 km/h % (with drag moment)",
                          "aero 250 km/h % (with drag moment)",
                          "lowest front share accelerating > 200 km/h", "front-limited corners",
                          "front-limited m"}),
                 brows);
      if (const BalanceWindowResult* w = window_of(pt.entries[pt.best])) {
        std::vector<std::vector<std::string>> wrows;
        for (std::size_t k = 0; k < pt.entries.size(); ++k) {
          std::vector<std::string> row{nm(names[k])};
          for (const auto& cell : window_cells(*pt.entries[k].run.summary.balance.window))
            row.push_back(escape(cell));
          wrows.push_back(row);
        }
        std::vector<std::string> wh{"config"};
        for (const auto& h : window_header()) wh.push_back(escape(h));
        o += "<h3 id=\"window-" + id + "\">Balance window: " + escape(window_text(w->window)) +
             "</h3>" + table(wh, wrows, "", {3}) +
             "<p class=\"note\">Front share of the load in fast corners against the window; "
             "braking / drive: the mean front share above its speed under braking and under "
             "drive, and how far it moves between them.</p>\n";
      }
      o += "</section>\n";
    }
  }

  if (in.trade) {
    const Trade& t = *in.trade;
    std::vector<std::vector<std::string>> rows;
    for (const auto& s : t.sensitivities)
      rows.push_back({nm(circuits[s.track].track.name, track_chars), nm(car.configs[s.config].name),
                      fixed(s.lap_time_s, 3), signed_fixed(0.1 * s.dt_dcla_s_per_m2, 4),
                      signed_fixed(0.1 * s.dt_dcda_s_per_m2, 4),
                      signed_fixed(10 * s.dt_dmass_s_per_kg, 4),
                      signed_fixed(s.dt_dpower_s_per_percent, 4),
                      s.breakeven_dcda_per_dcla ? fixed(*s.breakeven_dcda_per_dcla, 3) : "-"});
    o += "<section id=\"trade\"><h2>Sensitivities</h2>" +
         table(escaped({"track", "config", "lap s", "s per +0.1 m2 ClA", "s per +0.1 m2 CdA",
                        "s per +10 kg", "s per +1 % power", "CdA m2 one m2 of ClA may cost"}),
               rows);
    // The tracks' warnings (a closure gap, a dropout), then each config's own lap's, as the
    // terminal gives them.
    for (std::size_t k = 0; k < circuits.size(); ++k) {
      const Circuit& c = circuits[k];
      for (const std::string& w : track_warnings(c.track))
        o += "<p class=\"quality\"><strong>warning (" + escape(c.track.name) + "):</strong> " +
             escape(w) + "</p>\n";
      for (std::size_t cfg = 0; cfg < car.configs.size(); ++cfg)
        for (const std::string& w : t.own_warnings[k * car.configs.size() + cfg])
          o += "<p class=\"quality\"><strong>warning (" + escape(c.track.name) + ", " +
               escape(car.configs[cfg].name) + "):</strong> " + escape(w) + "</p>\n";
    }
    // Where each config change's lap time comes from: the terminal's table.
    const TextTable a = attribution_table(car, t, circuits);
    if (!a.rows.empty()) {
      std::vector<std::vector<std::string>> arows;
      for (const auto& r : a.rows) arows.push_back(escaped(r));
      o += "<h3 id=\"attribution\">Where a config change's lap time comes from</h3>" +
           table(escaped(a.header), arows, "", {7}, "", {1, 3, 4}) + "<p class=\"note\">" +
           escape(attribution_caption()) + ".</p>\n";
    }
    o += "<div class=\"pair\">";
    for (const auto& g : t.grids) o += trade_plot(circuits[g.track], g, t, car);
    o += "</div></section>\n";
  }
  if (in.correlation && in.correlated_lap)
    o += correlation_section(circuits.front(), *in.correlated_lap, *in.correlation);
  o += "</main>\n";
  if (in.comparison) o += "<script>" + std::string(traces_js) + "</script>\n";
  o += "</body>\n</html>\n";
  return o;
}

}  // namespace lapwing
