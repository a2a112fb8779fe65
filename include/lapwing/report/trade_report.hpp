// A trade's outputs: trade.json, the terminal tables and the grid CSV files.
#pragma once

#include <string>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing {

/// "first-order split not reliable for this step" for an attribution whose residual exceeds
/// attribution_residual_limit of its total; empty otherwise.
std::string attribution_note(const Attribution& a);
/// trade.json: {"lapwing", "car", "step", "results": [...], "attributions": [...]}.
std::string trade_json(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
std::string trade_table(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
/// trade-grid-<track>.csv: cla_m2,cda_m2,lap_time_s.
std::string trade_grid_csv(const TradeGrid& g);

}  // namespace lapwing
