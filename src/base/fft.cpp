#include "lapwing/base/fft.hpp"

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <utility>

#include "lapwing/base/once_per_key.hpp"
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

// What a transform of length n needs beside its data, made once per length (the smoother
// transforms series of the same length again and again): the radix-2 roots of the transform's
// own length m (n, or Bluestein's power of two), and for Bluestein the chirp and its
// conjugate's transform.
struct Plan {
  std::size_t m = 0;
  std::vector<cplx> roots;   // exp(-2 pi i k / m), k < m / 2
  std::vector<cplx> chirp;   // exp(-pi i j^2 / n), j < n (Bluestein)
  std::vector<cplx> kernel;  // the transform of conj(chirp), wrapped to length m
};

// In place, a.size() = m a power of two with `roots` its roots: iterative radix 2, decimation in
// time. `inverse`: the conjugate roots (no 1 / m).
void radix2(std::vector<cplx>& a, const std::vector<cplx>& roots, bool inverse) {
  const std::size_t n = a.size();
  if (n < 2) return;
  for (std::size_t i = 1, j = 0; i < n; ++i) {  // bit-reversed order
    std::size_t bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) std::swap(a[i], a[j]);
  }
  for (std::size_t len = 2; len <= n; len <<= 1) {
    const std::size_t half = len / 2, stride = n / len;
    for (std::size_t i = 0; i < n; i += len)
      for (std::size_t k = 0; k < half; ++k) {
        const cplx w = inverse ? std::conj(roots[k * stride]) : roots[k * stride];
        const cplx t = times(w, a[i + k + half]);
        a[i + k + half] = a[i + k] - t;
        a[i + k] += t;
      }
  }
}

std::shared_ptr<const Plan> plan_for(std::size_t n) {
  return recent_per_key<Plan, 4>(n, [n] {
    auto p = std::make_shared<Plan>();
    p->m = 1;
    if (power_of_two(n))
      p->m = n;
    else
      while (p->m < 2 * n - 1) p->m <<= 1;
    p->roots.resize(p->m / 2);
    for (std::size_t k = 0; k < p->m / 2; ++k) p->roots[k] = root(k, p->m);
    if (p->m != n) {
      // Bluestein: j k = (j^2 + k^2 - (k - j)^2) / 2, so X_k = c_k sum_j (x_j c_j) conj(c_(k-j))
      // with the chirp c_j = exp(-pi i j^2 / n): a convolution, worked as a product of radix-2
      // transforms of length m >= 2n - 1. The chirp's angle is j^2 mod 2n over 2n, exactly.
      const auto big_n = static_cast<std::uint64_t>(n);
      p->chirp.resize(n);
      for (std::size_t j = 0; j < n; ++j) {
        const auto jj = static_cast<std::uint64_t>(j);
        p->chirp[j] = root(jj * jj % (2 * big_n), 2 * big_n);
      }
      p->kernel.assign(p->m, cplx(0.0, 0.0));
      p->kernel[0] = std::conj(p->chirp[0]);
      for (std::size_t j = 1; j < n; ++j)
        p->kernel[j] = p->kernel[p->m - j] = std::conj(p->chirp[j]);
      radix2(p->kernel, p->roots, false);
    }
    return std::shared_ptr<const Plan>(std::move(p));
  });
}

}  // namespace

std::vector<cplx> dft(const std::vector<cplx>& x) {
  const std::size_t n = x.size();
  if (n == 0) return {};
  const std::shared_ptr<const Plan> plan = plan_for(n);
  if (plan->m == n) {
    std::vector<cplx> a = x;
    radix2(a, plan->roots, false);
    return a;
  }
  const std::size_t m = plan->m;
  std::vector<cplx> a(m, cplx(0.0, 0.0));
  for (std::size_t j = 0; j < n; ++j) a[j] = times(x[j], plan->chirp[j]);
  radix2(a, plan->roots, false);
  for (std::size_t k = 0; k < m; ++k) a[k] = times(a[k], plan->kernel[k]);
  radix2(a, plan->roots, true);
  const double scale = 1.0 / static_cast<double>(m);  // m a power of two: exact
  std::vector<cplx> out(n);
  for (std::size_t k = 0; k < n; ++k) out[k] = times(plan->chirp[k], a[k] * scale);
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
