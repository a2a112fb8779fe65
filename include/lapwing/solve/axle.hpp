// Balance along the lap: the load on each axle from weight, downforce (by the aero balance), the
// drag moment, longitudinal load transfer and grade; the forces each axle must carry; how much
// of its friction ellipse each uses; and the accelerations when the axle that saturates first
// sets every limit (the `axle` vehicle model).
#pragma once

#include <optional>

#include "lapwing/model/loads.hpp"
#include "lapwing/solve/envelope.hpp"

namespace lapwing {

// The axle loads (axle_loads) and the front share of the aero load with the drag moment
// (aero_balance_with_drag_moment) have their home in model/loads.hpp.

/// What each axle carries and how much of its ellipse that uses, for a total longitudinal tyre
/// force `fx_n` (> 0 driving: on the driven axle(s), shared by load for all-wheel drive; < 0
/// braking: by brakes.front_bias) and lateral force `fy_n` in the road's plane (m a_y on a flat
/// road; front F_y l_r / L = F_y f, rear F_y (1 - f)). Usage (Fx/Fx_max)^n + (Fy/Fy_max)^n per
/// axle, each tyre's mu at its own load: the axle's load shared equally, less and plus the
/// lateral load transfer (model/loads.hpp) on the inner and outer tyre.
/// The usage an axle reads when it is asked for force with no load on it (it would lift: only
/// the point mass, which does not limit each axle, asks that): a lap that reaches it is warned
/// of (summary.hpp), and the trace carries this value there.
inline constexpr double lifted_axle_usage = 1e9;
struct AxleUsage {
  AxleLoads loads;
  double front_fx_n, rear_fx_n, front_fy_n, rear_fy_n;
  double front_usage, rear_usage;
};
AxleUsage axle_usage(const Envelope& env, const AxleLoads& loads, double fx_n, double fy_n);
/// Whether both axles surely carry what axle_usage gives them, usage <= 1 on each, told without
/// the ellipse's powers (TyreModel::surely_leaves): true only where axle_usage would read both
/// at most 1; false where it cannot tell (near the ellipse, an axle without load).
bool axle_surely_within(const Envelope& env, const AxleLoads& loads, double fx_n, double fy_n);

/// The axle model's accelerations (m/s^2) at u = v^2 on a point of curvature |k|, both positive
/// along the sweep's direction of travel:
///  - drive: the least of (drive_n - resistance) / m_eff, where the engine limits,
///    (traction - resistance) / m, where the driven axle(s) do: the traction they can transmit
///    at their load, which grows with the acceleration itself (a fixed point in a_x; all-wheel
///    drive shared by load, as axle_usage shares it), and, for a rear-driven car, the
///    acceleration at which the front axle, unloaded by it, still holds its lateral force;
///  - brake: (braking force + resistance) / m, the braking force the largest at front_bias that
///    saturates neither axle at the loads the deceleration itself sets.
/// The rotating parts' inertia (m_eff = m (1 + inertia_factor)) counts only where the engine
/// limits; at the tyres' limit the road force acts on m (Gillespie, ch. 2-3).
/// `hints` (optional): each axle's last answer, where the next solve starts (a sweep's
/// neighbouring stages and steps are close); updated on return. Without it the solve starts
/// cold. Either way the answer is the same fixed point, to its 1e-9 m/s^2 tolerance.
struct AxleHints {
  double front = 0.0, rear = 0.0;  // m/s^2; 0: none yet
  bool rear_binds = false;         // braking: the rear axle set the last answer
  // Drive: the axle's own limit set the last answer, below the engine's (or the front's) bound.
  bool front_below = false, rear_below = false;
};
double axle_drive_accel(const Envelope& env, double u, double abs_curvature, const Road& road,
                        double drive_n, bool trimmed, AxleHints* hints = nullptr);
double axle_brake_accel(const Envelope& env, double u, double abs_curvature, const Road& road,
                        AxleHints* hints = nullptr);

/// Steady state at speed v (a_x = 0): the larger axle usage when the tyres carry the lateral
/// demand and the longitudinal force that holds v (minus 1: <= 0 is feasible).
double axle_steady_excess(const Envelope& env, double v, double abs_curvature, const Road& road,
                          bool trimmed = false);

}  // namespace lapwing
