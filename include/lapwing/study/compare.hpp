// The wing-level comparison: every config of a car round every circuit, ranked per track, with
// where each config wins or loses its time against the best.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/path/corners.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

/// A piece of the lap for "where the time goes": a corner (from the curvature) or the straight
/// between two corners, with the time one config loses there against another. The outputs'
/// words for the kind: report/labels.hpp.
enum class PieceKind : std::uint8_t { corner, straight };
struct LapPiece {
  PieceKind kind;
  int id;  // corner id, or the id of the corner the straight leads to (0: to the line)
  double start_m, end_m;
  double delta_s;
};

/// Lap-time delta of `b` against `a` split by where it is made: in corners (inside a corner's
/// span), under braking (outside corners, where either lap brakes), on straights (the rest).
/// Intervals are classified whole; the three add up to the whole delta.
struct TimeSplit {
  double corners_s = 0.0, braking_s = 0.0, straights_s = 0.0;
};
TimeSplit split_delta(const Lap& a, const Lap& b, const Mesh& mesh,
                      const std::vector<CornerSpan>& corners);
std::vector<LapPiece> piece_deltas(const Lap& a, const Lap& b, const Mesh& mesh,
                                   const std::vector<CornerSpan>& corners);

struct Comparison {
  struct Entry {
    LapRun run;
    double delta_to_best_s;
    TimeSplit split;               // against the track's best config
    std::vector<LapPiece> pieces;  // against the track's best config
  };
  struct PerTrack {
    std::vector<Entry> entries;  // in the order of `configs`
    std::size_t best;            // index into entries
    std::size_t runner_up;       // the second best (== best with one config)
    double margin_s;             // second best minus best (0 with one config)
  };
  std::vector<std::size_t> configs;  // indices into the car's configs
  std::vector<PerTrack> tracks;      // in the order of the circuits
};

/// Every config of `configs` (indices into car.configs) round every circuit. A car that breaks a
/// rule or no configs are an InvalidInput.
Comparison compare(const Car& car, const std::vector<std::size_t>& configs,
                   const std::vector<Circuit>& circuits, unsigned threads);

/// Cumulative time delta of `b` against `a` at every mesh point: t_b(s) - t_a(s).
std::vector<double> delta_trace(const Lap& a, const Lap& b);

}  // namespace lapwing
