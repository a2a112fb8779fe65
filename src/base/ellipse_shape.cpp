#include "lapwing/base/ellipse_shape.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>

#include "lapwing/base/once_per_key.hpp"

namespace lapwing {

EllipseShape::EllipseShape(double n)
    : pow_n_(n >= 1.0 && n <= 10.0
                 ? n
                 : throw std::invalid_argument("EllipseShape: n must be in [1, 10]")),
      pow_inv_n_(1.0 / n),
      tables_(tables_for(n)) {}

std::shared_ptr<const EllipseShape::Tables> EllipseShape::tables_for(double n) {
  // One set per exponent for the process's life (9 KB each), as FixedPower keeps its tables.
  return once_per_key<Tables>(n, [n] {
    auto tables = std::make_shared<Tables>();
    const long double ln = static_cast<long double>(n);
    // P(s) = (1 - (1 - s)^n) / s = -expm1(n log1p(-s)) / s: no cancellation as s -> 0.
    const auto p_of = [ln](long double s) { return -std::expm1(ln * std::log1p(-s)) / s; };
    // The Chebyshev points and the polynomials T_k at them are the same for every interval:
    // worked once (the same expressions on the same values as in the loop below, so the same
    // long doubles).
    std::array<long double, terms> t_at{};
    std::array<std::array<long double, terms>, terms> t_k_at{};  // T_k(t_i)
    for (std::size_t i = 0; i < terms; ++i)
      t_at[i] = std::cos((2.0L * static_cast<long double>(i) + 1.0L) *
                         std::numbers::pi_v<long double> / (2.0L * terms));
    for (std::size_t k = 0; k < terms; ++k)
      for (std::size_t i = 0; i < terms; ++i)
        t_k_at[k][i] = std::cos(static_cast<long double>(k) * std::acos(t_at[i]));
    for (std::size_t j = 0; j < intervals; ++j) {
      // The middle of s's j-th interval, exact in binary: (j + 1/2) / 128; s = middle + t / 256.
      const long double middle = (static_cast<long double>(j) + 0.5L) / (2 * intervals);
      double* out = &tables->coefficients[j * row];
      out[0] = static_cast<double>(middle);
      // The interpolating polynomials in t at the Chebyshev points t_i = cos((2i + 1) pi / 16):
      // their Chebyshev coefficients by the discrete cosine sums (Press et al., Numerical Recipes,
      // 2nd ed., sec. 5.8; from memory), then the monomial ones, T_k's own coefficients by their
      // recurrence T_(k+1) = 2 t T_k - T_(k-1). (Solving the Vandermonde system instead left a few
      // ulp at the intervals' ends.)
      std::array<long double, terms> p_at{}, q_at{};
      for (std::size_t i = 0; i < terms; ++i) {
        p_at[i] = p_of(middle + t_at[i] / (4 * intervals));
        q_at[i] = std::pow(p_at[i], 1.0L / ln);
      }
      std::array<long double, terms> p_mono{}, q_mono{};
      std::array<long double, terms> t_prev{}, t_cur{};  // T_(k-1), T_k as monomial coefficients
      t_cur[0] = 1.0L;
      for (std::size_t k = 0; k < terms; ++k) {
        long double pa = 0.0L, qa = 0.0L;
        for (std::size_t i = 0; i < terms; ++i) {
          pa += p_at[i] * t_k_at[k][i];
          qa += q_at[i] * t_k_at[k][i];
        }
        const long double w = (k == 0 ? 1.0L : 2.0L) / terms;
        for (std::size_t m = 0; m < terms; ++m) {
          p_mono[m] += w * pa * t_cur[m];
          q_mono[m] += w * qa * t_cur[m];
        }
        // T_(k+1) = 2 t T_k - T_(k-1).
        std::array<long double, terms> next{};
        for (std::size_t m = 0; m < terms; ++m) {
          next[m] = (m > 0 ? 2.0L * t_cur[m - 1] : 0.0L) - (k == 0 ? 0.0L : t_prev[m]);
          if (k == 0) next[m] = m == 1 ? 1.0L : 0.0L;  // T_1 = t
        }
        t_prev = t_cur;
        t_cur = next;
      }
      for (std::size_t k = 0; k < terms; ++k) {
        out[1 + k] = static_cast<double>(p_mono[k]);
        out[1 + terms + k] = static_cast<double>(q_mono[k]);
      }
    }
    return tables;
  });
}

}  // namespace lapwing
