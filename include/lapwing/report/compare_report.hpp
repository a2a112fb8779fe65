// A comparison's outputs: compare.json, the terminal tables and the delta CSV files.
#pragma once

#include <string>
#include <vector>

#include "lapwing/io/output.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/compare.hpp"

namespace lapwing {

/// compare.json: per track, each config's lap, delta to the best, where the time goes and the
/// per-piece deltas; the best config and its margin.
std::string compare_json(const Car& car, const Comparison& c, const std::vector<Circuit>& circuits);
/// The terminal report of a comparison.
std::string compare_table(const Car& car, const Comparison& c,
                          const std::vector<Circuit>& circuits);
/// delta-<track>-<a>-<b>.csv: distance_m,delta_s (t_b - t_a).
/// Handed to `sink` in pieces of about 64 KB (never held whole).
void delta_csv(const Mesh& mesh, const std::vector<double>& delta_s, const OutputSink& sink);

}  // namespace lapwing
