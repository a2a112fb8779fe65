#include "lapwing/study/compare.hpp"

#include "lapwing/base/error.hpp"
#include "lapwing/study/thread_pool.hpp"

namespace lapwing {

namespace {

// Which piece of the lap an interval [i, i+1] belongs to: the index of the corner containing
// it, or -1.
std::vector<int> corner_of_interval(const Mesh& mesh, const std::vector<CornerSpan>& corners) {
  std::vector<int> owner(mesh.intervals(), -1);
  for (std::size_t k = 0; k < corners.size(); ++k)
    for (std::size_t i = corners[k].start; i < corners[k].end; ++i) owner[i] = static_cast<int>(k);
  return owner;
}

double interval_time(const Lap& lap, std::size_t i) {
  return lap.time_s[i + 1] - lap.time_s[i];
}

}  // namespace

TimeSplit split_delta(const Lap& a, const Lap& b, const Mesh& mesh,
                      const std::vector<CornerSpan>& corners) {
  const std::vector<int> owner = corner_of_interval(mesh, corners);
  TimeSplit s;
  for (std::size_t i = 0; i < mesh.intervals(); ++i) {
    const double d = interval_time(b, i) - interval_time(a, i);
    auto brakes = [i](const Lap& l) {
      return l.phase[i] == Phase::brake || l.phase[i + 1] == Phase::brake;
    };
    if (owner[i] >= 0)
      s.corners_s += d;
    else if (brakes(a) || brakes(b))
      s.braking_s += d;
    else
      s.straights_s += d;
  }
  return s;
}

std::vector<LapPiece> piece_deltas(const Lap& a, const Lap& b, const Mesh& mesh,
                                   const std::vector<CornerSpan>& corners) {
  std::vector<LapPiece> out;
  auto add = [&](PieceKind kind, int id, std::size_t from, std::size_t to) {
    if (to <= from) return;
    out.push_back({kind, id, mesh.s_m[from], mesh.s_m[to],
                   (b.time_s[to] - b.time_s[from]) - (a.time_s[to] - a.time_s[from])});
  };
  std::size_t at = 0;
  for (const auto& c : corners) {
    add(PieceKind::straight, c.id, at, c.start);  // the straight leading to corner c
    add(PieceKind::corner, c.id, c.start, c.end);
    at = c.end;
  }
  add(PieceKind::straight, 0, at, mesh.size() - 1);  // to the line
  return out;
}

std::vector<double> delta_trace(const Lap& a, const Lap& b) {
  std::vector<double> d(a.time_s.size());
  for (std::size_t i = 0; i < d.size(); ++i) d[i] = b.time_s[i] - a.time_s[i];
  return d;
}

Comparison compare(const Car& car, const std::vector<std::size_t>& configs,
                   const std::vector<Circuit>& circuits, unsigned threads) {
  require_valid(car.validate(), car.subject());
  require_valid(configs_violation(car, configs), "compare");
  const std::size_t nc = configs.size(), nt = circuits.size();
  std::vector<LapRun> runs(nc * nt);
  std::vector<ConfiguredCar> cars;
  for (std::size_t c : configs) cars.push_back(car.configured(c));
  parallel_for(runs.size(), threads, [&](std::size_t k, LapSolver& solver) {
    try {
      runs[k] = run_lap(cars[k % nc], circuits[k / nc], solver);
    } catch (const CannotMove& e) {
      const Track& track = circuits[k / nc].track;
      throw cannot_move_in(e, track.name, track.file, cars[k % nc].aero().name);
    }
  });
  Comparison out;
  out.configs = configs;
  for (std::size_t t = 0; t < nt; ++t) {
    Comparison::PerTrack pt;
    std::size_t best = 0;
    for (std::size_t c = 1; c < nc; ++c)
      if (runs[t * nc + c].summary.lap_time_s < runs[t * nc + best].summary.lap_time_s) best = c;
    pt.best = best;
    const LapRun& ref = runs[t * nc + best];
    double second = 0.0;
    bool have_second = false;
    pt.runner_up = best;
    for (std::size_t c = 0; c < nc; ++c) {
      const LapRun& r = runs[t * nc + c];
      Comparison::Entry e;
      e.delta_to_best_s = r.summary.lap_time_s - ref.summary.lap_time_s;
      e.split = split_delta(ref.lap, r.lap, circuits[t].mesh, circuits[t].corners);
      e.pieces = piece_deltas(ref.lap, r.lap, circuits[t].mesh, circuits[t].corners);
      if (c != best && (!have_second || e.delta_to_best_s < second)) {
        second = e.delta_to_best_s;
        have_second = true;
        pt.runner_up = c;
      }
      pt.entries.push_back(std::move(e));
    }
    // Moved only now: every entry above read the best lap.
    for (std::size_t c = 0; c < nc; ++c) pt.entries[c].run = std::move(runs[t * nc + c]);
    pt.margin_s = have_second ? second : 0.0;
    out.tracks.push_back(std::move(pt));
  }
  return out;
}

}  // namespace lapwing
