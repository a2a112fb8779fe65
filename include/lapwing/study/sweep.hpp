// A sweep: many laps over any values of a car (README, "Sweep"). The sets (--set KEY=VALUES),
// the design that turns them into points (a full grid, a Latin hypercube, a Sobol sequence), the
// shards a cluster splits the points into, and the run over a thread pool that hands finished
// points to a sink (the results store) in point order, so that what is stored does not depend on
// the thread count. The study layer knows no files: a point's car comes from a callback (the
// command line applies the values to the car's file and loads it like any car file).
#pragma once

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

/// One --set KEY=VALUES: a list `a,b,c` or a range `start:stop:count` (`start:stop` for the
/// sampled designs). A value is a number with an optional unit ("620kg", "3.2 m2"), or, in a
/// list, a word ("axle"). The key is not checked here (the car file's schema does that).
struct SweepSet {
  std::string text;  // "KEY=VALUES" as given
  std::string key;
  bool range = false;
  std::vector<std::string> items;  // list: each value's text as given (trimmed)
  double start = 0.0, stop = 0.0;  // range: the ends, in `unit`
  int count = 0;                   // range: values on a grid (0: not given)
  std::string unit;                // the ends' unit, or the list's numbers' ("" for none)
};
/// Parses "KEY=VALUES". Bad text is an InvalidInput whose subject is "--set TEXT".
SweepSet parse_set(std::string_view text);

/// How the sets become points: the full factorial of every set's values (grid), or N points
/// sampled in the box of the ranges (lhs:N, sobol:N; lists are not allowed there).
struct SweepDesign {
  enum class Kind { grid, lhs, sobol };
  Kind kind = Kind::grid;
  std::size_t samples = 0;  // lhs, sobol
  std::string text() const;
};
/// "grid", "lhs:N" or "sobol:N" (N in [1, max_sweep_points]); InvalidInput ("--design TEXT").
SweepDesign parse_design(std::string_view text);

/// The most points one study may have (a grid is refused above it before anything runs): the run
/// keeps a list of its points and a sampled design its samples in memory (8 bytes each per
/// point and set), so 10^7 points stay below a gigabyte. Bigger studies are several studies.
inline constexpr std::size_t max_sweep_points = 10'000'000;

/// Shard K of N (K 1-based as typed): the points i with i mod N = K - 1.
struct Shard {
  std::size_t k = 1, n = 1;
  bool contains(std::size_t point) const { return point % n == k - 1; }
  std::string text() const { return std::to_string(k) + "/" + std::to_string(n); }
};
/// "K/N" with 1 <= K <= N; InvalidInput ("--shard TEXT").
Shard parse_shard(std::string_view text);

/// One set's value at a point: its number in the set's unit (none for a word) and its text as a
/// car file holds it ("620 kg").
struct SetValue {
  std::optional<double> number;
  std::string text;
};

/// The points of a study, each one value per set, in a fixed order: the grid's first set
/// varies slowest; a sampled design's points in the order drawn.
class SweepPlan {
 public:
  SweepPlan() = default;
  SweepPlan(std::vector<SweepSet> sets, SweepDesign design);
  const std::vector<SweepSet>& sets() const { return sets_; }
  const SweepDesign& design() const { return design_; }
  std::size_t points() const { return points_; }
  /// Set `s`'s value at `point`.
  SetValue value(std::size_t point, std::size_t set) const;

 private:
  std::vector<SweepSet> sets_;
  SweepDesign design_;
  std::size_t points_ = 0;
  std::vector<std::vector<SetValue>> levels_;  // grid: each set's values
  std::vector<double> samples_;                // lhs, sobol: point-major, in [0, 1)
};

/// Each set's values on a grid: a list's items, or `count` values from start to stop evenly
/// spaced (start + (stop - start) i / (count - 1)).
std::vector<SetValue> grid_values(const SweepSet& set);
/// The text a car file holds for `number` in `unit`: shortest round-trip number, a space, unit.
std::string value_text(double number, const std::string& unit);

/// n points of a Latin hypercube in [0, 1)^dims (McKay, Beckman and Conover 1979): each
/// dimension's n strata [i/n, (i+1)/n) hold one point each, in a random order, at a random place
/// in the stratum. Drawn from a 64-bit Mersenne Twister with a fixed seed and portable integer
/// arithmetic (no std distributions, whose output the standard leaves to the library), so a study
/// is the same on every machine. Point-major.
std::vector<double> latin_hypercube(std::size_t n, std::size_t dims, std::uint64_t seed);
inline constexpr std::uint64_t lhs_seed = 20240516;
/// The first n points of the Sobol sequence in [0, 1)^dims (Boost.Random's sobol, Joe and Kuo's
/// direction numbers), starting after the origin (the box's centre first). Point-major.
std::vector<double> sobol_points(std::size_t n, std::size_t dims);

/// What one lap of a point comes to (row of the results store).
struct SweepRow {
  std::size_t point, track, config;  // indices: the plan's point, the circuit, the config list
  bool ok = true;                    // false: the car cannot complete the track (message says)
  std::string message;  // why it cannot, or an ok lap's warnings ("; " between; "" for none)
  double lap_time_s = 0, top_speed_kph = 0, min_speed_kph = 0;
  double full_throttle_fraction = 0, braking_fraction = 0;
  std::optional<double> lowest_front_share_fast;  // accelerating above 200 km/h, when it does
  std::optional<WindowResult> window;             // none: the car has no balance window
};

/// Where finished points go. `has` says a point is stored already (a resumed study skips it);
/// `commit` stores the rows of whole points, in point order, as one unit.
class SweepSink {
 public:
  virtual ~SweepSink() = default;
  virtual bool has(std::size_t point) const = 0;
  virtual void commit(const std::vector<SweepRow>& rows) = 0;
};

struct SweepProgress {
  std::size_t done = 0, total = 0;  // points of this run (those left when it started)
  std::size_t laps = 0;             // laps solved so far
  double elapsed_s = 0.0;
};

struct SweepOptions {
  Shard shard;
  unsigned threads = 0;                // 0: all cores
  std::size_t points_per_commit = 64;  // fixed, so that what is stored is the same for any threads
  std::function<void(const SweepProgress&)> progress;  // after each commit
  const std::atomic<bool>* stop = nullptr;             // set: stop after the next commit
};

struct SweepOutcome {
  std::size_t in_shard = 0, skipped = 0, run = 0, laps = 0;
  bool stopped = false;
};

/// A point's car refused where its laps are set up (its Envelope: a rule that only the air or
/// the speed range can break, as a straight-line trim that would leave no downforce at some
/// speed), said with the point it came from (the plan's index).
class SweepPointInvalid : public InvalidInput {
 public:
  SweepPointInvalid(std::size_t point, const InvalidInput& e) : InvalidInput(e), point_(point) {}
  std::size_t point() const { return point_; }

 private:
  std::size_t point_;
};

/// Runs the plan's points of the shard that the sink does not hold: for each point the car
/// `car_at(point)` (a valid car), each config of `configs` (names of its configs) round each
/// circuit. A car that cannot complete a track is a row with ok = false; a car refused when its
/// laps are set up stops the run as SweepPointInvalid; any other error stops it as it is (rows
/// committed so far stay).
SweepOutcome run_sweep(const SweepPlan& plan, const std::vector<Circuit>& circuits,
                       const std::vector<std::string>& configs,
                       const std::function<Car(std::size_t point)>& car_at, SweepSink& sink,
                       const SweepOptions& options);

}  // namespace lapwing
