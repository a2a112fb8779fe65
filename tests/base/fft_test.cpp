// The discrete Fourier transform (base/fft.hpp) against its definition summed directly, a
// cosine's closed form and Parseval's theorem (textbook facts of the DFT: Oppenheim & Schafer,
// Discrete-Time Signal Processing, ch. 8; from memory).
#include <doctest/doctest.h>

#include <cmath>
#include <complex>
#include <cstddef>
#include <cstdint>
#include <vector>

#include "lapwing/base/fft.hpp"
#include "lapwing/base/units.hpp"

using namespace lapwing;

namespace {
using cplx = std::complex<double>;

// The definition, each angle reduced exactly ((j k) mod n) and the sum in long double.
std::vector<cplx> direct(const std::vector<cplx>& x) {
  const std::size_t n = x.size();
  std::vector<cplx> out(n);
  for (std::size_t k = 0; k < n; ++k) {
    long double re = 0.0L, im = 0.0L;
    for (std::size_t j = 0; j < n; ++j) {
      const auto m = static_cast<std::uint64_t>(j) * k % n;
      const long double a = -2.0L * 3.141592653589793238462643383279502884L *
                            static_cast<long double>(m) / static_cast<long double>(n);
      const long double c = std::cos(a), s = std::sin(a);
      re += x[j].real() * c - x[j].imag() * s;
      im += x[j].real() * s + x[j].imag() * c;
    }
    out[k] = cplx(static_cast<double>(re), static_cast<double>(im));
  }
  return out;
}

std::vector<cplx> seeded(std::size_t n, std::uint64_t seed) {
  std::vector<cplx> x(n);
  auto next = [&seed] {  // 64-bit LCG (Knuth's MMIX constants), values in [-1, 1)
    seed = seed * 6364136223846793005ull + 1442695040888963407ull;
    return static_cast<double>(seed >> 11) / 4503599627370496.0 - 1.0;
  };
  for (auto& v : x) {
    const double re = next();
    v = cplx(re, next());
  }
  return x;
}
}  // namespace

TEST_CASE("the transform is its definition's sum, for lengths prime, composite and powers of 2") {
  // Error of an O(n log n) transform: some eps log2(n) of the series' norm per term (the
  // Bluestein lengths through a transform of up to 4n); 1e-13 of the sum of |x_j| allows for
  // that with room at these lengths, where a wrong index or chirp misses by O(1).
  for (const std::size_t n : {1u, 2u, 3u, 5u, 7u, 8u, 12u, 64u, 100u, 457u, 1000u, 2742u}) {
    CAPTURE(n);
    const std::vector<cplx> x = seeded(n, 0x9E3779B97F4A7C15ull + n);
    const std::vector<cplx> fast = dft(x), ref = direct(x);
    REQUIRE(fast.size() == n);
    double sum = 0.0, worst = 0.0;
    for (const cplx& v : x) sum += std::abs(v);
    for (std::size_t k = 0; k < n; ++k) worst = std::max(worst, std::abs(fast[k] - ref[k]));
    CHECK(worst <= 1e-13 * sum);
  }
  CHECK(dft({}).empty());
}

TEST_CASE("a cosine's transform is n / 2 at its frequency and its mirror, 0 elsewhere") {
  for (const std::size_t n : {16u, 457u, 2742u}) {
    const std::size_t f = 5;
    std::vector<double> x(n);
    for (std::size_t j = 0; j < n; ++j)
      x[j] = std::cos(2.0 * units::pi * static_cast<double>(f * j % n) / static_cast<double>(n));
    const std::vector<double> p = power_spectrum(x);
    const double half = 0.5 * static_cast<double>(n);
    for (std::size_t k = 0; k < n; ++k) {
      CAPTURE(n);
      CAPTURE(k);
      const double want = (k == f || k == n - f) ? half * half : 0.0;
      CHECK(std::abs(p[k] - want) <= 1e-18 * static_cast<double>(n * n) + 1e-12 * want);
    }
  }
}

TEST_CASE("Parseval: the power spectrum sums to n times the series' energy") {
  const std::size_t n = 2742;
  const std::vector<cplx> c = seeded(n, 42);
  std::vector<double> x(n);
  double energy = 0.0;
  for (std::size_t j = 0; j < n; ++j) {
    x[j] = 300.0 * c[j].real() + 1000.0;  // a large mean, as a circuit's coordinates have
    energy += x[j] * x[j];
  }
  double total = 0.0;
  for (const double p : power_spectrum(x)) total += p;
  CHECK(std::abs(total - static_cast<double>(n) * energy) <=
        1e-12 * static_cast<double>(n) * energy);
}
