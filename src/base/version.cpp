#include "lapwing/base/version.hpp"

#ifndef LAPWING_VERSION
#define LAPWING_VERSION "0.0.0"
#endif

namespace lapwing {

std::string version() {
  return LAPWING_VERSION;
}

}  // namespace lapwing
