// The program's version, as the outputs record it.
#pragma once

#include <string>

namespace lapwing {

/// "MAJOR.MINOR.PATCH" (the CMake project version).
std::string version();

}  // namespace lapwing
