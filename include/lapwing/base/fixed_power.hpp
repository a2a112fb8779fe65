// x^p for one exponent p fixed in advance (the friction ellipse's n and 1/n), by a table instead
// of the library's 2^(p log2 x).
#pragma once

#include <array>
#include <bit>
#include <cmath>
#include <cstdint>
#include <memory>

namespace lapwing {

/// x^p for x >= 0 and a fixed p in (0, 15] (the ellipse's n and 1/n lie in [0.1, 10]). With x = 2^e
/// m, m in [1, 2): x^p = 2^(e p) m^p, the first factor read from a table over e, the second from
/// one of 64 Taylor polynomials of degree 8 about the middles of m's 64 equal intervals: (c + d)^p
/// = sum_k C(p, k) c^(p - k) d^k with |d| <= 1/128, whose first left-out term, |C(p, 9)| (1/128)^9
/// c^(p - 9), is below 1e-17 of c^p for p up to 10 (|C(p, 9)| <= 10 there, (1/128)^9 = 1.1e-19).
/// Coefficients and table are worked in long double. Against 50-digit arithmetic
/// (Boost.Multiprecision; fixed_power_test): within 3 ulp for p from 0.1 to 10 over the table's
/// range (measured 2.70 at p = 1/9.5), where the library's exp2(p log2 x) is off by up to about
/// |p log2 x| / 2 ulp (measured: 21 ulp for ratios in [0, 1) at p = 2.2, 95 at p = 10). Outside
/// the table's exponents (x below 2^-64 or from 2^8 up, subnormal, infinite) the library's form
/// answers; a power of two (x = 1 among them, exactly 1) is the exponent's table alone. Some 27
/// instructions where the two library calls take some 90 (callgrind), about half the time
/// (measured: 4.6 against 9.2 ns a call).
class FixedPower {
 public:
  /// The tables for p, made once per exponent in the process and shared (about 34 us to make:
  /// 136 long-double powers; a tyre model needs two, and a study makes an Envelope per lap).
  explicit FixedPower(double p);

  double operator()(double x) const {
    if (!(x > 0.0)) return 0.0;
    const std::uint64_t bits = std::bit_cast<std::uint64_t>(x);
    const int e = static_cast<int>(bits >> 52) - 1023;  // x > 0: no sign bit
    if (e < min_exponent || e > max_exponent) return std::exp2(p_ * std::log2(x));
    const std::uint64_t mantissa = bits & ((std::uint64_t{1} << 52) - 1);
    // A power of two (m = 1): 2^(e p) alone, correctly rounded; 1 at x = 1, as the ellipse
    // reads a direction with nothing asked of the other (1 - 0^n)^(1/n).
    const Tables& t = *tables_;
    if (mantissa == 0) return t.scale[static_cast<std::size_t>(e - min_exponent)];
    const double m = std::bit_cast<double>(mantissa | (std::uint64_t{1023} << 52));  // [1, 2)
    const std::size_t j = static_cast<std::size_t>(mantissa >> (52 - interval_bits));
    const double* c = &t.coefficients[j * row];
    const double d = m - c[0];
    // c1 + d q, q = c2 + c3 d + ... + c9 d^7 by Estrin's scheme (Knuth, TAOCP vol. 2, sec.
    // 4.6.4; from memory): pairs, then pairs of pairs by d^2 and d^4, so that the dependent
    // multiply-adds are four deep where Horner's rule chained eight (the ellipse's powers sit
    // on the axle model's Newton iteration, a chain of dependent arithmetic). The leading term
    // is added last, once, as Horner's rule adds it: q's rounding reaches the result times
    // |d| <= 1/128.
    const double d2 = d * d, d4 = d2 * d2;
    const double q01 = c[2] + d * c[3], q23 = c[4] + d * c[5];
    const double q45 = c[6] + d * c[7], q67 = c[8] + d * c[9];
    const double q = (q01 + d2 * q23) + d4 * (q45 + d2 * q67);
    const double poly = c[1] + d * q;
    return poly * t.scale[static_cast<std::size_t>(e - min_exponent)];
  }

  static constexpr int interval_bits = 6;
  static constexpr int degree = 8;
  static constexpr int min_exponent = -64, max_exponent = 7;
  static constexpr double max_p = 15.0;

 private:
  static constexpr std::size_t intervals = std::size_t{1} << interval_bits;
  static constexpr std::size_t row = degree + 2;  // the middle, then the coefficients
  double p_;
  struct Tables {
    std::array<double, intervals * row> coefficients{};
    std::array<double, max_exponent - min_exponent + 1> scale{};
  };
  static std::shared_ptr<const Tables> tables_for(double p);
  std::shared_ptr<const Tables> tables_;
};

}  // namespace lapwing
