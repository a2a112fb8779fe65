// phi1(z) = (e^z - 1) / z (base/exp_ratio.hpp), the exponential step's factor, against 50-digit
// arithmetic: Boost.Multiprecision's cpp_bin_float_50 (a general-purpose reference library), its
// expm1 correct far beyond double's 16 digits. The error is counted in units in the last place
// (ulp) of the exact value. And the exponential step's end built on it, against the closed form
// of its linear equation in the same arithmetic.
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

TEST_CASE(
    "the exponential step's end solves u' = f_m + J (u - u_m) exactly, and a jump stays finite") {
  // The linear equation's closed form in another arrangement (w = u - u_m + f_m / J has
  // w' = J w, so u(h) = u_m - f_m / J + (u0 - u_m + f_m / J) e^(h J)), in 50-digit arithmetic.
  // The step's own form rounds a few times on the increment h phi1 (f_m + J (u0 - u_m)) (phi1
  // within 1 ulp, four roundings after it) and once on the sum: 8 ulp of the larger of u0 and
  // u1 allowed, with f_m and J (u0 - u_m) of one sign or apart in size (no cancellation between
  // them). Values: u = v^2 from 5 to 80 m/s, f_m = 2 a for a car's accelerations (-40 to +40
  // m^2/s^2 per m), slopes from a car's 1e-3 per metre to the grip limit's steep ones.
  double worst = 0.0;
  for (double u0 : {25.0, 900.0, 6400.0})
    for (double dm : {0.0, 3.0})
      for (double fm : {-40.0, 5.0, 20.0})
        for (double j : {-1e4, -100.0, -1.0, -0.0025, 0.0025, 0.5, 1.0, 30.0})
          for (double h : {0.25, 0.5, 2.0}) {
            if (h * j > exponential_jump_z) continue;
            const double um = u0 - dm;
            const double u1 = exponential_update(u0, um, fm, j, h);
            const Exact J(j), w0 = Exact(u0) - Exact(um) + Exact(fm) / J;
            const Exact exact =
                Exact(um) - Exact(fm) / J + w0 * boost::multiprecision::exp(Exact(h) * J);
            const double err =
                static_cast<double>(abs(Exact(u1) - exact)) /
                (std::numeric_limits<double>::epsilon() * std::max(std::abs(u0), std::abs(u1)));
            worst = std::max(worst, err);
          }
  INFO("worst " << worst << " ulp of max(|u0|, |u1|)");
  CHECK(worst <= 8.0);
  // A secant across a jump in the model (h J beyond exponential_jump_z): the step on the
  // midpoint's reading alone, finite where phi1 alone would overflow (h J > 709.8) and read
  // inf x 0 as a NaN where f_m + J (u0 - u_m) is 0.
  for (double j : {33.0, 1500.0, 1e300, std::numeric_limits<double>::infinity()}) {
    CHECK(exponential_update(400.0, 400.0, 12.0, j, 0.5) == 400.0 + 0.5 * 12.0);
    CHECK(std::isfinite(exponential_update(400.0, 400.0 + 12.0 / j, 12.0, j, 0.5)));
  }
  // Just under the threshold the exact solution stands (e^15.5 growth, finite).
  CHECK(exponential_update(400.0, 400.0, 12.0, 31.0, 0.5) ==
        doctest::Approx(400.0 + 0.5 * phi1(15.5) * 12.0).epsilon(1e-15));
  // A NaN slope stays a NaN.
  CHECK(std::isnan(
      exponential_update(400.0, 400.0, 12.0, std::numeric_limits<double>::quiet_NaN(), 0.5)));
}

TEST_CASE(
    "the exponential step's end is at least u_m + h f_m wherever f_m <= 0 and u0 - u_m >= h "
    "|f_m|") {
  // The bound the sweeps' held exponential steps rest on (solver.cpp, held_bound_margin): with
  // delta = u0 - u_m >= h |f_m| and f_m <= 0, u1 >= u_m + h f_m for every slope J, derived
  // there from phi1 <= 1 for z <= 0 and phi1(z) <= e^z for z > 0 (a closed-form inequality
  // checked here on the step's own arithmetic), less the margin the solver takes for rounding.
  // Values as above; slopes from -1e6 to +1e6 per metre, across the jump threshold and beyond
  // the overflow of phi1.
  constexpr double margin = 1e-9;  // held_bound_margin
  int checked = 0;
  for (double u0 : {25.0, 900.0, 6400.0})
    for (double fm : {-40.0, -5.0, -0.3, 0.0})
      for (double h : {0.25, 0.5, 2.0})
        for (double extra : {0.0, 1e-6, 0.5, 3.0, 200.0}) {
          const double fall = -h * fm * (1.0 + margin);
          const double um = u0 - (fall + extra);
          if (!(um > 0.0)) continue;
          for (double j : {-1e6, -1e4, -100.0, -1.0, -0.0025, 0.0, 0.0025, 0.5, 1.0, 7.9, 8.1, 31.9,
                           32.1, 1e3, 1e6}) {
            const double u1 = exponential_update(u0, um, fm, j, h);
            INFO("u0 " << u0 << " u_m " << um << " f_m " << fm << " J " << j << " h " << h);
            CHECK(u1 >= (um - fall) * (1.0 - margin));
            ++checked;
          }
        }
  CHECK(checked > 800);
  // Where u0 - u_m falls short of h |f_m| the bound fails for a steep positive slope (the
  // condition is needed): z = 15, u1 = u_m + e^z (delta + h f_m) nearly.
  CHECK(exponential_update(900.0, 899.0, -40.0, 30.0, 0.5) < 899.0 - 20.0);
}
