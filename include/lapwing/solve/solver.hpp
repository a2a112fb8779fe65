// The quasi-steady lap (README, "Physics and assumptions", speed profile): a steady speed limit
// at every mesh point, a forward sweep under drive, a backward sweep under braking, the speed
// their minimum; for a point mass on a fixed path that is the minimum-time profile (Velenis and
// Tsiotras, J. Optimization Theory and Applications 138 (2008)).
#pragma once

#include <array>
#include <cstdint>
#include <memory>
#include <string_view>
#include <vector>

#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/level_tables.hpp"

namespace lapwing {

enum class Phase : std::uint8_t { accelerate, brake, corner, shift, top_speed };
std::string_view phase_name(Phase p);

/// Why the steady speed at a point is what it is: the tyres, the engine, or (axle model) an
/// axle's load at a_x = 0 reaching zero (the drag moment and the aero balance lift it: faster,
/// the car would pitch over on that axle).
enum class SteadyLimit : std::uint8_t { grip, engine, front_lift, rear_lift };
constexpr bool lift_limit(SteadyLimit l) {
  return l == SteadyLimit::front_lift || l == SteadyLimit::rear_lift;
}

/// A point whose speed is within this share of its steady limit is on that limit, whichever
/// sweep set it (0.05 km/h at 100 km/h; the corner table's tie, summary.cpp): a limit that
/// ripples with the curvature (a surveyed centerline's, to 1e-6 of itself) has the sweeps follow
/// it by tiny accelerations and decelerations, and those points read `accelerate` and `brake`
/// (a circle lapped at 116.18 km/h read 66 % full throttle with a 1e-6 ripple, 0 % without).
inline constexpr double phase_on_limit = 5e-4;

/// Whether a point's speed v counts as on its steady limit for the phases (classify_phase):
/// within phase_on_limit of it or above it, where the forward sweep sets the speed (above: a
/// car slowing at full drive towards the engine's limit from above, README, "Physics and
/// assumptions"); where the backward sweep sets it (`braking`), only where the forward sweep's
/// speed there (`forward`) is within phase_on_limit of the limit too (both sweeps following a
/// limit that ripples), not where the car brakes from a speed above it (a downhill's, down
/// through the engine's limit of the level road after it).
constexpr bool on_limit_for_phase(double v, double steady, bool braking, double forward) {
  return v >= steady * (1.0 - phase_on_limit) &&
         (!braking || forward <= steady * (1.0 + phase_on_limit));
}

/// The phase at a point, the one classification: on the steady limit (`on_limit`: within
/// phase_on_limit of it), `corner` when the tyres set that limit and `top_speed` when the engine
/// or an axle's lift does (the most the car can hold on that road under drive); else `brake` where
/// the backward sweep is the slower (`braking`); else `shift` where the drive was cut for an
/// upshift; else `accelerate`.
constexpr Phase classify_phase(bool on_limit, bool braking, SteadyLimit limit, bool cut) {
  if (on_limit) return limit == SteadyLimit::grip ? Phase::corner : Phase::top_speed;
  if (braking) return Phase::brake;
  return cut ? Phase::shift : Phase::accelerate;
}
/// Full drive: the engine's whole drive applied (accelerate, top_speed). Not a shift: its
/// drive is cut. The lap's full-throttle share counts these.
constexpr bool full_drive(Phase p) {
  return p == Phase::accelerate || p == Phase::top_speed;
}
/// Under drive: the forward sweep sets the speed with the driver on the throttle, at full drive
/// or in an upshift's cut (the shift test). The straight-line trim stays deployed through the
/// cut, as the sweep reads its rows.
constexpr bool under_drive(Phase p) {
  return full_drive(p) || p == Phase::shift;
}
/// On a steady limit: the speed the tyres (corner) or the engine or an axle's lift (top_speed)
/// can hold.
constexpr bool on_steady_limit(Phase p) {
  return p == Phase::corner || p == Phase::top_speed;
}

/// The steady limits along the mesh: the highest speed the car can hold at each point.
struct SteadyProfile {
  std::vector<double> speed_mps;
  std::vector<SteadyLimit> limit;
};

/// Steady speed at every mesh point: the highest v at which the tyres hold the lateral demand
/// m v^2 |kappa| together with the longitudinal force that keeps v against drag, rolling
/// resistance and grade (friction ellipse), and at which the engine can supply that force
/// (toms748 bracketing root finder, Boost.Math).
SteadyProfile steady_profile(const Envelope& env, const Mesh& mesh);
/// The highest speed the tyres hold on a level straight in still air (the steady grip limit at
/// curvature 0, as steady_profile finds it): where the driven axle (axle model) or the four
/// tyres (point mass) can just carry the resistance, drag + rolling resistance, at a_x = 0.
/// max_speed_mps() where they carry it all the way to the tables' top. On the straight-line
/// trim's rows where the config has one (as top_speed_level_mps).
double level_traction_speed_mps(const Envelope& env);
/// The axle model's lift limit on a level straight in still air (as steady_profile finds it):
/// the highest speed at which both axle loads at a_x = 0 stay above zero (model/loads.hpp,
/// axle_loads: front = W f + DF bal - D z_D / L), and the axle that lifts beyond it. Faster
/// than that the car cannot hold its speed: the drag moment (or the aero balance) would pitch
/// it over. {max_speed_mps(), grip} where neither axle lifts up to the tables' top, and for the
/// point mass, whose four tyres share the load equally.
struct LevelLift {
  double speed_mps;
  SteadyLimit axle;  // front_lift, rear_lift, or grip for none
};
LevelLift level_lift_speed(const Envelope& env);
/// The same, into `out` (its storage reused). The mesh's two halves are each solved from a fresh
/// start (the root searches' guesses are not carried across the middle), as a lap on two
/// threads solves them (LapSolver::set_threads): the same limits.
void steady_profile(const Envelope& env, const Mesh& mesh, SteadyProfile& out);

/// How a sweep steps u = v^2 from one mesh point to the next (d(v^2)/ds = 2 a(v^2, kappa(s))).
///  - rk4: classical fourth-order Runge-Kutta, four evaluations of the acceleration per step; a
///    step whose stages meet the steady limit, or where z = step x d(du/ds)/du is beyond 1 in
///    size (near the grip limit), is taken again in substeps. The default until the speed work of
///    issue 15; kept for cross-checks (`lapwing_bench --integrator rk4 --convergence`).
///  - exponential (the default): an exponential Rosenbrock-type step, two evaluations per step
///    (one where the step starts on its limit and ends above it). The slope is linearised at the
///    step's midpoint in s, f(u) ~ f_m + J (u - u0), J = df/du by a difference, and the linear
///    equation solved exactly over the step: u1 = u0 + h phi1(h J) f_m, phi1(z) = (e^z - 1) / z.
///    Exact where the acceleration is affine in v^2 on a step of constant curvature (the drive
///    against drag on a straight), stable for any negative z, second order in the step elsewhere
///    (solver.cpp gives the derivation; tests/solve/solver_test.cpp the convergence).
enum class Integrator : std::uint8_t { rk4, exponential };
/// The sweeps' step where none is asked for. The exponential step: as accurate as RK4 at every
/// mesh tried (README, "Performance": the mesh's error, from limits met between points, shift
/// points and curvature kinks, dominates both) for about 30 % fewer instructions in the sweeps.
inline constexpr Integrator default_integrator = Integrator::exponential;

/// Integrates u = v^2 along the mesh in one direction: forward under drive (with the drive cut
/// for shift_time after each upshift), backward under braking. Every point is clipped to
/// `limit` (one value a mesh point). `start` is the mesh index to begin at and `v_start` its
/// speed; closed meshes wrap, and their last point is their first (start n-1 is start 0).
/// Throws std::invalid_argument where `limit` is not one value a point, std::out_of_range
/// where `start` is not a point of the mesh.
/// `cut[i]` is set where the drive was cut for a shift over the step that reached i (forward
/// only).
/// `gear[i]` is the gear engaged on reaching i (forward only). A backward sweep leaves `cut`
/// and `gear` empty.
enum class Sweep { forward, backward };
struct SweepResult {
  std::vector<double> speed_mps;
  std::vector<std::uint8_t> cut;  // forward only (empty backward)
  std::vector<int>
      gear;  // gear engaged (forward only, empty backward; 0 for an ideal transmission)
};
SweepResult sweep(const Envelope& env, const Mesh& mesh, Sweep direction,
                  const std::vector<double>& limit, std::size_t start, double v_start,
                  Integrator integrator = default_integrator);

/// Where the forward sweep of a closed lap from its start i0 (the slowest steady point) splits
/// in two: the steps of its first part, or the period (mesh.size() - 1: every step) for none.
/// The second part starts afresh at the point those steps reach, on its limit there, and is
/// taken where the first part arrives on its limit with no drive cut left to run (else it goes
/// on): the same speeds to the axle model's tolerance, from a start that needs nothing of the
/// first part, so that on two threads it runs beside the backward sweep (LapSolver). The point
/// is the slowest steady point 80 to 90 % of the way round to which the limit falls from the
/// point before (a corner's apex, or the first point of its arc), where the first part likely
/// arrives held on its limit. Open meshes, meshes of under 2 000 points, meshes where fewer
/// than half the points have the curvature of the point before (a surveyed or logged
/// centerline, whose rippling limit makes the backward sweep the longer) and laps with no such
/// point keep the sweep whole. It depends on the mesh and the limits alone, never on threads.
/// Throws std::invalid_argument where `steady` is not one value a point, std::out_of_range
/// where i0 is not a point of a closed mesh's period.
std::size_t forward_split(const Mesh& mesh, const std::vector<double>& steady, std::size_t i0);
/// The same for the backward sweep from i0 (its steps run backward round the lap), on the
/// meshes the forward sweep keeps whole for their curvature (fewer than half the points repeat
/// the curvature of the point before: a surveyed or logged centerline, where the backward sweep
/// brakes at every ripple of the limit and is the longer): the slowest steady point 80 to 90 %
/// of its way round to which the limit falls from the point after it (its point before), the
/// second part beside the forward sweep on the first thread. Throws as forward_split.
/// (A closed mesh with fewer than 2 000 level straight steps, a fitted centerline or a graded
/// circuit, takes its sweeps one after the other instead, each split near half way; see
/// docs/performance.md, "The backward sweep over the stretches above the forward one".
/// LapSolver without its quick steps keeps the splits above.)
std::size_t backward_split(const Mesh& mesh, const std::vector<double>& steady, std::size_t i0);

/// The exponential step on a level straight in still air with no limit near: u = v^2 a step h
/// on from u0, forward under full drive (on the straight-line trim's rows where `trimmed`) or
/// backward under braking, as the sweeps take it there. What the step tables hold.
double free_straight_step(const Envelope& env, double u0, double h, Sweep direction,
                          bool trimmed = false);
/// The step tables (level_tables.hpp) of an axle-model Envelope with straight-line tables for
/// step h: free_straight_step over u0 in [0, the Envelope's top speed squared].
StepTables build_step_tables(const Envelope& env, double h);

/// A solved lap: one entry per mesh point (SI units).
struct Lap {
  std::vector<double> speed_mps, time_s, long_accel_mps2, lat_accel_mps2;
  std::vector<int> gear;
  std::vector<double> engine_radps, drag_n, downforce_n, front_load_n, rear_load_n;
  std::vector<double> aero_balance_eff;         // front share of the aero load with the drag moment
                                                // (NaN where there is no downforce)
  std::vector<double> front_usage, rear_usage;  // each axle's friction-ellipse usage (1: limit)
  std::vector<Phase> phase;
  std::vector<std::uint8_t> trimmed;  // straight-line trim in use
  double lap_time_s = 0.0;
  // Where the speed is held on an axle's lift limit (SteadyLimit::front_lift or rear_lift: the
  // axle has no load left at a_x = 0, phase top_speed): the first such point, the distance
  // held (m: each interval's half at each end, as the lap's shares count), and the axle (the
  // first point's). `held` false: nowhere.
  struct LiftHold {
    bool held = false, front = true;
    std::size_t first = 0;
    double length_m = 0.0;
  };
  LiftHold lift_hold;
  bool has_channels = false;  // accelerations, gear, forces, loads, usage filled
  bool has_loads = false;     // accelerations, forces, loads and trim filled (ChannelSet::loads)
  // The accelerations, aero forces and axle loads are filled where the speed is at least this,
  // NaN below it (LapSolver::add_channels' `loads_above_mps`; 0: everywhere). The trim, always.
  double loads_above_mps = 0.0;
  // The longitudinal acceleration and the axle loads only at a sweep's row's points, NaN at the
  // other points above the floor (LapSolver::add_row_loads), and so the aero forces; the
  // lateral acceleration and the trim as with `loads_above_mps`.
  bool row_loads = false;
};

/// The front axle's share of the load at point i of a lap with channels: its load over both
/// axles'. Worked where it is read from the two loads the lap holds, not stored beside them.
inline double front_share(const Lap& lap, std::size_t i) {
  return lap.front_load_n[i] / (lap.front_load_n[i] + lap.rear_load_n[i]);
}

/// What a channels pass fills: every channel, or the loads alone (accelerations, forces, axle
/// loads and the trim in use: what the front share, the balance window and the time shares
/// read), without the gear and engine speed, the axles' usage and the aero balance with the drag
/// moment. A study that keeps only those figures (a sweep's rows) saves the ellipse's powers.
enum class ChannelSet { all, loads };

/// The points whose axle loads a sweep's row reads (LapSolver::add_row_loads): under full drive
/// above `drive_above_mps` (the lowest front share at speed) and where the lateral acceleration
/// exceeds `turning_mps2` above `turning_above_mps` (the balance window's points; infinity: no
/// window). summary_row_loads (summary.hpp) makes it from the car.
struct RowLoads {
  double drive_above_mps = 0.0;
  double turning_above_mps = 0.0;
  double turning_mps2 = 0.0;
};

/// Solves one lap. Closed meshes are periodic (both sweeps start at the slowest steady point);
/// open ones start at `start_speed_mps` and end free. Throws CannotMove when the car cannot
/// complete the track.
Lap solve_lap(const Envelope& env, const Mesh& mesh, double start_speed_mps = 0.0,
              Integrator integrator = default_integrator);

class SecondThread;  // base/halves.hpp: the second thread of a lap on two

/// Solves laps one after another, reusing its buffers (the lap, both sweeps), so that a study
/// of many laps allocates once. The working state of a lap, kept apart from the Envelope and
/// the Mesh it reads. One per thread.
class LapSolver {
 public:
  /// A solver whose sweeps step with `integrator`. The exponential step's sweeps take some
  /// steps without it where its answer is known (`quick_steps`): straight steps from the step
  /// tables (StepTables) where a mesh has enough of them, and backward steps held on their
  /// limit. `quick_steps` false takes every step (a check of the quick ones).
  explicit LapSolver(Integrator integrator = default_integrator, bool quick_steps = true);
  ~LapSolver();
  LapSolver(LapSolver&&) noexcept;
  LapSolver& operator=(LapSolver&&) noexcept;
  Integrator integrator() const { return integrator_; }
  /// Threads one lap may use: 1 (the default: a solver in a pool of threads, one lap each) or 2
  /// (more count as 2): then, on a mesh of 2 000 points or more, the two sweeps run side by side,
  /// and the two halves of the steady limits and of the channels pass too. The lap is the same bit
  /// for bit whatever the number. For a lap solved alone (lapwing run, the racing line's laps).
  /// The second thread starts with the first lap that uses it and lives as long as the solver.
  void set_threads(unsigned threads) { threads_ = threads; }
  unsigned threads() const { return threads_; }
  /// How a closed lap's two sweeps are taken on a level track of segments (its straight steps
  /// read from the step tables: many_straight_steps), where either way is the lap:
  ///  - side_by_side (the default: a lap solved alone): both sweeps in lockstep, on two threads
  ///    each split in two parts that run beside the other sweep's (sweep_apart), the quicker
  ///    way for one lap on two threads;
  ///  - phases (a study's laps, parallel_for): the forward sweep first, then the backward sweep
  ///    beside its final speeds, stepping at once over the stretches where it stands above them
  ///    (sweep_phases), the quicker way for a lap on one thread
  ///    (docs/performance.md, "A study's laps in two phases").
  /// Other closed laps (a fitted centerline, a graded circuit: few straight steps) take the
  /// phases either way, open ones side by side. The two ways give the same lap to the axle
  /// model's tolerance, not always to the bit (its solves start from other hints): some 1e-14
  /// relative in lap time (README, "Limitations and cautions": a car that hunts between gears,
  /// 1.6e-6). Each is the same bit for bit on one thread or two.
  enum class Order : std::uint8_t { side_by_side, phases };
  void set_order(Order order) { order_ = order; }
  Order order() const { return order_; }
  /// The speed solve: the steady limits, both sweeps, and the speed, phase and time traces
  /// (lap_time_s). No channel is filled (has_channels false): a study that needs lap times
  /// stops here. The result stays valid until the next solve.
  const Lap& solve_speed(const Envelope& env, const Mesh& mesh, double start_speed_mps = 0.0);
  /// The channels pass over the last speed solve, which must have been on this mesh with this
  /// envelope: accelerations, gear and engine speed, trim, forces, axle loads (and so the front
  /// shares) and usage (has_channels true). Throws std::logic_error without a speed solve on the
  /// mesh.
  /// With ChannelSet::loads and `loads_above_mps` > 0, the accelerations, aero forces and axle
  /// loads are worked only where the speed is at least that, NaN below (the trim everywhere): a
  /// study that reads them only at speed (a sweep's rows: the balance window's lateral
  /// acceleration and front share above its speed, summary_loads_above_mps) skips the model's
  /// answers in the slow corners. The loads it fills are the full pass's to the model's
  /// rounding (its Newton hints go from filled point to filled point).
  const Lap& add_channels(const Envelope& env, const Mesh& mesh, ChannelSet set = ChannelSet::all,
                          double loads_above_mps = 0.0);
  /// A loads pass (ChannelSet::loads) for a sweep's row: the lateral acceleration and trim
  /// from the lower of the two speeds up, the longitudinal acceleration, the aero forces and
  /// the axle loads only at the points `want` names, NaN elsewhere (a straight's braking zone,
  /// the slow turns): the model's answers a row never reads are not asked for. Where filled, the
  /// full pass's to the model's rounding, as with `loads_above_mps` (Lap::row_loads true).
  const Lap& add_row_loads(const Envelope& env, const Mesh& mesh, const RowLoads& want);
  /// Both passes, as solve_lap: solve_speed, then add_channels.
  const Lap& solve(const Envelope& env, const Mesh& mesh, double start_speed_mps = 0.0);
  /// Both passes for a lap solved once (solve_lap), moved out: solve_speed, then
  /// take_with_channels.
  Lap solve_once(const Envelope& env, const Mesh& mesh, double start_speed_mps = 0.0);
  /// The channels pass over the last speed solve (as add_channels), the lap moved out: the
  /// solver's own state, its steady limits and both sweeps, is freed first (the lap takes the
  /// forward sweep's gears, all the channels pass reads of it), so that it is never held beside
  /// the channels (README, "Memory"). steady() is then empty; the solver may be used again (its
  /// buffers then allocate anew). Throws std::logic_error without a speed solve on the mesh.
  Lap take_with_channels(const Envelope& env, const Mesh& mesh);
  /// Moves the last lap out.
  Lap take();
  /// The steady limits of the last speed solve (working state of the solve, not part of the
  /// lap: a lap kept or written out does not carry them). Valid until the next solve.
  const SteadyProfile& steady() const { return steady_; }
  /// The highest start speed the last speed solve could hold on an open mesh: the steady limit
  /// at the first point, or for a flying start above the engine's steady limit there (the car
  /// slows to it) the tyres' and the axles' limit alone. A start above it is clipped to it, and
  /// is the track's error (run_lap).
  double start_limit_mps() const { return start_limit_mps_; }
  /// The limits the last speed solve's sweeps held each point to: its steady limits, but over
  /// the stretches where the car comes to the engine's limit faster than it (a flying start,
  /// the foot of a downhill, a trim zone's end, a steeper climb: it slows at full drive, it
  /// does not brake) the tyres' and the axles' alone (README, "Physics and assumptions").
  /// Valid until the next solve.
  const std::vector<double>& sweep_limits() const {
    return above_engine_ ? flying_.speed_mps : steady_.speed_mps;
  }
  /// The backward sweep's steps the last speed solve took at once, over its stretches above the
  /// forward sweep (docs/performance.md, "The backward sweep over the stretches above the
  /// forward one"); 0 where it took every step. A figure of the solve's work, not of the lap.
  std::size_t skipped_steps() const { return skipped_steps_; }

 private:
  /// The speed solve into lap_, its channels left as they were (has_channels false).
  void speed_pass(const Envelope& env, const Mesh& mesh, double start_speed_mps);
  /// add_channels and add_row_loads: the channels pass with its floor and its row's points,
  /// unless the lap already holds what is asked (`caller` names the one asked, in the error).
  const Lap& fill_channels(const Envelope& env, const Mesh& mesh, ChannelSet set, double floor_mps,
                           const RowLoads* row, const char* caller);
  /// The channels pass over the last speed solve, lap_.gear holding the forward sweep's gears.
  void channels_pass(const Envelope& env, const Mesh& mesh, ChannelSet set = ChannelSet::all,
                     double loads_above_mps = 0.0, const RowLoads* row = nullptr);
  /// The second thread of a lap on two, started on first use (nullptr: none yet, or one thread).
  SecondThread* second_thread(std::size_t points);
  Integrator integrator_;
  bool quick_steps_;
  unsigned threads_ = 1;
  Order order_ = Order::side_by_side;
  std::size_t skipped_steps_ = 0;
  std::unique_ptr<SecondThread> second_;
  Lap lap_;
  SteadyProfile steady_;
  // The sweeps' limits where the car comes to the engine's limit faster than it (speed_pass),
  // used only then (above_engine_).
  SteadyProfile flying_;
  bool above_engine_ = false;
  double start_limit_mps_ = 0.0;
  // The last speed solve ran to its end: false from its start, so that the channels are never
  // made from the speeds of a solve that threw part of the way (they would be an earlier lap's,
  // or a sweep's half-written ones) where the mesh's size happens to match.
  bool speed_solved_ = false;
  SweepResult forward_, backward_;
  // A closed lap's sweeps' second parts, where they split (forward_split, backward_split).
  SweepResult forward_part_, backward_part_;
  /// The double channels' storage while a speed solve leaves the lap without them
  /// (solve_speed): the next channels pass takes it back where it holds the mesh's points (and
  /// frees it where not), so that it overwrites the values instead of zero-filling a fresh
  /// buffer first (every lap of a study, docs/performance.md). Contents stale: never read.
  std::array<std::vector<double>, 10> spare_channels_;
  /// The channels in the order spare_channels_ keeps them.
  static std::array<std::vector<double>*, 10> double_channels(Lap& lap);
};

}  // namespace lapwing
