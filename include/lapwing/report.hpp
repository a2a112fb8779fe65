// Results as text: summary.json, the trace and corners CSV files (full precision), and the
// terminal tables (rounded for reading). All take the same summary objects.
#pragma once

#include <string>
#include <vector>

#include "lapwing/mesh.hpp"
#include "lapwing/solver.hpp"
#include "lapwing/study.hpp"
#include "lapwing/summary.hpp"

namespace lapwing {

/// summary.json (SPEC section 5): {"lapwing", "car", "results": [...]}.
std::string summary_json(const std::string& car_name, const std::vector<LapSummary>& results);

/// trace-<track>-<config>.csv, one row per mesh point (SPEC section 5).
std::string trace_csv(const Lap& lap, const Mesh& mesh);

/// corners.csv: the corners arrays of all results, one row per corner, track and config first.
std::string corners_csv(const std::vector<LapSummary>& results);

/// A balance summary as table cells: static front %, aero balance at 150 and at 250 km/h
/// ("alone / with the drag moment", %), the lowest front share accelerating above 200 km/h and
/// where, the front-limited corners, and the front-limited length (m). Shared by the terminal
/// and the HTML tables.
std::vector<std::string> balance_cells(const BalanceSummary& b);
/// A corner's limiting axles, "entry/apex/exit" (e.g. "rear/both/front"), and the usage
/// differences they are read from, "+0.031/-0.004/-0.120" (front - rear). Shared by the terminal
/// and the HTML tables.
std::string axle_cell(const CornerResult& c);
std::string balance_index_cell(const CornerResult& c);
/// The note under a corners table that says what the axle labels mean.
std::string axle_legend();

/// Corner ids joined with ", " ("-" for none).
std::string id_list(const std::vector<int>& ids);

/// The balance block of a lap (terminal).
std::string balance_text(const BalanceSummary& b);

/// The terminal report of one lap: headline figures, sectors, and the corners table.
std::string lap_table(const LapSummary& s);

/// Fixed-point text with `decimals` places (for terminal tables).
std::string fixed(double v, int decimals);

/// A plain-text table with right-aligned columns (first column left-aligned).
std::string text_table(const std::vector<std::string>& header,
                       const std::vector<std::vector<std::string>>& rows);

/// compare.json: per track, each config's lap, delta to the best, where the time goes and the
/// per-piece deltas; the best config and its margin.
std::string compare_json(const Car& car, const Comparison& c, const std::vector<Circuit>& circuits);
/// The terminal report of a comparison.
std::string compare_table(const Car& car, const Comparison& c,
                          const std::vector<Circuit>& circuits);
/// delta-<track>-<a>-<b>.csv: distance_m,delta_s (t_b - t_a).
std::string delta_csv(const Mesh& mesh, const std::vector<double>& delta_s);

/// "first-order split not reliable for this step" for an attribution whose residual exceeds
/// attribution_residual_limit of its total; empty otherwise.
std::string attribution_note(const Attribution& a);
/// trade.json: {"lapwing", "car", "step", "results": [...], "attributions": [...]}.
std::string trade_json(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
std::string trade_table(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
/// trade-grid-<track>.csv: cla_m2,cda_m2,lap_time_s.
std::string trade_grid_csv(const TradeGrid& g);

std::string version();

}  // namespace lapwing
