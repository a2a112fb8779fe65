// The axle model's accelerations on a level straight in still air, tabulated over u = v^2 once
// per Envelope, so that the sweeps read a braking zone or a traction-limited launch from a table
// instead of solving the load-transfer fixed point at every stage (docs/performance.md, "Speed
// targets and where the time goes"). There the accelerations depend on u alone. Each cell of the
// table is the cubic through the four nearest nodes, kept only where its nodes' fourth differences
// are small or it matches the model at the cell's middle to within `tolerance_mps2` (and its
// neighbours' too); elsewhere (a kink where the binding axle changes, the breaks of a ride-height
// map's speeds) the caller asks the model itself. The answers stay the model's to 3e-8 m/s^2, a few
// billionths of a braking deceleration (6e-8 with a ride-height map: `map_tolerance_mps2`).
#pragma once

#include <array>
#include <cstddef>
#include <functional>
#include <memory>
#include <mutex>
#include <vector>

namespace lapwing {

class Envelope;

/// A function of x >= 0 on a uniform grid, one cubic per cell (x_i = i h); cells that failed
/// the check at build hold none (at() says false there).
class CellCubics {
 public:
  CellCubics() = default;
  /// Cubics from node values f(i h), i = 0..n-1 (n >= 4): cell i's the cubic through the four
  /// nodes nearest it (i-1..i+2, shifted inwards at the ends). With `screen`, a cell whose
  /// nodes' fourth differences are small is kept as it is (level_tables.cpp); for the others
  /// `exact_mid(i)` is f at the middle of cell i, and a cell whose cubic misses it by more than a
  /// quarter of `tolerance` goes, with its two neighbours (their stencils share the cell's
  /// nodes). `exact_mid` is asked in increasing order of i, for only the cells the screen leaves
  /// (every cell without it): where it carries state from call to call (the model's Newton hints),
  /// its answers depend on which cells were asked, to the model's rounding. The screen cannot see
  /// what leaves every node alike (a bump narrower than a cell, or a cell's middle without a
  /// value where its nodes have one): the builds leave it off where the Envelope has a
  /// ride-height map, whose joins every 0.5 m/s can fall several to a few cells.
  CellCubics(const std::vector<double>& nodes, double h, double tolerance,
             const std::function<double(std::size_t)>& exact_mid, bool screen = true);

  bool empty() const { return cells_.empty(); }
  /// Cell i's cubic in t = x / h - i (monomial coefficients), or nullptr where it has none.
  const std::array<double, 4>* cubic(std::size_t i) const {
    return i < cells_.size() && cells_[i][0] == cells_[i][0] ? &cells_[i] : nullptr;
  }
  std::size_t cells() const { return cells_.size(); }
  std::size_t kept_cells() const;
  /// Cells whose middle the build asked `exact_mid` for (the others were sure from their
  /// nodes' fourth differences: level_tables.cpp).
  std::size_t mid_checks() const { return mid_checks_; }
  /// f(x) by its cell's cubic into `out`; false outside the grid or in a cell without one.
  [[gnu::always_inline]] bool at(double x, double& out) const {
    const double f = x * inv_h_;
    if (!(f >= 0.0 && f < top_)) return false;
    const std::size_t i = static_cast<std::size_t>(f);
    const std::array<double, 4>& c = cells_[i];
    if (!(c[0] == c[0])) return false;  // NaN: no cubic here
    const double t = f - static_cast<double>(i);
    out = c[0] + t * (c[1] + t * (c[2] + t * c[3]));
    return true;
  }

 private:
  std::vector<std::array<double, 4>> cells_;  // monomial coefficients in t = x / h - i
  double inv_h_ = 0.0, top_ = 0.0;
  std::size_t mid_checks_ = 0;
};

/// The sweeps' step itself on a level straight in still air, tabulated over the speed squared
/// at the step's start for one step length h (solve/solver.cpp): there the step's end depends
/// on its start alone, so a step is one cubic read instead of two readings of the model and an
/// exponential (docs/performance.md, "Straight steps from a table"). Built by the sweeps on the
/// first lap of an Envelope and a mesh step that has enough straight steps to pay for it.
struct StepTables {
  /// Cells over [0, the Envelope's top speed squared]. The drive table's cells at the engine's
  /// gear changes go without a cubic (58 of 1 024 for the bench car): fewer, wider cells would
  /// leave wider stretches of speed to the integrator.
  static constexpr std::size_t cell_count = 1024;
  /// The build keeps a cell whose cubic meets the step at the cell's middle to a quarter of
  /// `check_per_m` x h (in u = v^2, m^2/s^2), with its neighbours (CellCubics).
  static constexpr double check_per_m = 1e-6;
  /// What a kept cell holds the step to anywhere in it (m^2/s^2 per metre of step). The step
  /// is not smooth at this level (the Envelope's rows are linear in u between rows 1/8000 of
  /// the range apart, and the step's secant reads across them), so a cell's middle does not
  /// bound its error as it would for a smooth function: measured 1.7e-6 at most at 40,000
  /// speeds per table (tests/solve/level_tables_test.cpp: the bundled cars, three step
  /// lengths). As an acceleration over the step (u1 - u0 = 2 a h) that is 2e-6 m/s^2, a
  /// ten-millionth of a braking deceleration; measured on every bundled case it moves no lap
  /// time by more than 1e-10 (docs/performance.md, "Straight steps from a table").
  static constexpr double tolerance_per_m = 4e-6;
  double h = 0.0;                          // the step length (m) the tables are of
  CellCubics drive, drive_trimmed, brake;  // u at the step's end from u at its start
  /// |d(u)/dx| over the tables at most (m/s^2 x 2), as the build's readings of the model find
  /// it (each node's step and each checked cell's middle step, at u and a secant's reach on)
  /// with a quarter to spare: the step reads the model no further than h times this from its
  /// start, so a step whose limit is that far above it does not meet the limit. An estimate, not
  /// a proof: a torque curve's spike narrower than a cell can rise above it unread (a second
  /// reader's invented curve, a 30 rpm peak of 900 N m: |f| 42.07 against this 40.08), as it can
  /// escape the cells' own checks; a step there may be read from the table where the model's
  /// secant would have been taken on the limit's other side (measured: laps with and without
  /// the tables within 2e-9 of each other on that car).
  double slope_bound = 0.0;
};

/// The step tables of one Envelope, by step length: built once by whichever lap asks first
/// (the content depends on the Envelope and h alone, so which thread builds it does not
/// matter), shared by the Envelope's copies.
class StepTableCache {
 public:
  /// The tables for step h: the cached ones, or `build()`'s, kept while fewer than
  /// `max_kept` step lengths are.
  std::shared_ptr<const StepTables> get(double h, const std::function<StepTables()>& build);
  static constexpr std::size_t max_kept = 16;
  /// Step lengths kept.
  std::size_t kept();

 private:
  std::mutex mutex_;
  std::vector<std::shared_ptr<const StepTables>> kept_;
};

/// The straight-line tables of an axle-model Envelope (level road, still air, curvature 0).
struct LevelTables {
  /// Agreement with the model asked of every kept cell (m/s^2): thirty times the fixed point's
  /// own tolerance (axle.cpp, 1e-9 m/s^2), and about the ripple the Envelope's rows (linear in
  /// u between rows 1/8000 of the range apart) leave in the model's answers where an aero
  /// coefficient varies with speed (measured: up to 1.3e-8 m/s^2 between the cubics and the
  /// model, Pellion FR-2 medium_table). Against braking and drive of several m/s^2 it moves a
  /// lap time by some 1e-11 (tools/lap-times, all bundled cases).
  static constexpr double tolerance_mps2 = 3e-8;
  /// How far from the model a table of a config with a ride-height map may read between the
  /// build's checks (m/s^2): the map's operating point is solved every 0.5 m/s and joined by
  /// straight lines, and a join inside a cell kinks the model where the cell's middle, the one
  /// point the build checks there, can miss the worst of it. Measured: 2.3e-8 at 4 000 speeds a
  /// table, 4.4e-8 at 40 000 and 4.6e-8 at 400 000 (the Pellion FR-2's high_map, drive, with
  /// all-wheel drive; 4.2e-8 with front drive, 1.1e-8 with rear: a second reader's figures at
  /// 4e6 speeds, 4.61e-8 at most); this bound keeps a quarter to spare. Still some 1e-8 of a
  /// braking deceleration, and some sixteen times under held_margin (solver.cpp, 1e-6).
  static constexpr double map_tolerance_mps2 = 6e-8;
  /// Cells over [0, the Envelope's top speed squared]: `cell_count` where the aero coefficients
  /// are the same at every speed (a constant or a parts-table config, with or without its
  /// straight-line trim), `fine_cell_count` where they vary with speed (a speed table; a
  /// ride-height map, whose operating point is solved every 0.5 m/s). The first are smooth here
  /// but for a kink where the binding axle changes: with 256 cells their largest miss is 9.2e-10
  /// m/s^2 (2.6e-10 with 1 024), at least 251 cells of 256 kept
  /// (tests/solve/level_tables_test.cpp, 4 000 speeds per table, every bundled car; measured
  /// 2026-12-05). Coefficients over speed are joined by straight lines, and each join is a kink
  /// (a map's every 0.5 m/s): with 256 cells (dv up to some 0.3 m/s at the top speed) a speed
  /// table's kept cells fell to 84 % (the Pellion FR-2's medium_table), a map's joins would
  /// fall in most of them; those Envelopes keep 1 024 cells. So does a table whose 256 cells
  /// keep fewer than `min_kept_share` of them: a car far from the bundled ones can bend more
  /// (a second reader's Pellion FR-2 with a load sensitivity of 0.95 and a ClA of 12 m^2 kept 65
  /// to 94 % of 256 cells, 93 to 99.5 % of 1 024), and a dropped cell is the model's work at
  /// every step in its speed range.
  static constexpr std::size_t cell_count = 256;
  static constexpr std::size_t fine_cell_count = 1024;
  static constexpr double min_kept_share = 0.95;
  CellCubics brake;         // axle_brake_accel
  CellCubics grip;          // axle_drive_accel with no limit from the engine, untrimmed rows
  CellCubics grip_trimmed;  // the same on the straight-line trim's rows (empty without one)

  /// The steady grip limit of a level turn in still air. Tabulated the other way round: the
  /// largest lateral acceleration A(u) = u |kappa| the tyres hold in a steady turn at speed
  /// squared u (axle_steady_excess <= 0), smooth in u where the speed at a given curvature is
  /// not (it grows without bound towards the curvature at which downforce alone would hold the
  /// car), in `lateral_cell_count` cells up to the top speed squared; nodes solved to 50 bits.
  /// The grip limit at |kappa| is then the highest u with A(u) >= |kappa| u: the node where
  /// that changes sign by bisection, the cell's cubic by a safeguarded Newton iteration. An
  /// error dA moves u by dA / (|kappa| - A'(u)), u times dA / A(0) for A affine in u: a share of
  /// the speed that does not grow where the speed does.
  static constexpr std::size_t lateral_cell_count = 256;
  static constexpr double lateral_tolerance_mps2 = 1e-8;
  /// The share the table's speed is moved to the feasible side by (and half the agreement asked
  /// of it with the model's limit): several times what lateral_tolerance_mps2 moves it by at
  /// most (dA / (2 A(0)), some 4e-10 for the bundled cars, A(0) at 12 to 16 m/s^2).
  static constexpr double steady_speed_share = 2e-9;
  CellCubics lateral_limit;
  std::vector<double> lateral_nodes;  // A(u) at the nodes, u = i lateral_du
  double lateral_du = 0.0;
  /// Whether A(u_i) / u_i falls from node to node (by more than rounding: 1e-12 of itself) over
  /// nodes 1 to the last, so that at any |kappa| the nodes where A(u) >= |kappa| u are the
  /// ones up to a single last node: then that node can be looked for from a guess and is the
  /// one the bisection finds (the bundled cars: the grip grows slower than u).
  bool lateral_falls = false;
  /// The grip limit at |kappa| into `v`; false where the table does not settle it: a straight,
  /// a limit at the top speed or below the first node's, or in a cell without a cubic (the
  /// caller searches). `cell` (optional): a node to look at first (with its neighbours) when
  /// the nodes fall (lateral_falls: the same node, to the bit, as without it), the steady
  /// limits' guess's (extrapolated along a clothoid: within a node or two); set to this call's.
  bool steady_grip_speed(double abs_curvature, double& v, std::size_t* cell = nullptr) const;
  /// Whether the steady usage at the top speed grows with the curvature: no tyre there can
  /// reach the mu floor (each axle's load at the top speed, all of it on one tyre, below
  /// TyreModel::floor_onset_load_n), so that every tyre's peak force is concave in its load and
  /// moving load to the outer tyre never adds capacity. Not so for a car whose tyres run beyond
  /// it (a second reader's invented car with load sensitivity 0.99 and its rear tyres at four
  /// times their nominal load: its usage at the top speed falls again over a band of
  /// curvatures, as the inner tyre comes off the floor).
  bool top_usage_grows = false;
  /// Whether the tyres surely hold the car at the top speed (the Envelope's max_speed_mps, whose
  /// square is the top node's u) at |kappa|: the usage there grows with the lateral demand
  /// (top_usage_grows: more demand, more load moved to the outer tyre, less capacity), and the
  /// top node's A(u), the feasible end of its search, is above kappa u by more than 1e-12 of it.
  /// The steady limits' search at that point would then find its usage at the top speed at most
  /// 1 and answer the top speed: the same answer without the search. Otherwise false (the
  /// search decides). A surveyed or logged centerline's near-straights (no point of curvature
  /// 0, each point its own) are such points.
  bool grip_holds_at_top(double abs_curvature) const {
    if (!top_usage_grows || lateral_nodes.empty()) return false;
    const std::size_t n = lateral_nodes.size() - 1;
    const double demand = abs_curvature * (static_cast<double>(n) * lateral_du);
    return demand * (1.0 + 1e-12) < lateral_nodes[n];
  }

  /// The step tables by step length (built by the sweeps, solve/solver.cpp).
  std::shared_ptr<StepTableCache> steps = std::make_shared<StepTableCache>();
};

/// Builds the tables from the model (solve/axle.hpp) over the Envelope's speed range.
LevelTables build_level_tables(const Envelope& env);

}  // namespace lapwing
