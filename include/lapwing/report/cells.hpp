// Table cells that the terminal and the HTML tables share, so that both say the same.
#pragma once

#include <string>
#include <vector>

#include "lapwing/solve/summary.hpp"

namespace lapwing {

/// A balance summary as table cells: static front %, aero balance at 150 and at 250 km/h
/// ("alone / with the drag moment", %), the lowest front share accelerating above 200 km/h and
/// where, the front-limited corners, and the front-limited length (m).
std::vector<std::string> balance_cells(const BalanceSummary& b);
/// A corner's limiting axles, "entry/apex/exit" (e.g. "rear/both/front"), and the usage
/// differences they are read from, "+0.031/-0.004/-0.120" (front - rear).
std::string axle_cell(const CornerResult& c);
std::string balance_index_cell(const CornerResult& c);
/// The note under a corners table that says what the axle labels mean.
std::string axle_legend();

/// "pass", "fail" or "not reached" (the lap never meets the window's speed and lateral
/// acceleration).
std::string window_result_name(const BalanceWindowResult& r);
/// The window itself: "34.0-57.0 % front above 150 km/h, > 0.5 g lateral".
std::string window_text(const BalanceWindow& w);
/// Where the worst point lies: "corner 6" or "straight to 7" ("straight to the line").
std::string window_where(const BalanceWindowResult& r);
/// The worst point in a few words: "1.7 points below at 2374 m (corner 8, brake, 182 km/h)",
/// or, when the lap passes, "1.0 points to spare at ..."; "-" when not reached.
std::string window_worst(const BalanceWindowResult& r);
/// Balance window table cells: result, front share range in the window (%), worst point,
/// time outside (%), mean front share braking / driving above the window's speed (%), and
/// how far it moves between them (points).
std::vector<std::string> window_cells(const BalanceWindowResult& r);
std::vector<std::string> window_header();

/// Corner ids joined with ", " ("-" for none).
std::string id_list(const std::vector<int>& ids);

}  // namespace lapwing
