#include "lapwing/model/tyre.hpp"

namespace lapwing {

std::optional<Violation> Tyres::validate() const {
  return FirstViolation()
      .range("mu_long", mu_long, friction_range, Quantity::number)
      .range("mu_lat", mu_lat, friction_range, Quantity::number)
      // At least 1 N: a kart's tyre is nominally loaded some 400 N; below 1 N is no car's (a
      // unit slip), and a subnormal load made the load sensitivity per newton infinite (a
      // robustness campaign's finding: an internal error from the lateral table's search).
      .range("nominal_load", nominal_load_n, Range{1.0, 1e308}, Quantity::force)
      .range("load_sensitivity", load_sensitivity, Range{0.0, 1.0, false, true}, Quantity::number)
      .range("ellipse_exponent", ellipse_exponent, Range{1.0, 10.0}, Quantity::number)
      // A kart's wheel is some 0.13 m in radius: below 0.05 m is no car's (or a unit slip).
      .range("rolling_radius", rolling_radius_m, Range{0.05, 2.0}, Quantity::length)
      .range("rolling_resistance", rolling_resistance, Range{0.0, 0.1}, Quantity::number)
      .result();
}

}  // namespace lapwing
