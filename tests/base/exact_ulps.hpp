// Errors against 50-digit arithmetic, Boost.Multiprecision's cpp_bin_float_50 (a general-purpose
// reference library), in units in the last place (ulp) of the exact value: the tests of the
// tables that stand for library powers (fixed_power_test, ellipse_shape_test).
#pragma once

#include <boost/multiprecision/cpp_bin_float.hpp>

#include <cmath>
#include <limits>

namespace lapwing::test {

using Exact = boost::multiprecision::cpp_bin_float_50;

/// |y - exact| over the spacing of doubles at the exact value (rounded to double).
inline double ulps(double y, const Exact& exact) {
  const double e = exact.convert_to<double>();
  const double spacing = std::nextafter(e, std::numeric_limits<double>::infinity()) - e;
  return static_cast<double>(boost::multiprecision::abs(Exact(y) - exact) / Exact(spacing));
}

}  // namespace lapwing::test
