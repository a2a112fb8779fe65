// The Whittaker smoother's strength chosen by generalised cross-validation (Craven & Wahba,
// Numer. Math. 31 (1979) 377; Eilers, Analytical Chemistry 75 (2003) 3631): the circulant
// trace formula against the trace of the hat matrix inverted densely, the stochastic trace
// estimate against the same, the noise estimate against the noise put in, and the chosen
// strength against the best one (the fit's error to the true signal, which GCV does not see).
#include <doctest/doctest.h>

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <vector>

#include "lapwing/base/fft.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/path/smoothing.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;
using lapwing::test::Noise;

namespace {

// tr (I + lambda D'D)^-1, inverted densely: the reference for the trace formulas.
double dense_trace(int n, int order, bool periodic, double lambda) {
  std::vector<double> coef(static_cast<std::size_t>(order) + 1);
  for (int k = 0; k <= order; ++k) {
    double c = 1.0;
    for (int j = 0; j < k; ++j) c = c * (order - j) / (j + 1);
    coef[static_cast<std::size_t>(k)] = ((order - k) % 2 ? -1.0 : 1.0) * c;
  }
  const int rows = periodic ? n : n - order;
  Eigen::MatrixXd d = Eigen::MatrixXd::Zero(rows, n);
  for (int r = 0; r < rows; ++r)
    for (int k = 0; k <= order; ++k) d(r, (r + k) % n) += coef[static_cast<std::size_t>(k)];
  const Eigen::MatrixXd a = Eigen::MatrixXd::Identity(n, n) + lambda * d.transpose() * d;
  return a.inverse().trace();
}

// A smooth signal of a few wavelengths (the whole length down to 50 samples), sampled at h over
// n samples (periodic over n h).
std::vector<double> signal(int n, double h) {
  std::vector<double> y(static_cast<std::size_t>(n));
  const double length = n * h;
  for (int i = 0; i < n; ++i) {
    const double s = i * h;
    y[static_cast<std::size_t>(i)] =
        40.0 * std::sin(2 * units::pi * s / length) + 6.0 * std::cos(6 * units::pi * s / length) +
        2.0 * std::sin(14 * units::pi * s / length) + 1.0 * std::cos(2 * units::pi * s / (50 * h));
  }
  return y;
}

}  // namespace

TEST_CASE("the smoothing length and lambda invert each other") {
  for (int order : {1, 2, 3})
    for (double length : {3.0, 20.0, 150.0}) {
      CAPTURE(order);
      CAPTURE(length);
      CHECK(
          near(smoothing_length(1.0, smoothing_lambda(1.0, length, order), order), length, 1e-12));
    }
  // At two spacings or less the filter halves the shortest wavelength the samples hold.
  CHECK(smoothing_length(2.0, smoothing_lambda(2.0, 3.0, 3), 3) == 4.0);
}

TEST_CASE("on a closed path the circulant trace equals the dense hat matrix's trace") {
  // eigenvalues 1 / (1 + lambda (2 - 2 cos(2 pi k / n))^d) (REFERENCES.md, smoothing): exact,
  // so to round-off.
  const int n = 120;
  Noise noise{0x2545F4914F6CDD1Dull};
  std::vector<double> y = signal(n, 2.0), x = signal(n, 2.0);
  for (auto& v : y) v += 0.5 * noise.gauss();
  for (auto& v : x) v = 0.3 * v + 0.5 * noise.gauss();
  const SmoothingChoice c = choose_smoothing({x, y}, 2.0, 3, true, 4.0, 200.0);
  CHECK(c.exact_trace);
  CHECK(near(c.equivalent_dof, dense_trace(n, 3, true, c.lambda), 1e-10));
}

TEST_CASE("on a closed path the residuals' spectral sum equals a dense solve's") {
  // choose_smoothing reads a closed path's candidates from the series' power spectrum:
  // ||y - H y||^2 = (1 / n) sum_k |Y_k|^2 (lambda e_k / (1 + lambda e_k))^2, e_k = (2 - 2 cos(2
  // pi k / n))^d the circulant D'D's eigenvalues (Parseval's theorem on a circulant hat matrix).
  // Checked against (I + lambda D'D) f = y solved densely (Eigen's LU, double precision: the
  // strengths here keep its condition number under 1e6, so it is good to some 1e-10), and
  // against the smoother's own fit, on a noisy circuit-like series (a large mean and swing, as
  // coordinates have): within 1e-9 of each other.
  const int n = 400, order = 3;
  const double h = 1.0;
  Noise noise{0x9E3779B97F4A7C15ull};
  std::vector<double> y = signal(n, h);
  for (auto& v : y) v = 10.0 * v + 500.0 + 0.2 * noise.gauss();
  const std::vector<double> p = power_spectrum(y);
  std::vector<double> coef(order + 1);
  for (int k = 0; k <= order; ++k) {
    double c = 1.0;
    for (int j = 0; j < k; ++j) c = c * (order - j) / (j + 1);
    coef[static_cast<std::size_t>(k)] = ((order - k) % 2 ? -1.0 : 1.0) * c;
  }
  Eigen::MatrixXd d = Eigen::MatrixXd::Zero(n, n);
  for (int r = 0; r < n; ++r)
    for (int k = 0; k <= order; ++k) d(r, (r + k) % n) += coef[static_cast<std::size_t>(k)];
  const Eigen::MatrixXd dtd = d.transpose() * d;
  const Eigen::VectorXd yv = Eigen::Map<const Eigen::VectorXd>(y.data(), n);
  for (const double length : {2.0, 4.0, 8.0, 16.0}) {
    const double lambda = smoothing_lambda(h, length, order);
    const Eigen::MatrixXd a = Eigen::MatrixXd::Identity(n, n) + lambda * dtd;
    const Eigen::VectorXd f = a.partialPivLu().solve(yv);
    const double dense = (yv - f).squaredNorm();
    const std::vector<double> fit = smooth_lambda(y, lambda, order, true);
    double own = 0.0, spectral = 0.0;
    for (std::size_t i = 0; i < y.size(); ++i) own += (y[i] - fit[i]) * (y[i] - fit[i]);
    for (std::size_t k = 0; k < y.size(); ++k) {
      const double e =
          std::pow(2.0 - 2.0 * std::cos(2.0 * units::pi * static_cast<double>(k) / n), order);
      const double r = lambda * e / (1.0 + lambda * e);
      spectral += p[k] * r * r;
    }
    spectral /= n;
    CAPTURE(length);
    CAPTURE(lambda);
    CHECK(std::abs(spectral - dense) <= 1e-9 * dense);
    CHECK(std::abs(own - dense) <= 1e-9 * dense);
  }
}

TEST_CASE("series smoothed together are each what smoothing it alone gives") {
  // smooth_all smooths them with one factorisation (an open path: the same factors and the same
  // solve as one series alone, so the same numbers, ==) or two at a time through one complex
  // transform (a closed path: the same to the transform's rounding, within 1e-12 of the
  // series' swing), at a weak strength and a strong one; series of different lengths are
  // refused.
  Noise noise{7};
  std::vector<double> a = signal(600, 1.0), b(a.rbegin(), a.rend());
  for (auto& v : a) v += 0.3 * noise.gauss();
  for (auto& v : b) v += 0.3 * noise.gauss();
  const auto swing = [](const std::vector<double>& y) {
    return *std::max_element(y.begin(), y.end()) - *std::min_element(y.begin(), y.end());
  };
  for (const bool periodic : {true, false})
    for (const double length : {3.0, 300.0}) {
      CAPTURE(periodic);
      CAPTURE(length);
      const auto both = smooth_all({a, b}, 1.0, length, 3, periodic);
      REQUIRE(both.size() == 2);
      const std::vector<double> alone_a = smooth(a, 1.0, length, 3, periodic);
      const std::vector<double> alone_b = smooth(b, 1.0, length, 3, periodic);
      if (!periodic) {
        CHECK(both[0] == alone_a);
        CHECK(both[1] == alone_b);
      }
      double worst_a = 0.0, worst_b = 0.0;
      for (std::size_t i = 0; i < a.size(); ++i) {
        worst_a = std::max(worst_a, std::abs(both[0][i] - alone_a[i]));
        worst_b = std::max(worst_b, std::abs(both[1][i] - alone_b[i]));
      }
      CHECK(worst_a <= 1e-12 * swing(a));
      CHECK(worst_b <= 1e-12 * swing(b));
    }
  CHECK_THROWS_AS(smooth_all({a, std::vector<double>(5, 0.0)}, 1.0, 30.0, 3, true),
                  std::invalid_argument);
}

TEST_CASE("a closed path's smoothing passes each sinusoid by its circulant gain") {
  // On a closed path D'D is circulant: its eigenvectors are the sinusoids of the n samples, with
  // eigenvalues (2 - 2 cos(2 pi k / n))^d, so (I + lambda D'D)^-1 passes cos and sin of
  // frequency k by 1 / (1 + lambda (2 - 2 cos(2 pi k / n))^d) and a constant whole (the DFT's
  // diagonalisation of circulant matrices: Davis, Circulant Matrices, 1979; from memory). A
  // constant, a circuit-sized swing at k = 1 and smaller ones at k = 3 and 40, on 2 742 samples
  // (not a power of two) and 4 096, from the weakest strength searched to one beyond the
  // strongest (lambda 4^3 up to 1e19): within 1e-12 of the swing everywhere, the gain's own
  // reference in long double.
  for (const int n : {2742, 4096}) {
    for (const double length : {2.0, 20.0, 200.0, 2000.0, 20000.0}) {
      const double lambda = smoothing_lambda(1.0, length, 3);
      const auto gain = [&](int k) {
        const long double c = std::cos(2.0L * 3.141592653589793238462643383279502884L * k / n);
        return static_cast<double>(1.0L / (1.0L + lambda * std::pow(2.0L - 2.0L * c, 3)));
      };
      std::vector<double> y(static_cast<std::size_t>(n)), want(y.size());
      for (int j = 0; j < n; ++j) {
        const double t = 2.0 * units::pi * j / n;
        y[static_cast<std::size_t>(j)] =
            4.0e5 + 500.0 * std::cos(t) + 20.0 * std::sin(3.0 * t) + 0.5 * std::cos(40.0 * t);
        want[static_cast<std::size_t>(j)] = 4.0e5 + 500.0 * gain(1) * std::cos(t) +
                                            20.0 * gain(3) * std::sin(3.0 * t) +
                                            0.5 * gain(40) * std::cos(40.0 * t);
      }
      const std::vector<double> f = smooth(y, 1.0, length, 3, true);
      double worst = 0.0;
      for (std::size_t i = 0; i < y.size(); ++i) worst = std::max(worst, std::abs(f[i] - want[i]));
      CAPTURE(n);
      CAPTURE(length);
      CHECK(worst <= 1e-12 * 1000.0);
    }
  }
}

TEST_CASE("on an open path the stochastic trace estimate is within 1 % of n - tr H") {
  // GCV's denominator is n - tr H: 16 +-1 probes estimate tr H with a standard error of about
  // sqrt(2 tr(H^2) / 16), here a few per cent of tr H, which is a small part of n.
  const int n = 400;
  Noise noise{0x2545F4914F6CDD1Dull};
  std::vector<double> y = signal(n, 1.0);
  for (auto& v : y) v += 0.5 * noise.gauss();
  const SmoothingChoice c = choose_smoothing({y}, 1.0, 2, false, 2.0, 100.0);
  CHECK_FALSE(c.exact_trace);
  const double exact = dense_trace(n, 2, false, c.lambda);
  CHECK(near(n - c.equivalent_dof, n - exact, 0.01));
  CHECK(near(c.equivalent_dof, exact, 0.15));  // the estimate itself: within 15 %
}

TEST_CASE("GCV's noise estimate matches the noise put in, and its fit is near the best one") {
  // Gaussian noise of 0.3 on 2 x 2000 samples: the estimate sqrt(RSS / (k (n - tr H))) has a
  // relative standard error of about 1 / sqrt(2 k n) = 1.1 %: within 5 %. The fit's mean squared
  // error to the true signal at GCV's lambda against the least over lambda (a fine scan):
  // GCV is asymptotically optimal (Craven & Wahba 1979), within 30 % here.
  const int n = 2000;
  const double h = 1.0, sigma = 0.3;
  Noise noise{0x2545F4914F6CDD1Dull};
  const std::vector<double> truth_x = signal(n, h);
  std::vector<double> truth_y(truth_x.rbegin(), truth_x.rend());
  std::vector<double> x = truth_x, y = truth_y;
  for (auto& v : x) v += sigma * noise.gauss();
  for (auto& v : y) v += sigma * noise.gauss();
  for (bool periodic : {true, false}) {
    CAPTURE(periodic);
    const SmoothingChoice c = choose_smoothing({x, y}, h, 3, periodic, 2.0, 100.0);
    CHECK_FALSE(c.at_lower_bound);
    CHECK_FALSE(c.at_upper_bound);
    CHECK(near(c.noise_rms, sigma, 0.05));
    auto mse = [&](double length) {
      const auto fx = smooth(x, h, length, 3, periodic), fy = smooth(y, h, length, 3, periodic);
      double e = 0.0;
      for (int i = 0; i < n; ++i) {
        const auto k = static_cast<std::size_t>(i);
        e += std::pow(fx[k] - truth_x[k], 2) + std::pow(fy[k] - truth_y[k], 2);
      }
      return e / (2 * n);
    };
    double best = mse(c.length_m);
    for (double length = 2.0; length <= 100.0; length *= 1.05) best = std::min(best, mse(length));
    CHECK(mse(c.length_m) <= 1.3 * best);
  }
}

TEST_CASE("noise-free samples put GCV's choice at the shortest length searched") {
  // A signal with no noise: every bit of smoothing costs fit, so GCV goes as short as it may,
  // and says so.
  const SmoothingChoice c = choose_smoothing({signal(500, 1.0)}, 1.0, 3, true, 2.0, 100.0);
  CHECK(c.at_lower_bound);
  CHECK(c.noise_rms < 1e-3);
}
