#include "lapwing/path/smoothing.hpp"

#include <Eigen/Sparse>
#include <Eigen/SparseCholesky>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <cstdint>
#include <stdexcept>

#include "lapwing/base/units.hpp"

namespace lapwing {

namespace {

using SparseMatrix = Eigen::SparseMatrix<double>;

// D'D for the d-th difference operator on n samples (periodic: n rows, else n - d).
SparseMatrix penalty(Eigen::Index n, int order, bool periodic) {
  // Binomial coefficients of the d-th difference: (-1)^(d-k) C(d, k).
  std::vector<double> coef(static_cast<std::size_t>(order) + 1);
  for (int k = 0; k <= order; ++k) {
    double c = 1.0;
    for (int j = 0; j < k; ++j) c = c * (order - j) / (j + 1);
    coef[static_cast<std::size_t>(k)] = ((order - k) % 2 ? -1.0 : 1.0) * c;
  }
  const Eigen::Index rows = periodic ? n : n - order;
  std::vector<Eigen::Triplet<double>> t;
  for (Eigen::Index r = 0; r < rows; ++r)
    for (int k = 0; k <= order; ++k)
      t.emplace_back(r, (r + k) % n, coef[static_cast<std::size_t>(k)]);
  SparseMatrix d(rows, n);
  d.setFromTriplets(t.begin(), t.end());
  return SparseMatrix(d.transpose() * d);
}

SparseMatrix identity(Eigen::Index n) {
  SparseMatrix eye(n, n);
  eye.setIdentity();
  return eye;
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
  const auto n = static_cast<Eigen::Index>(y.size());
  if (n < order + 2) return y;
  SparseMatrix a = lambda * penalty(n, order, periodic);
  a += identity(n);
  Eigen::SimplicialLDLT<SparseMatrix> solver(a);
  if (solver.info() != Eigen::Success) throw std::runtime_error("smoothing: factorisation failed");
  const Eigen::VectorXd b = Eigen::Map<const Eigen::VectorXd>(y.data(), n);
  const Eigen::VectorXd f = solver.solve(b);
  return std::vector<double>(f.data(), f.data() + n);
}

SmoothingChoice choose_smoothing(const std::vector<std::vector<double>>& series, double h,
                                 int order, bool periodic, double min_length, double max_length) {
  assert(!series.empty());
  const auto n = static_cast<Eigen::Index>(series.front().size());
  assert(n >= order + 3 && min_length > 0.0 && max_length >= min_length);
  const double nd = static_cast<double>(n);
  const SparseMatrix p = penalty(n, order, periodic);
  const SparseMatrix eye = identity(n);
  Eigen::SimplicialLDLT<SparseMatrix> ldlt;
  ldlt.analyzePattern(SparseMatrix(eye + p));
  std::vector<Eigen::VectorXd> ys;
  for (const auto& s : series) ys.push_back(Eigen::Map<const Eigen::VectorXd>(s.data(), n));

  // Closed: the eigenvalues of the periodic D'D, (2 - 2 cos(2 pi k / n))^d.
  std::vector<double> eig;
  if (periodic)
    for (Eigen::Index k = 0; k < n; ++k)
      eig.push_back(
          std::pow(2.0 - 2.0 * std::cos(2.0 * units::pi * static_cast<double>(k) / nd), order));
  // Open: +-1 probes from a fixed-seed generator (64-bit LCG, Knuth's MMIX constants). 16 probes:
  // the estimate's error is a few tenths of tr H's own size, and tr H is a small part of n where
  // GCV's minimum lies, so n - tr H is known to well under 1 % (checked against the exact trace
  // in the tests).
  constexpr int probes = 16;
  std::vector<Eigen::VectorXd> z;
  if (!periodic) {
    std::uint64_t state = 0x853C49E6748FEA9Bull;
    for (int k = 0; k < probes; ++k) {
      Eigen::VectorXd v(n);
      for (Eigen::Index i = 0; i < n; ++i) {
        state = state * 6364136223846793005ull + 1442695040888963407ull;
        v[i] = (state >> 63) ? 1.0 : -1.0;
      }
      z.push_back(v);
    }
  }

  struct Eval {
    double length, lambda, gcv, rss, trace;
  };
  auto evaluate = [&](double length) {
    Eval e{length, smoothing_lambda(h, length, order), 0.0, 0.0, 0.0};
    ldlt.factorize(SparseMatrix(eye + e.lambda * p));
    if (ldlt.info() != Eigen::Success) throw std::runtime_error("smoothing: factorisation failed");
    for (const auto& y : ys) e.rss += (y - ldlt.solve(y)).squaredNorm();
    if (periodic) {
      for (double ek : eig) e.trace += 1.0 / (1.0 + e.lambda * ek);
    } else {
      for (const auto& v : z) e.trace += v.dot(ldlt.solve(v));
      e.trace /= probes;
    }
    // GCV = n RSS / (n - tr H)^2 (Craven & Wahba 1979), RSS summed over the series.
    e.gcv = nd * e.rss / std::pow(std::max(nd - e.trace, 1e-9), 2);
    return e;
  };

  // Log-spaced candidates, then golden-section search in log(length) inside the best bracket.
  constexpr int candidates = 41;
  const double lo = std::log(min_length), hi = std::log(max_length);
  std::vector<Eval> grid;
  for (int k = 0; k < candidates; ++k)
    grid.push_back(evaluate(std::exp(lo + (hi - lo) * k / (candidates - 1))));
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
  out.noise_rms =
      std::sqrt(chosen.rss / (static_cast<double>(ys.size()) * std::max(nd - chosen.trace, 1e-9)));
  out.at_lower_bound = best == 0;
  out.at_upper_bound = best + 1 == grid.size();
  out.exact_trace = periodic;
  return out;
}

}  // namespace lapwing
