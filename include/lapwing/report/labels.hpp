// The words the outputs use for the library's enums: the terminal tables, the JSON, the CSV and
// the HTML report write these and nothing else. The library holds the enums; the text lives
// here, at the boundary.
#pragma once

#include <string>

#include "lapwing/solve/summary.hpp"
#include "lapwing/study/compare.hpp"

namespace lapwing {

/// "grip", "power", "braking".
std::string label(CornerLimit limit);
/// "front", "rear", "both".
std::string label(Axle axle);
/// "corner", "straight".
std::string label(PieceKind kind);

}  // namespace lapwing
