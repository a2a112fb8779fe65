// The discrete Fourier transform of a series of any length, in O(n log n): a radix-2 fast
// transform (Cooley & Tukey, Math. Comp. 19 (1965) 297) where n is a power of two, else
// Bluestein's chirp z-transform over one (Bluestein, IEEE Trans. Audio Electroacoust. 18 (1970)
// 451; as in Press et al., Numerical Recipes, 3rd ed., sec. 12.3; from memory). For the
// smoother's closed paths (path/smoothing.cpp), whose penalty is circulant: its fit and its
// residuals are products in this basis.
#pragma once

#include <complex>
#include <vector>

namespace lapwing {

/// X_k = sum_j x_j exp(-2 pi i j k / n), k = 0..n-1 (unnormalised; empty for an empty x).
/// Each angle is reduced exactly (integer arithmetic) before its cosine and sine, so the error
/// is that of the transform's additions: some eps log2(n) of the series' norm per term.
std::vector<std::complex<double>> dft(const std::vector<std::complex<double>>& x);

/// |X_k|^2 of a real series (the same transform), k = 0..n-1.
std::vector<double> power_spectrum(const std::vector<double>& x);

}  // namespace lapwing
