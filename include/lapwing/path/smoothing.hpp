// Penalised least-squares smoothing of evenly spaced samples (Whittaker-Henderson; Eilers,
// Analytical Chemistry 75 (2003) 3631):
//   minimise |y - f|^2 + lambda |D_d f|^2,  i.e. solve (I + lambda D_d' D_d) f = y,
// with D_d the d-th order difference operator (periodic for closed paths), solved by LDL' on the
// matrix's envelope, in binary128 where double precision would not hold the result (a strength
// of hundreds of metres on 1 m samples puts lambda at 1e13..1e17). The strength is a length: the
// wavelength the smoother halves, so that the same number means the same thing whatever the sample
// spacing:
//   lambda = 1 / (2 sin(pi h / L))^(2 d)   (the filter's response 1 / (1 + lambda (2
//   sin(w/2))^(2d)) is 1/2 at the wavenumber w = 2 pi h / L).
//
// The strength can also be chosen from the data by generalised cross-validation (Craven & Wahba,
// Numer. Math. 31 (1979) 377): the lambda that minimises
//   GCV(lambda) = n sum (y - f)^2 / (n - tr H)^2,   H = (I + lambda D'D)^-1 (the hat matrix).
// On a closed, evenly sampled path D'D is circulant, and so is H: its eigenvalues are
// 1 / (1 + lambda (2 - 2 cos(2 pi k / n))^d), so tr H costs O(n) per lambda. On an open path tr H
// is estimated with random +-1 probes z, tr H ~ mean(z' H z) (the stochastic trace estimate of
// Hutchinson, Commun. Stat. Simul. Comput. 18 (1989) 1059, from memory): the same probes for
// every lambda, from a fixed seed, so that the choice is deterministic and GCV a smooth function
// of lambda.
#pragma once

#include <vector>

#include "lapwing/model/track.hpp"

namespace lapwing {

/// lambda of the filter that halves the wavelength `length_m` at sample spacing `spacing_m`.
double smoothing_lambda(double spacing_m, double length_m, int order);
/// The inverse: the wavelength halved by `lambda` at `spacing_m` (at least 2 spacings, the
/// shortest wavelength evenly spaced samples hold).
double smoothing_length(double spacing_m, double lambda, int order);

std::vector<double> smooth(const std::vector<double>& y, double spacing_m, double length_m,
                           int order, bool periodic);
/// The same with lambda given.
std::vector<double> smooth_lambda(const std::vector<double>& y, double lambda, int order,
                                  bool periodic);
/// Several series of one length smoothed alike (x and y of a path, its two edges): each the
/// same as smooth() gives it, from one factorisation of the system for all of them.
std::vector<std::vector<double>> smooth_all(const std::vector<std::vector<double>>& ys,
                                            double spacing_m, double length_m, int order,
                                            bool periodic);
std::vector<std::vector<double>> smooth_lambda_all(const std::vector<std::vector<double>>& ys,
                                                   double lambda, int order, bool periodic);

/// What generalised cross-validation chose for a set of series smoothed with one lambda (x and y
/// of a path, so that the fit does not depend on the axes' directions).
struct SmoothingChoice {
  double length_m = 0.0;        // the chosen wavelength halved (see smoothing_lambda)
  double lambda = 0.0;          // at the spacing it was chosen on
  double spacing_m = 0.0;       // of the samples it was chosen on
  double noise_rms = 0.0;       // per series: sqrt(RSS / (k (n - tr H))), the noise estimate
  double equivalent_dof = 0.0;  // tr H, the fit's equivalent number of parameters
  int samples = 0;              // n
  bool at_lower_bound = false;  // the minimum lay at the shortest length searched: the data
                                // hold no noise GCV can tell from signal at this spacing
  bool at_upper_bound = false;  // ... at the longest: the data look like noise throughout
  bool exact_trace = false;     // circulant formula (closed) or Hutchinson estimate (open)
};

/// What a fit records of a GCV choice made at `spacing_m` (the spacing its length refers to).
inline SmoothingInfo automatic_smoothing_info(const SmoothingChoice& g, double spacing_m) {
  return {true, g.noise_rms, spacing_m, g.at_lower_bound, g.at_upper_bound, g.exact_trace};
}

/// GCV over the lengths [min_length_m, max_length_m] (log-spaced candidates, then a golden-section
/// refinement of the best bracket to 0.1 %). All series have the same size, at least order + 3
/// samples, evenly spaced at `spacing_m`; periodic for a closed path.
SmoothingChoice choose_smoothing(const std::vector<std::vector<double>>& series, double spacing_m,
                                 int order, bool periodic, double min_length_m,
                                 double max_length_m);

}  // namespace lapwing
