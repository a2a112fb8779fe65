// `lapwing fit`'s solve, lapwing::fit (Ceres Solver), comes to the command line from a module of
// its own, liblapwing_fit.so, loaded when `fit` runs: Ceres and the libraries it needs (glog,
// gflags, SuiteSparse, LAPACK, BLAS, some fifteen in all) are then not loaded by every other
// command, whose start they slowed by some 6 ms (DEVELOPERS.md, "The fit module").
#pragma once

#include <array>
#include <cstddef>
#include <stdexcept>
#include <vector>

#include "lapwing/study/fit.hpp"

namespace lapwing::cli {

// lapwing::fit's type (the command line has a FitOptions of its own: lapwing:: throughout).
using FitFunction = lapwing::FitResult (*)(const lapwing::ConfiguredCar&,
                                           const std::vector<lapwing::FitLog>&,
                                           const std::vector<lapwing::FitParameter>&,
                                           const lapwing::FitOptions&);

// What the module gives: the function, and what the binary checks before calling it (the
// version, and the sizes of the types that cross, so that a module of another build is refused
// rather than called with another layout).
struct FitModule {
  const char* version;
  std::array<std::size_t, 4> sizes;
  FitFunction fit;
};

// The sizes FitModule::sizes holds, worked where this header is compiled.
inline constexpr std::array<std::size_t, 4> fit_module_sizes = {
    sizeof(lapwing::ConfiguredCar), sizeof(lapwing::FitLog), sizeof(lapwing::FitOptions),
    sizeof(lapwing::FitResult)};

// The module cannot be loaded: not found, not loadable, or of another build. The message names
// each place tried and why it failed.
struct FitModuleMissing : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// The module's lapwing::fit, loaded on the first call (beside the binary, as in the build tree;
// then in <libdir>/lapwing of the install, from the binary's <bindir>, whatever their depths).
// Throws FitModuleMissing.
FitFunction fit_function();

}  // namespace lapwing::cli

// The module's one export.
extern "C" const lapwing::cli::FitModule* lapwing_fit_module();
