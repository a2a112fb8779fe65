// A convex quadratic programme with simple bounds, solved by projected Newton steps (Bertsekas,
// "Projected Newton methods for optimization problems with simple constraints", SIAM J. Control
// Optim. 20 (1982) 221):
//   minimise 1/2 x'Hx + g'x  subject to  lo <= x <= hi,   H sparse, symmetric positive definite.
// Each step solves the Newton system on the variables that are not held at a bound by the
// gradient (the others keep their bound), with Eigen's sparse LDLT, and searches along the
// projected arc x(t) = P(x + t d) (Armijo). The binding set is re-read every step, so variables
// leave a bound as soon as the gradient turns inward. For the racing line (racing_line.hpp) H is
// banded, periodic for a closed track: the factorisation costs O(n), and its pattern is analysed
// once (binding rows and columns are replaced by the identity, not removed).
#pragma once

#include <Eigen/Sparse>

namespace lapwing {

struct BoxQpResult {
  Eigen::VectorXd x;
  int iterations = 0;
  bool converged = false;           // the projected Newton step fell within `tolerance`
  double projected_gradient = 0.0;  // max |P(x - (Hx + g)) - x| at the last step
};

/// `x0` is the start (projected onto the box); `tolerance` on the size of the projected Newton
/// step, in the units of x (max norm). lo <= hi componentwise.
BoxQpResult solve_box_qp(const Eigen::SparseMatrix<double>& h, const Eigen::VectorXd& g,
                         const Eigen::VectorXd& lo, const Eigen::VectorXd& hi,
                         const Eigen::VectorXd& x0, double tolerance = 1e-9,
                         int max_iterations = 200);

}  // namespace lapwing
