// A lap in the terminal: headline figures, sectors, the corners table and the balance block
// (rounded for reading; the files hold full precision).
#pragma once

#include <string>

#include "lapwing/solve/summary.hpp"

namespace lapwing {

/// The balance block of a lap (terminal).
std::string balance_text(const BalanceSummary& b);

/// The terminal report of one lap: headline figures, sectors, and the corners table.
std::string lap_table(const LapSummary& s);

}  // namespace lapwing
