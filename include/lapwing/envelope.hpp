// What the car can do at each speed, precomputed once per car x config x air, so that the
// solver's per-point work is table look-ups and a few flops (STYLE, habit 12).
#pragma once

#include <cstddef>
#include <vector>

#include "lapwing/air.hpp"
#include "lapwing/car.hpp"
#include "lapwing/tyre.hpp"

namespace lapwing {

struct EnvelopeOptions {
  std::size_t speed_points = 4001;  // table rows from 0 to the maximum speed
  double ideal_speed_cap_mps = 150.0;  // top of the table for a gearless car (540 km/h)
};

/// Car (with one config applied, see Car::configured) in one air, tabulated over speed.
class Envelope {
 public:
  Envelope(const Car& configured_car, const Air& air, EnvelopeOptions options = {});

  // Fixed parameters, SI.
  double mass_kg() const { return mass_; }
  double effective_mass_kg() const { return mass_eff_; }  // m (1 + inertia_factor)
  double air_density() const { return rho_; }
  double max_speed_mps() const { return v_max_; }  // top of the table: rev limit in top gear
  double top_speed_level_mps() const { return v_top_; }  // drive = resistance on the level
  bool rev_limited() const { return rev_limited_; }
  const TyreModel& tyres() const { return tyres_; }
  const Car& car() const { return car_; }
  const std::string& config_name() const { return car_.configs.front().name; }

  /// Drive force at the wheels in the best gear (linear in the table).
  double drive_n(double v) const { return lookup(drive_, v); }
  int gear(double v) const { return gear_[index(v)]; }
  /// Aero forces: 0.5 rho C(v) v^2 with C interpolated over speed.
  double drag_n(double v) const { return lookup(drag_coef_, v) * v * v; }
  double downforce_n(double v) const { return lookup(lift_coef_, v) * v * v; }
  double aero_balance(double v) const { return lookup(balance_, v); }

  /// Vertical load on the tyres, N = m g cos(theta) + downforce.
  double normal_load_n(double v, double cos_grade) const {
    return weight_ * cos_grade + downforce_n(v);
  }
  /// Resistance to motion along the path: drag + rolling resistance + grade.
  double resistance_n(double v, double cos_grade, double sin_grade) const {
    return drag_n(v) + crr_ * normal_load_n(v, cos_grade) + weight_ * sin_grade;
  }

 private:
  std::size_t index(double v) const;
  double lookup(const std::vector<double>& t, double v) const;

  Car car_;
  TyreModel tyres_;
  double mass_, mass_eff_, weight_, crr_, rho_;
  double v_max_, v_top_, dv_, inv_dv_;
  bool rev_limited_;
  std::vector<double> drive_, drag_coef_, lift_coef_, balance_;
  std::vector<int> gear_;
};

/// Interpolates a table given over increasing speeds (held at the end values outside).
double interpolate(const std::vector<double>& xs, const std::vector<double>& ys, double x);

}  // namespace lapwing
