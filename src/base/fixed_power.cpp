#include "lapwing/base/fixed_power.hpp"

#include <stdexcept>

#include "lapwing/base/once_per_key.hpp"

namespace lapwing {

FixedPower::FixedPower(double p) : p_(p) {
  // Above 15 the table's 2^(-64 p) would fall below the normal doubles (2^-1022) and lose digits.
  if (!(p > 0.0 && p <= max_p)) throw std::invalid_argument("FixedPower: p must be in (0, 15]");
  tables_ = tables_for(p);
}

std::shared_ptr<const FixedPower::Tables> FixedPower::tables_for(double p) {
  // One set per exponent for the process's life (a car file has one or two; a sweep over the
  // exponent a few hundred, 6 KB each), the same bits whichever thread made them.
  return once_per_key<Tables>(p, [p] {
    auto t = std::make_shared<Tables>();
    const long double lp = static_cast<long double>(p);
    for (std::size_t j = 0; j < intervals; ++j) {
      // The middle of m's j-th interval, exact in binary: 1 + (j + 1/2) / 64.
      const long double c = 1.0L + (static_cast<long double>(j) + 0.5L) / intervals;
      double* out = &t->coefficients[j * row];
      out[0] = static_cast<double>(c);
      // C(p, k) c^(p - k), k = 0 .. degree: the binomial by its recurrence, the power by powl.
      long double binomial = 1.0L, term = std::pow(c, lp);
      for (int k = 0; k <= degree; ++k) {
        out[1 + k] = static_cast<double>(binomial * term);
        binomial *= (lp - k) / (k + 1);
        term /= c;
      }
    }
    for (int e = min_exponent; e <= max_exponent; ++e)
      t->scale[static_cast<std::size_t>(e - min_exponent)] =
          static_cast<double>(std::exp2(static_cast<long double>(e) * lp));
    return t;
  });
}

}  // namespace lapwing
