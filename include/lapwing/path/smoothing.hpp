// Penalised least-squares smoothing of evenly spaced samples (Whittaker-Henderson):
//   minimise |y - f|^2 + lambda |D_d f|^2,  i.e. solve (I + lambda D_d' D_d) f = y,
// with D_d the d-th order difference operator (periodic for closed paths), solved by LDL' on the
// matrix's envelope, in binary128 where double precision would not hold the result (a strength
// of hundreds of metres on 1 m samples puts lambda at 1e13..1e17). The strength is a length: the
// wavelength the smoother halves, so that the same number means the same thing whatever the sample
// spacing:
//   lambda = 1 / (2 sin(pi h / L))^(2 d)   (the filter's response 1 / (1 + lambda (2
//   sin(w/2))^(2d)) is 1/2 at the wavenumber w = 2 pi h / L).
#pragma once

#include <vector>

namespace lapwing {

double smoothing_lambda(double spacing_m, double length_m, int order);

std::vector<double> smooth(const std::vector<double>& y, double spacing_m, double length_m,
                           int order, bool periodic);

}  // namespace lapwing
