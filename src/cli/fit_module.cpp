// liblapwing_fit.so, the module `lapwing fit` loads (fit_module.hpp): lapwing::fit and what the
// layers below it need, linked in from their static libraries and kept out of its exports.
#include "fit_module.hpp"

#include "lapwing/base/version.hpp"

extern "C" [[gnu::visibility("default")]] const lapwing::cli::FitModule* lapwing_fit_module() {
  static const std::string version = lapwing::version();
  static const lapwing::cli::FitModule module{version.c_str(), lapwing::cli::fit_module_sizes,
                                              &lapwing::fit};
  return &module;
}
