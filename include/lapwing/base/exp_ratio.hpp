// phi1(z) = (e^z - 1) / z, the exponential step's factor (solve/solver.cpp): by a polynomial
// where |z| is small, as it is on most steps the sweeps take (|z| below 0.25 on every step of
// the axle model on the bundled cars and tracks; the point-mass model's steps near the grip
// limit go past it, 1 to 5 % of them on Brannock Park and Cairnholt, |z| up to 4.2: counted
// once), so that the step waits on a few multiply-adds rather than on the library's expm1 and
// a division.
#pragma once

#include <cmath>

namespace lapwing {

/// (e^z - 1) / z, 1 at z = 0. For |z| <= 1/4: 1 + z q(z), q its Taylor series' sum
/// z^(k - 1) / (k + 1)! for k = 1 to 11 (the first term left out of phi1, |z|^12 / 13!, is
/// below 1e-17: a tenth of an ulp of the result, which lies in [0.88, 1.14]), q summed by
/// Estrin's scheme (Knuth, TAOCP vol. 2, sec. 4.6.4; from memory): four dependent multiply-adds
/// after z^2, z^4 and z^8, then the leading 1 added last, so that q's rounding reaches the
/// result times |z| <= 1/4. Elsewhere expm1(z) / z, which keeps full relative accuracy where
/// e^z - 1 would cancel; for z -> -inf it tends to -1 / z. Within 1 ulp of 50-digit arithmetic
/// over |z| <= 1/4 (0.76 measured over base.exp_ratio_test's points, where the library's form
/// read 1.37; 0.87 over a second reader's denser sweep of 1.3 million points near the range's
/// edges).
inline double phi1(double z) {
  if (!(std::abs(z) <= 0.25)) return z == 0.0 ? 1.0 : std::expm1(z) / z;
  // 1 / (k + 1)!, k = 1 .. 11, rounded to double.
  constexpr double c1 = 1.0 / 2, c2 = 1.0 / 6, c3 = 1.0 / 24, c4 = 1.0 / 120, c5 = 1.0 / 720,
                   c6 = 1.0 / 5040, c7 = 1.0 / 40320, c8 = 1.0 / 362880, c9 = 1.0 / 3628800,
                   c10 = 1.0 / 39916800, c11 = 1.0 / 479001600;
  const double z2 = z * z, z4 = z2 * z2, z8 = z4 * z4;
  const double q12 = c1 + z * c2, q34 = c3 + z * c4, q56 = c5 + z * c6, q78 = c7 + z * c8,
               q910 = c9 + z * c10;
  const double q = ((q12 + z2 * q34) + z4 * (q56 + z2 * q78)) + z8 * (q910 + z2 * c11);
  return 1.0 + z * q;
}

/// The exponential step's growth beyond which its slope is a jump, not a slope: h J above 16
/// (u would grow e^16, 9 million-fold, over one step). A smooth model's slope gives |h J| far
/// below 1 (J some 1e-3 per metre for a car, steps of 0.5 m: |h J| under 0.25 on every step of
/// the bundled cars and tracks, under 0.8 on every step of the tests, counted once); a secant
/// across a jump in the model between its two readings (the axle model's fixed point taking
/// another root there: README, "Limitations and cautions") can reach any size, and beyond
/// h J = 709.8 phi1 overflows to infinity (and inf x 0 is a NaN).
inline constexpr double exponential_jump_z = 16.0;

/// The exponential step's end (solve/solver.cpp): the linear equation u' = f_m + J (u - u_m)
/// solved exactly from u0 over a step h, u1 = u0 + h phi1(h J) (f_m + J (u0 - u_m)). Where h J
/// is beyond exponential_jump_z, the slope is taken as 0: u1 = u0 + h f_m (the step on its
/// midpoint's reading alone, which the sweep's limit then clips as any step), finite wherever
/// u0, f_m and h are. A NaN slope stays a NaN.
inline double exponential_update(double u0, double um, double fm, double j, double h) {
  if (h * j > exponential_jump_z) return u0 + h * fm;
  return u0 + h * phi1(h * j) * (fm + j * (u0 - um));
}

}  // namespace lapwing
