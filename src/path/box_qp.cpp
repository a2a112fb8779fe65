#include "lapwing/path/box_qp.hpp"

#include <Eigen/SparseCholesky>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <stdexcept>
#include <vector>

namespace lapwing {

namespace {

Eigen::VectorXd project(const Eigen::VectorXd& x, const Eigen::VectorXd& lo,
                        const Eigen::VectorXd& hi) {
  return x.cwiseMax(lo).cwiseMin(hi);
}

double objective(const Eigen::SparseMatrix<double>& h, const Eigen::VectorXd& g,
                 const Eigen::VectorXd& x) {
  return 0.5 * x.dot(h * x) + g.dot(x);
}

}  // namespace

BoxQpResult solve_box_qp(const Eigen::SparseMatrix<double>& h, const Eigen::VectorXd& g,
                         const Eigen::VectorXd& lo, const Eigen::VectorXd& hi,
                         const Eigen::VectorXd& x0, double tolerance, int max_iterations) {
  const Eigen::Index n = g.size();
  assert(h.rows() == n && h.cols() == n && lo.size() == n && hi.size() == n);
  assert((lo.array() <= hi.array()).all());
  BoxQpResult r;
  r.x = project(x0, lo, hi);
  // The reduced matrix keeps H's pattern (binding rows and columns become the identity), so the
  // pattern is analysed once.
  Eigen::SparseMatrix<double> reduced = h;
  reduced.makeCompressed();
  Eigen::SimplicialLDLT<Eigen::SparseMatrix<double>> ldlt;
  ldlt.analyzePattern(reduced);
  std::vector<char> binding(static_cast<std::size_t>(n));
  double q = objective(h, g, r.x);
  for (r.iterations = 0; r.iterations < max_iterations; ++r.iterations) {
    const Eigen::VectorXd grad = h * r.x + g;
    r.projected_gradient = (project(r.x - grad, lo, hi) - r.x).cwiseAbs().maxCoeff();
    if (r.projected_gradient == 0.0) {
      r.converged = true;
      break;
    }
    // Binding: within eps of a bound with the gradient pushing out (Bertsekas' eps-active set,
    // eps no larger than the projected gradient, so that the set settles as x converges).
    const double eps = std::min(1e-6, r.projected_gradient);
    for (Eigen::Index i = 0; i < n; ++i)
      binding[static_cast<std::size_t>(i)] =
          (r.x[i] <= lo[i] + eps && grad[i] > 0.0) || (r.x[i] >= hi[i] - eps && grad[i] < 0.0);
    for (Eigen::Index k = 0; k < reduced.outerSize(); ++k) {
      Eigen::SparseMatrix<double>::InnerIterator hit(h, k);
      for (Eigen::SparseMatrix<double>::InnerIterator it(reduced, k); it; ++it, ++hit) {
        const bool b = binding[static_cast<std::size_t>(it.row())] ||
                       binding[static_cast<std::size_t>(it.col())];
        it.valueRef() = b ? (it.row() == it.col() ? 1.0 : 0.0) : hit.value();
      }
    }
    ldlt.factorize(reduced);
    if (ldlt.info() != Eigen::Success) throw std::runtime_error("box QP: factorisation failed");
    Eigen::VectorXd rhs = -grad;
    for (Eigen::Index i = 0; i < n; ++i)
      if (binding[static_cast<std::size_t>(i)]) rhs[i] = 0.0;
    const Eigen::VectorXd d = ldlt.solve(rhs);
    // Converged when the whole projected Newton step is within the tolerance (in x's units:
    // the gradient's own size depends on H's scale).
    const Eigen::VectorXd full = project(r.x + d, lo, hi);
    if ((full - r.x).cwiseAbs().maxCoeff() <= tolerance) {
      if (objective(h, g, full) <= q) r.x = full;
      r.converged = true;
      break;
    }
    // Armijo along the projected arc (sigma = 1e-4, halving).
    double t = 1.0;
    Eigen::VectorXd next;
    double q_next = q;
    for (int k = 0; k < 40; ++k, t *= 0.5) {
      next = project(r.x + t * d, lo, hi);
      q_next = objective(h, g, next);
      if (q_next <= q + 1e-4 * grad.dot(next - r.x)) break;
    }
    if (!(q_next < q)) break;  // no descent left at this precision: the caller reads converged
    r.x = next;
    q = q_next;
  }
  return r;
}

}  // namespace lapwing
