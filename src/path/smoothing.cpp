#include "lapwing/path/smoothing.hpp"

#include <Eigen/Sparse>
#include <Eigen/SparseCholesky>

#include <cmath>
#include <stdexcept>

#include "lapwing/base/units.hpp"

namespace lapwing {

double smoothing_lambda(double h, double length, int order) {
  const double s = 2.0 * std::sin(units::pi * std::min(0.5, h / length));
  return 1.0 / std::pow(s, 2 * order);
}

std::vector<double> smooth(const std::vector<double>& y, double h, double length, int order,
                           bool periodic) {
  const auto n = static_cast<Eigen::Index>(y.size());
  if (length <= 0.0 || n < order + 2) return y;
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
  Eigen::SparseMatrix<double> d(rows, n);
  d.setFromTriplets(t.begin(), t.end());
  Eigen::SparseMatrix<double> a = smoothing_lambda(h, length, order) * (d.transpose() * d);
  Eigen::SparseMatrix<double> eye(n, n);
  eye.setIdentity();
  a += eye;
  Eigen::SimplicialLDLT<Eigen::SparseMatrix<double>> solver(a);
  if (solver.info() != Eigen::Success) throw std::runtime_error("smoothing: factorisation failed");
  const Eigen::VectorXd b = Eigen::Map<const Eigen::VectorXd>(y.data(), n);
  const Eigen::VectorXd f = solver.solve(b);
  return std::vector<double>(f.data(), f.data() + n);
}

}  // namespace lapwing
