#include "lapwing/base/fft.hpp"

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <utility>

#include "lapwing/base/units.hpp"

namespace lapwing {

namespace {

using cplx = std::complex<double>;

// Written out: the library's operator* checks for infinities and NaNs (Annex G), a call a
// product here.
cplx times(const cplx& a, const cplx& b) {
  return {a.real() * b.real() - a.imag() * b.imag(), a.real() * b.imag() + a.imag() * b.real()};
}

// exp(-2 pi i m / n) for 0 <= m < n, its angle from the exact fraction m / n.
cplx root(std::uint64_t m, std::uint64_t n) {
  const double angle = -2.0 * units::pi * static_cast<double>(m) / static_cast<double>(n);
  return {std::cos(angle), std::sin(angle)};
}

bool power_of_two(std::size_t n) {
  return n > 0 && (n & (n - 1)) == 0;
}

// In place, n a power of two: iterative radix 2, decimation in time. `inverse`: the conjugate
// roots (no 1 / n).
void radix2(std::vector<cplx>& a, bool inverse) {
  const std::size_t n = a.size();
  if (n < 2) return;
  for (std::size_t i = 1, j = 0; i < n; ++i) {  // bit-reversed order
    std::size_t bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) std::swap(a[i], a[j]);
  }
  std::vector<cplx> w(n / 2);
  for (std::size_t m = 0; m < n / 2; ++m) {
    const cplx r = root(m, n);
    w[m] = inverse ? std::conj(r) : r;
  }
  for (std::size_t len = 2; len <= n; len <<= 1) {
    const std::size_t half = len / 2, stride = n / len;
    for (std::size_t i = 0; i < n; i += len)
      for (std::size_t k = 0; k < half; ++k) {
        const cplx t = times(w[k * stride], a[i + k + half]);
        a[i + k + half] = a[i + k] - t;
        a[i + k] += t;
      }
  }
}

}  // namespace

std::vector<cplx> dft(const std::vector<cplx>& x) {
  const std::size_t n = x.size();
  if (power_of_two(n) || n == 0) {
    std::vector<cplx> a = x;
    radix2(a, false);
    return a;
  }
  // Bluestein: j k = (j^2 + k^2 - (k - j)^2) / 2, so X_k = c_k sum_j (x_j c_j) conj(c_(k-j))
  // with the chirp c_j = exp(-pi i j^2 / n): a convolution, worked as a product of radix-2
  // transforms of length M >= 2n - 1. The chirp's angle is j^2 mod 2n over 2n, exactly.
  std::size_t m = 1;
  while (m < 2 * n - 1) m <<= 1;
  const auto big_n = static_cast<std::uint64_t>(n);
  std::vector<cplx> chirp(n);
  for (std::size_t j = 0; j < n; ++j) {
    const auto jj = static_cast<std::uint64_t>(j);
    chirp[j] = root(jj * jj % (2 * big_n), 2 * big_n);
  }
  std::vector<cplx> a(m, cplx(0.0, 0.0)), b(m, cplx(0.0, 0.0));
  for (std::size_t j = 0; j < n; ++j) a[j] = times(x[j], chirp[j]);
  b[0] = std::conj(chirp[0]);
  for (std::size_t j = 1; j < n; ++j) b[j] = b[m - j] = std::conj(chirp[j]);
  radix2(a, false);
  radix2(b, false);
  for (std::size_t k = 0; k < m; ++k) a[k] = times(a[k], b[k]);
  radix2(a, true);
  const double scale = 1.0 / static_cast<double>(m);  // m a power of two: exact
  std::vector<cplx> out(n);
  for (std::size_t k = 0; k < n; ++k) out[k] = times(chirp[k], a[k] * scale);
  return out;
}

std::vector<double> power_spectrum(const std::vector<double>& x) {
  std::vector<cplx> c(x.size());
  for (std::size_t j = 0; j < x.size(); ++j) c[j] = cplx(x[j], 0.0);
  const std::vector<cplx> f = dft(c);
  std::vector<double> p(f.size());
  for (std::size_t k = 0; k < f.size(); ++k) p[k] = std::norm(f[k]);
  return p;
}

}  // namespace lapwing
