#include "lapwing/path/smoothing.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <complex>
#include <cstdint>
#include <limits>
#include <memory>
#include <stdexcept>
#include <string>
#include <utility>
#include <variant>

#include "lapwing/base/fft.hpp"
#include "lapwing/base/halves.hpp"
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

  explicit Envelope(const std::vector<std::size_t>& first_column) : first(first_column) {
    start.resize(first.size() + 1, 0);
    for (std::size_t i = 0; i < first.size(); ++i) start[i + 1] = start[i] + (i - first[i] + 1);
    a.assign(start.back(), T(0));
  }
  T& at(std::size_t i, std::size_t j) { return a[start[i] + (j - first[i])]; }
  const T& at(std::size_t i, std::size_t j) const { return a[start[i] + (j - first[i])]; }

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
  void solve(std::vector<T>& x) const {
    const std::size_t n = first.size();
    for (std::size_t i = 0; i < n; ++i)
      for (std::size_t k = first[i]; k < i; ++k) x[i] -= at(i, k) * x[k];
    for (std::size_t i = 0; i < n; ++i) x[i] /= d[i];
    for (std::size_t i = n; i-- > 0;)
      for (std::size_t k = first[i]; k < i; ++k) x[k] -= at(i, k) * x[i];
  }
};

// Samples from which an open path's GCV candidate strengths are worked on two threads
// (choose_smoothing): each candidate is a factorisation of n rows and a solve for each series
// and each trace probe, most in binary128: some 1.5 ms a candidate on 2 742 samples (measured
// on the surveyed Brannock Park, before a closed path's candidates were read from the
// spectrum: 55 candidates in about 80 ms), where a thread's start costs some 0.1 ms.
constexpr std::size_t candidates_apart = 500;

// lambda 4^d below which double precision is enough: eps 1e5 = 2e-11 relative error.
constexpr double double_precision_limit = 1e5;

// (I + lambda D'D) f = y for one operator D (order d on n samples of an open path) and any
// lambda: factored once per lambda, solved for as many right-hand sides as wanted. Every solve of
// an open path's smoother, fixed strength or GCV's search, goes through here, so each has the
// precision above. A closed path's go through the transform instead (smooth_closed), whose
// circulant system it diagonalises.
class PenalisedSystem {
 public:
  PenalisedSystem(std::size_t n, int order) : n_(n), d_(static_cast<std::size_t>(order)) {
    // Binomial coefficients of the d-th difference: (-1)^(d-k) C(d, k).
    coef_.resize(d_ + 1);
    for (std::size_t k = 0; k <= d_; ++k) {
      double c = 1.0;
      for (std::size_t j = 0; j < k; ++j)
        c = c * static_cast<double>(d_ - j) / static_cast<double>(j + 1);
      coef_[k] = ((d_ - k) % 2 ? -1.0 : 1.0) * c;
    }
    // The envelope of I + lambda D'D: a band of half-width d.
    first_.resize(n);
    for (std::size_t i = 0; i < n; ++i) first_[i] = i > d_ ? i - d_ : 0;
  }

  // Factors I + lambda D'D in T: binary128 when double precision would lose more than about
  // 1e-11 of the result (the factorisation's error grows as eps lambda 4^d), else double (16
  // times faster).
  void factor(double lambda) {
    if (lambda * std::pow(4.0, static_cast<double>(d_)) < double_precision_limit)
      m_ = build<double>(lambda);
    else
      m_ = build<wide>(lambda);
  }

  std::vector<double> solve(const std::vector<double>& y) const {
    return std::visit(
        [&](const auto& m) {
          using T = typename std::decay_t<decltype(m)>::value_type;
          std::vector<T> f(y.begin(), y.end());
          m.solve(f);
          return std::vector<double>(f.begin(), f.end());
        },
        m_);
  }

 private:
  template <typename T>
  struct Factored : Envelope<T> {
    using value_type = T;
    using Envelope<T>::Envelope;
  };

  template <typename T>
  Factored<T> build(double lambda) const {
    Factored<T> m(first_);
    // Row r of D has coef[k] at column r + k: (D'D)_ij = sum_r D_ri D_rj.
    for (std::size_t r = 0; r + d_ < n_; ++r)
      for (std::size_t k1 = 0; k1 <= d_; ++k1)
        for (std::size_t k2 = 0; k2 <= d_; ++k2) {
          const std::size_t i = r + k1, j = r + k2;
          if (j <= i) m.at(i, j) += T(lambda) * T(coef_[k1] * coef_[k2]);
        }
    for (std::size_t i = 0; i < n_; ++i) m.at(i, i) += T(1);
    m.factor();
    return m;
  }

  std::size_t n_, d_;
  std::vector<double> coef_;
  std::vector<std::size_t> first_;
  std::variant<Factored<double>, Factored<wide>> m_{Factored<double>(std::vector<std::size_t>{})};
};

double squared_distance(const std::vector<double>& a, const std::vector<double>& b) {
  double s = 0.0;
  for (std::size_t i = 0; i < a.size(); ++i) s += (a[i] - b[i]) * (a[i] - b[i]);
  return s;
}

double dot(const std::vector<double>& a, const std::vector<double>& b) {
  double s = 0.0;
  for (std::size_t i = 0; i < a.size(); ++i) s += a[i] * b[i];
  return s;
}

// (I + lambda D'D) f = y on a closed path by the discrete Fourier transform, which
// diagonalises the circulant D'D: F_k = G_k Y_k with the gain G_k = 1 / (1 + lambda e_k), e_k =
// |1 - exp(2 pi i k / n)|^(2d) = (2 sin(pi k / n))^(2d) (the sine's form, exact for the small k
// of a circuit's shape, where 2 - 2 cos loses digits). Every gain lies in (0, 1]: nothing to
// factor and nothing ill conditioned at any lambda, where the factorisation needed binary128
// beyond lambda 4^d = 1e5 and lost some 2e-11 of the result in double below it. The gains are
// real and G_k = G_(n-k), so the filter maps real series to real ones: two series go through
// one complex transform as its real and imaginary parts. Each series' mean (k = 0, gain 1) is
// taken out first and put back, so that the transform's rounding is relative to its swing, not
// to its place (a circuit's coordinates).
std::vector<std::vector<double>> smooth_closed(const std::vector<std::vector<double>>& ys,
                                               double lambda, int order) {
  using cplx = std::complex<double>;
  const std::size_t n = ys.front().size();
  std::vector<double> gain(n);
  for (std::size_t k = 0; k < n; ++k) {
    const double s = 2.0 * std::sin(units::pi * static_cast<double>(std::min(k, n - k)) /
                                    static_cast<double>(n));
    gain[k] = 1.0 / (1.0 + lambda * std::pow(s * s, order));
  }
  const double inv_n = 1.0 / static_cast<double>(n);
  const auto mean_of = [&](const std::vector<double>& y) {
    double sum = 0.0;
    for (const double v : y) sum += v;
    return sum * inv_n;
  };
  std::vector<std::vector<double>> out(ys.size());
  for (std::size_t a = 0; a < ys.size(); a += 2) {
    const std::size_t b = a + 1;  // the imaginary part's series, where there is one
    const bool pair = b < ys.size();
    const double mean_a = mean_of(ys[a]), mean_b = pair ? mean_of(ys[b]) : 0.0;
    std::vector<cplx> z(n);
    for (std::size_t j = 0; j < n; ++j)
      z[j] = cplx(ys[a][j] - mean_a, pair ? ys[b][j] - mean_b : 0.0);
    std::vector<cplx> w = dft(z);
    // The inverse as the conjugate of the forward transform of the conjugate, over n.
    for (std::size_t k = 0; k < n; ++k) w[k] = std::conj(w[k] * gain[k]);
    w = dft(w);
    out[a].resize(n);
    for (std::size_t j = 0; j < n; ++j) out[a][j] = mean_a + w[j].real() * inv_n;
    if (pair) {
      out[b].resize(n);
      for (std::size_t j = 0; j < n; ++j) out[b][j] = mean_b - w[j].imag() * inv_n;
    }
  }
  return out;
}

}  // namespace

double smoothing_lambda(double h, double length, int order) {
  const double s = 2.0 * std::sin(units::pi * std::min(0.5, h / length));
  return 1.0 / std::pow(s, 2 * order);
}

double smoothing_length(double h, double lambda, int order) {
  // lambda = 1 / (2 sin(pi h / L))^(2d)  =>  L = pi h / asin(lambda^(-1/(2d)) / 2).
  const double s = std::pow(lambda, -1.0 / (2 * order));
  if (s >= 2.0) return 2.0 * h;
  return units::pi * h / std::asin(0.5 * s);
}

std::vector<double> smooth(const std::vector<double>& y, double h, double length, int order,
                           bool periodic) {
  if (length <= 0.0) return y;
  return smooth_lambda(y, smoothing_lambda(h, length, order), order, periodic);
}

std::vector<double> smooth_lambda(const std::vector<double>& y, double lambda, int order,
                                  bool periodic) {
  return smooth_lambda_all({y}, lambda, order, periodic).front();
}

std::vector<std::vector<double>> smooth_all(const std::vector<std::vector<double>>& ys, double h,
                                            double length, int order, bool periodic) {
  if (length <= 0.0) return ys;
  return smooth_lambda_all(ys, smoothing_lambda(h, length, order), order, periodic);
}

std::vector<std::vector<double>> smooth_lambda_all(const std::vector<std::vector<double>>& ys,
                                                   double lambda, int order, bool periodic) {
  if (ys.empty()) return {};
  const std::size_t n = ys.front().size();
  for (const auto& y : ys)
    if (y.size() != n)
      throw std::invalid_argument("smooth_lambda_all: series of " + std::to_string(y.size()) +
                                  " and " + std::to_string(n) + " samples");
  if (n < static_cast<std::size_t>(order) + 2) return ys;
  if (periodic) return smooth_closed(ys, lambda, order);
  PenalisedSystem system(n, order);
  system.factor(lambda);
  std::vector<std::vector<double>> out;
  out.reserve(ys.size());
  for (const auto& y : ys) out.push_back(system.solve(y));
  return out;
}

SmoothingChoice choose_smoothing(const std::vector<std::vector<double>>& series, double h,
                                 int order, bool periodic, double min_length, double max_length) {
  assert(!series.empty());
  const std::size_t n = series.front().size();
  assert(n >= static_cast<std::size_t>(order) + 3 && min_length > 0.0 && max_length >= min_length);
  const double nd = static_cast<double>(n);
  PenalisedSystem system(n, order);  // an open path's (a closed path's search needs none)

  // Closed: the eigenvalues of the periodic D'D, (2 - 2 cos(2 pi k / n))^d.
  std::vector<double> eig;
  if (periodic)
    for (std::size_t k = 0; k < n; ++k)
      eig.push_back(
          std::pow(2.0 - 2.0 * std::cos(2.0 * units::pi * static_cast<double>(k) / nd), order));
  // Open: +-1 probes from a fixed-seed generator (64-bit LCG, Knuth's MMIX constants). 16 probes:
  // the estimate's error is a few tenths of tr H's own size, and tr H is a small part of n where
  // GCV's minimum lies, so n - tr H is known to well under 1 % (checked against the exact trace
  // in the tests).
  constexpr int probes = 16;
  std::vector<std::vector<double>> z;
  if (!periodic) {
    std::uint64_t state = 0x853C49E6748FEA9Bull;
    for (int k = 0; k < probes; ++k) {
      std::vector<double> v(n);
      for (std::size_t i = 0; i < n; ++i) {
        state = state * 6364136223846793005ull + 1442695040888963407ull;
        v[i] = (state >> 63) ? 1.0 : -1.0;
      }
      z.push_back(v);
    }
  }

  // Closed: the residuals' sum of squares in the DFT's basis, where the penalty is diagonal
  // (the eigenvalues above): RSS = (1 / n) sum_k P_k (lambda e_k / (1 + lambda e_k))^2, P_k the
  // series' power spectra summed (Parseval). Each candidate in O(n) and double precision, each
  // factor at most 1: no system to factor, where binary128 took some 1.5 ms a candidate. The
  // search's comparisons read these, and the choice's figures (its noise, its equivalent degrees
  // of freedom) come from them too.
  // Each series' mean taken out first (its k = 0 term, which lambda e_0 = 0 leaves out of the
  // residuals anyway), so that the transform's rounding scales with its swing, not its place.
  std::vector<double> power;
  if (periodic) {
    power.assign(n, 0.0);
    for (const auto& y : series) {
      double mean = 0.0;
      for (const double v : y) mean += v;
      mean /= nd;
      std::vector<double> centred(y);
      for (double& v : centred) v -= mean;
      const std::vector<double> p = power_spectrum(centred);
      for (std::size_t k = 0; k < n; ++k) power[k] += p[k];
    }
  }

  struct Eval {
    double length, lambda, gcv, rss, trace;
  };
  auto evaluate_spectral = [&](double length) {
    Eval e{length, smoothing_lambda(h, length, order), 0.0, 0.0, 0.0};
    for (std::size_t k = 0; k < n; ++k) {
      const double le = e.lambda * eig[k], r = le / (1.0 + le);
      e.rss += power[k] * r * r;
      e.trace += 1.0 / (1.0 + le);
    }
    e.rss /= nd;
    e.gcv = nd * e.rss / std::pow(std::max(nd - e.trace, 1e-9), 2);
    return e;
  };
  auto evaluate_with = [&](PenalisedSystem& solver, double length) {
    Eval e{length, smoothing_lambda(h, length, order), 0.0, 0.0, 0.0};
    solver.factor(e.lambda);
    for (const auto& y : series) e.rss += squared_distance(y, solver.solve(y));
    for (const auto& v : z) e.trace += dot(v, solver.solve(v));  // an open path's alone
    e.trace /= probes;
    // GCV = n RSS / (n - tr H)^2 (Craven & Wahba 1979), RSS summed over the series.
    e.gcv = nd * e.rss / std::pow(std::max(nd - e.trace, 1e-9), 2);
    return e;
  };
  auto evaluate = [&](double length) {
    return periodic ? evaluate_spectral(length) : evaluate_with(system, length);
  };

  // Log-spaced candidates, then golden-section search in log(length) inside the best bracket.
  // A closed path's candidates from the spectrum (a few microseconds each). An open path's are
  // independent of each other: the even ones and the odd ones, on two threads where the series
  // are long enough to pay for one (each share with a system of its own; the same evaluations
  // either way, so the same choice to the bit). Alternate, not halves: the short lengths' weak
  // penalties factor in double precision, the long ones' in binary128 at some ten times the
  // cost.
  constexpr int candidates = 41;
  const double lo = std::log(min_length), hi = std::log(max_length);
  std::vector<Eval> grid(candidates);
  const auto length_at = [&](int k) { return std::exp(lo + (hi - lo) * k / (candidates - 1)); };
  if (periodic) {
    for (int k = 0; k < candidates; ++k)
      grid[static_cast<std::size_t>(k)] = evaluate_spectral(length_at(k));
  } else {
    const std::unique_ptr<SecondThread> second =
        n >= candidates_apart && usable_processors() >= 2 ? SecondThread::try_start() : nullptr;
    in_halves(2, second.get(), [&](std::size_t share, std::size_t) {
      PenalisedSystem own(n, order);
      for (int k = static_cast<int>(share); k < candidates; k += 2)
        grid[static_cast<std::size_t>(k)] = evaluate_with(own, length_at(k));
    });
  }
  std::size_t best = 0;
  for (std::size_t k = 1; k < grid.size(); ++k)
    if (grid[k].gcv < grid[best].gcv) best = k;
  Eval chosen = grid[best];
  if (best > 0 && best + 1 < grid.size()) {
    double a = std::log(grid[best - 1].length), b = std::log(grid[best + 1].length);
    const double r = 0.5 * (std::sqrt(5.0) - 1.0);
    double c = b - r * (b - a), d = a + r * (b - a);
    Eval ec = evaluate(std::exp(c)), ed = evaluate(std::exp(d));
    while (b - a > 1e-3) {
      if (ec.gcv < ed.gcv) {
        b = d, d = c, ed = ec;
        c = b - r * (b - a);
        ec = evaluate(std::exp(c));
      } else {
        a = c, c = d, ec = ed;
        d = a + r * (b - a);
        ed = evaluate(std::exp(d));
      }
    }
    for (const Eval& e : {ec, ed})
      if (e.gcv < chosen.gcv) chosen = e;
  }
  SmoothingChoice out;
  out.length_m = chosen.length;
  out.lambda = chosen.lambda;
  out.spacing_m = h;
  out.equivalent_dof = chosen.trace;
  out.samples = static_cast<int>(n);
  out.noise_rms = std::sqrt(
      chosen.rss / (static_cast<double>(series.size()) * std::max(nd - chosen.trace, 1e-9)));
  out.at_lower_bound = best == 0;
  out.at_upper_bound = best + 1 == grid.size();
  out.exact_trace = periodic;
  return out;
}

}  // namespace lapwing
