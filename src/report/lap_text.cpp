#include "lapwing/report/lap_text.hpp"

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing {

std::string balance_text(const BalanceSummary& b) {
  std::string o = "balance: static front weight " + fixed(100 * b.static_front_share, 1) + " %; ";
  if (b.aero_balance_150 && b.aero_balance_eff_150 && b.aero_balance_250 && b.aero_balance_eff_250)
    o += "aero balance " + fixed(100 * *b.aero_balance_150, 1) + " % (" +
         fixed(100 * *b.aero_balance_eff_150, 1) + " % with the drag moment) at 150 km/h, " +
         fixed(100 * *b.aero_balance_250, 1) + " % (" + fixed(100 * *b.aero_balance_eff_250, 1) +
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
  // Named as corners, so that a single id does not read as a count ("corners: 2").
  const std::size_t fronts = b.front_limited_corners.size();
  o += "         front limits at the apex of " +
       (fronts == 0   ? std::string("no corner")
        : fronts == 1 ? "corner " + ids
                      : "corners " + ids) +
       "; front ahead of the rear by more than " + fixed(b.threshold, 2) + " of usage over " +
       fixed(b.front_limited_length_m, 0) + " m of the lap\n";
  if (b.window) {
    const BalanceWindowResult& w = *b.window;
    const auto cells = window_cells(w);
    o += "         balance window " + window_text(w.window) + ": " + cells[0];
    if (w.time_s > 0.0)
      o += ", front share " + cells[1] + " % there, worst " + cells[2] + ", outside " + cells[3] +
           " % of its " + fixed(w.time_s, 2) + " s";
    o += "\n";
    if (w.braking_share && w.accelerating_share)
      o += "         above " + fixed(units::to_kph(w.window.above_mps), 0) +
           " km/h the front share moves " + cells[5] +
           " points: " + fixed(100 * *w.braking_share, 1) + " % braking, " +
           fixed(100 * *w.accelerating_share, 1) + " % under drive (time-weighted means)\n";
  }
  return o;
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
                      fixed(c.time_s, 3), label(c.limit), axle_cell(c), balance_index_cell(c)});
    o += "\n" + text_table({"corner", "turn", "start m", "apex m", "end m", "entry km/h",
                            "apex km/h", "exit km/h", "time s", "limit", "axle entry/apex/exit",
                            "front-rear usage entry/apex/exit"},
                           rows);
    o += axle_legend() + "\n";
  }
  o += "\n" + balance_text(s.balance);
  return o;
}

}  // namespace lapwing
