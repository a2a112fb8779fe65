// A trade's outputs: trade.json, the terminal tables and the grid CSV files.
#pragma once

#include <string>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing {

/// "first-order split not reliable for this pair" for an attribution whose residual exceeds
/// attribution_residual_limit of its total; empty otherwise.
std::string attribution_note(const Attribution& a);
/// trade.json: {"lapwing", "car", "step", "results": [...], "attributions": [...]}.
std::string trade_json(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
/// A table's header and rows as text, for the terminal and the HTML alike.
struct TextTable {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
};
/// The attributions to or from a traded config, one row per track and pair.
TextTable attribution_table(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
/// What the attribution table holds, in a line.
std::string attribution_caption();

std::string trade_table(const Car& car, const Trade& t, const std::vector<Circuit>& circuits);
/// trade-grid-<track>.csv: cla_m2,cda_m2,lap_time_s.
std::string trade_grid_csv(const TradeGrid& g);

}  // namespace lapwing
