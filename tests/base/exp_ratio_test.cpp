// phi1(z) = (e^z - 1) / z (base/exp_ratio.hpp), the exponential step's factor, against 50-digit
// arithmetic: Boost.Multiprecision's cpp_bin_float_50 (a general-purpose reference library), its
// expm1 correct far beyond double's 16 digits. The error is counted in units in the last place
// (ulp) of the exact value.
#include <doctest/doctest.h>

#include <boost/random/mersenne_twister.hpp>
#include <boost/random/uniform_real_distribution.hpp>

#include <cmath>
#include <limits>
#include <vector>

#include "exact_ulps.hpp"
#include "lapwing/base/exp_ratio.hpp"

using namespace lapwing;
using test::Exact;

namespace {

double ulp_error(double z) {
  return test::ulps(phi1(z), boost::multiprecision::expm1(Exact(z)) / Exact(z));
}

}  // namespace

TEST_CASE("phi1 by its series is within 1 ulp of 50-digit arithmetic for |z| <= 1/4") {
  // Uniform over [-1/4, 1/4] (a fixed seed), log-uniform magnitudes down to 1e-300 of either
  // sign, and the edges of the series' range.
  std::vector<double> zs;
  boost::random::mt19937 gen(20261203);
  boost::random::uniform_real_distribution<double> uniform(-0.25, 0.25), log10z(-300.0, -0.61);
  for (int i = 0; i < 20000; ++i) zs.push_back(uniform(gen));
  for (int i = 0; i < 2000; ++i) {
    const double m = std::pow(10.0, log10z(gen));
    zs.push_back(m);
    zs.push_back(-m);
  }
  for (double e : {0.25, -0.25}) zs.push_back(e);
  zs.push_back(std::nextafter(0.25, 0.0));
  zs.push_back(std::nextafter(-0.25, 0.0));
  double worst = 0.0;
  for (double z : zs) worst = std::max(worst, ulp_error(z));
  INFO("worst " << worst << " ulp over " << zs.size() << " points");
  CHECK(worst <= 1.0);
  // The library's expm1(z) / z on the same points, for comparison: two roundings (1.37 ulp at
  // worst, measured here; the series 0.76).
  double library = 0.0;
  for (double z : zs)
    library = std::max(
        library, test::ulps(std::expm1(z) / z, boost::multiprecision::expm1(Exact(z)) / Exact(z)));
  MESSAGE("expm1(z) / z: worst " << library << " ulp; the series: " << worst);
}

TEST_CASE("phi1 beyond the series' range is expm1(z) / z, 1 at 0, and tends to -1/z") {
  CHECK(phi1(0.0) == 1.0);
  CHECK(phi1(-0.0) == 1.0);
  // Beyond |z| = 1/4 the library's form, to its accuracy (expm1 within 1 ulp, the division
  // half an ulp: 2 ulp allowed).
  for (double z : {0.2500001, -0.2500001, 0.5, -0.5, 1.0, -3.0, 20.0, -40.0, -700.0})
    CHECK(ulp_error(z) <= 2.0);
  // z -> -inf: (e^z - 1) / z -> -1 / z (e^-1e6 underflows to 0).
  CHECK(phi1(-1e6) == doctest::Approx(1e-6).epsilon(1e-15));
  // Continuous across the edge of the series' range: both forms within 2 ulp of the exact.
  const double below = phi1(0.25), above = phi1(std::nextafter(0.25, 1.0));
  CHECK(std::abs(above - below) <= 4.0 * std::numeric_limits<double>::epsilon());
  // A NaN stays a NaN.
  CHECK(std::isnan(phi1(std::numeric_limits<double>::quiet_NaN())));
}
