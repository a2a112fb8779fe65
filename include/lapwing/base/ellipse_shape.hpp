// The friction ellipse's shape x^n + y^n = 1 read at x in [0, 1): y = (1 - x^n)^(1/n) and
// 1 - x^n, without the cancellation of 1 - x^n near x = 1 and, there, with one table read
// beside one power where two powers chained (the axle model's Newton iteration waits on them).
#pragma once

#include <algorithm>
#include <array>
#include <cstddef>
#include <memory>

#include "lapwing/base/fixed_power.hpp"

namespace lapwing {

/// For x below 1/2: rest = 1 - x^n and y = rest^(1/n) by FixedPower, as before this class.
/// From 1/2 up, with s = 1 - x (exact there: Sterbenz's lemma),
///   1 - x^n = s P(s),  P(s) = (1 - (1 - s)^n) / s,   y = s^(1/n) Q(s),  Q = P^(1/n),
/// P and Q analytic on [0, 1/2] (their nearest singularity is at s = 1) and read from 64
/// polynomials of degree 7 over s's intervals of width 1/128, each interpolating P or Q at 8
/// Chebyshev points (worked in long double, P by expm1 and log1p so that it keeps its digits as
/// s -> 0), s^(1/n) by FixedPower. The two reads are independent: the chain from x to y is one
/// power and one polynomial deep, where x^n and then rest^(1/n) were two powers. Against 50-digit
/// arithmetic (Boost.Multiprecision; ellipse_shape_test): y within 6 ulp and rest within 4.5 ulp
/// for n from 1 to 10 over [0, 1) (measured at most 5.84 and 4.07 over 40 random exponents of
/// [1, 10], 50000 points of [1/2, 1) each; y against the exponent the double nearest 1/n, as
/// FixedPower takes it), where 1 - x^n by FixedPower loses digits as x -> 1 (its
/// error there is that of x^n, 2.5 ulp of 1, over rest: 1e-6 relative at rest = 1e-10).
class EllipseShape {
 public:
  /// The tables for n in [1, 10] (the tyre's allowed range), made once per exponent in the
  /// process and shared.
  explicit EllipseShape(double n);

  struct Point {
    double y;     // (1 - x^n)^(1/n)
    double rest;  // 1 - x^n
  };

  /// x in [0, 1). (A NaN reads as below 1/2 did before this class: y 1, rest 1, as FixedPower
  /// takes a NaN for 0; x from 1 up reads y 0 and rest 0, the ellipse spent. Callers keep to
  /// [0, 1): TyreModel answers x >= 1 itself.)
  Point operator()(double x) const {
    if (!(x >= 0.5)) {
      const double rest = 1.0 - pow_n_(x);
      return {pow_inv_n_(rest), rest};
    }
    if (!(x < 1.0)) return {0.0, 0.0};
    const double s = 1.0 - x;
    const std::size_t j = std::min(static_cast<std::size_t>(s * (2 * intervals)), intervals - 1);
    const double* c = &tables_->coefficients[j * row];
    const double t = (s - c[0]) * (4 * intervals);  // in [-1, 1], exact (a power of two)
    return {pow_inv_n_(s) * poly(c + 1 + terms, t), s * poly(c + 1, t)};
  }

  static constexpr std::size_t intervals = 64;  // over s in [0, 1/2]
  static constexpr std::size_t terms = 8;       // degree 7

 private:
  // Estrin's scheme (Knuth, TAOCP vol. 2, sec. 4.6.4; from memory): three dependent levels.
  static double poly(const double* c, double t) {
    const double t2 = t * t, t4 = t2 * t2;
    return ((c[0] + t * c[1]) + t2 * (c[2] + t * c[3])) +
           t4 * ((c[4] + t * c[5]) + t2 * (c[6] + t * c[7]));
  }
  static constexpr std::size_t row = 1 + 2 * terms;  // the middle, P's and Q's coefficients
  struct Tables {
    std::array<double, intervals * row> coefficients{};
  };
  static std::shared_ptr<const Tables> tables_for(double n);
  FixedPower pow_n_, pow_inv_n_;
  std::shared_ptr<const Tables> tables_;
};

}  // namespace lapwing
