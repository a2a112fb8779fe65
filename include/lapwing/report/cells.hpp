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

/// Corner ids joined with ", " ("-" for none).
std::string id_list(const std::vector<int>& ids);

}  // namespace lapwing
