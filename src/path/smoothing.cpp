#include "lapwing/path/smoothing.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "lapwing/base/units.hpp"

namespace lapwing {

namespace {

// The factorisation's number type: IEEE binary128 (113-bit significand). The matrix
// I + lambda D'D holds lambda ~ 1e13..1e17 for strengths of hundreds of metres on 1 m samples
// (and the 1 of I beside it): in double precision (53 bits) LDLT keeps no significant digit of
// the smooth components the fit is made of (issue 19, finding 5: a 6283 m circle and a 3000 m
// line came back with the wrong length). In binary128 the entries lambda c + 1 are exact (c a
// small integer: 58 bits at most) and the solve loses log2(4^d lambda) ~ 62 bits of 113, leaving
// the solution good to double precision. Only + - * / are used (libgcc's soft float).
#if defined(__SIZEOF_FLOAT128__)
__extension__ typedef __float128 wide;
#else
typedef long double wide;  // binary128 where __float128 is not offered (aarch64 Linux)
static_assert(std::numeric_limits<long double>::digits >= 113,
              "the smoother needs a 113-bit floating-point type");
#endif

// A symmetric positive definite matrix stored by its envelope (profile): row i holds columns
// first[i]..i of the lower triangle. LDL' without pivoting keeps its fill inside the envelope
// (George & Liu, Computer Solution of Large Sparse Positive Definite Systems, 1981, ch. 4).
template <typename T>
struct Envelope {
  std::vector<std::size_t> first, start;  // first column of each row; offset of its storage
  std::vector<T> a;                       // the rows, then L (unit lower) in place
  std::vector<T> d;                       // D of L D L'

  explicit Envelope(std::vector<std::size_t> first_column) : first(std::move(first_column)) {
    start.resize(first.size() + 1, 0);
    for (std::size_t i = 0; i < first.size(); ++i) start[i + 1] = start[i] + (i - first[i] + 1);
    a.assign(start.back(), T(0));
  }
  T& at(std::size_t i, std::size_t j) { return a[start[i] + (j - first[i])]; }

  void factor() {
    const std::size_t n = first.size();
    d.assign(n, T(0));
    for (std::size_t i = 0; i < n; ++i) {
      for (std::size_t j = first[i]; j < i; ++j) {
        T s = at(i, j);
        for (std::size_t k = std::max(first[i], first[j]); k < j; ++k)
          s -= at(i, k) * at(j, k) * d[k];
        at(i, j) = s / d[j];
      }
      T s = at(i, i);
      for (std::size_t k = first[i]; k < i; ++k) s -= at(i, k) * at(i, k) * d[k];
      d[i] = s;
    }
  }

  // L D L' x = b, in place.
  void solve(std::vector<T>& x) {
    const std::size_t n = first.size();
    for (std::size_t i = 0; i < n; ++i)
      for (std::size_t k = first[i]; k < i; ++k) x[i] -= at(i, k) * x[k];
    for (std::size_t i = 0; i < n; ++i) x[i] /= d[i];
    for (std::size_t i = n; i-- > 0;)
      for (std::size_t k = first[i]; k < i; ++k) x[k] -= at(i, k) * x[i];
  }
};

// lambda 4^d below which double precision is enough: eps 1e5 = 2e-11 relative error.
constexpr double double_precision_limit = 1e5;

}  // namespace

double smoothing_lambda(double h, double length, int order) {
  const double s = 2.0 * std::sin(units::pi * std::min(0.5, h / length));
  return 1.0 / std::pow(s, 2 * order);
}

std::vector<double> smooth(const std::vector<double>& y, double h, double length, int order,
                           bool periodic) {
  const std::size_t n = y.size();
  const auto d = static_cast<std::size_t>(order);
  if (length <= 0.0 || n < d + 2) return y;
  // Binomial coefficients of the d-th difference: (-1)^(d-k) C(d, k).
  std::vector<double> coef(d + 1);
  for (std::size_t k = 0; k <= d; ++k) {
    double c = 1.0;
    for (std::size_t j = 0; j < k; ++j)
      c = c * static_cast<double>(d - j) / static_cast<double>(j + 1);
    coef[k] = ((d - k) % 2 ? -1.0 : 1.0) * c;
  }
  // The envelope of I + lambda D'D: a band of half-width d; a periodic D also joins the last d
  // rows to the first columns (the wrap), which makes those rows full.
  std::vector<std::size_t> first(n);
  for (std::size_t i = 0; i < n; ++i) first[i] = periodic && i + d >= n ? 0 : (i > d ? i - d : 0);
  const double lambda = smoothing_lambda(h, length, order);
  // Solved in T: binary128 when double precision would lose more than about 1e-11 of the result
  // (the factorisation's error grows as eps lambda 4^d), else double (16 times faster).
  auto solve = [&](auto zero) {
    using T = decltype(zero);
    Envelope<T> m(first);
    // Row r of D has coef[k] at column (r + k) mod n: (D'D)_ij = sum_r D_ri D_rj.
    const std::size_t rows = periodic ? n : n - d;
    for (std::size_t r = 0; r < rows; ++r)
      for (std::size_t k1 = 0; k1 <= d; ++k1)
        for (std::size_t k2 = 0; k2 <= d; ++k2) {
          const std::size_t i = (r + k1) % n, j = (r + k2) % n;
          if (j <= i) m.at(i, j) += T(lambda) * T(coef[k1] * coef[k2]);
        }
    for (std::size_t i = 0; i < n; ++i) m.at(i, i) += T(1);
    m.factor();
    std::vector<T> f(y.begin(), y.end());
    m.solve(f);
    return std::vector<double>(f.begin(), f.end());
  };
  if (lambda * std::pow(4.0, order) < double_precision_limit) return solve(0.0);
  return solve(wide(0));
}

}  // namespace lapwing
