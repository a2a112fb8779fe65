// Plain-text tables for the terminal, and the signed numbers their delta columns hold.
#pragma once

#include <string>
#include <vector>

namespace lapwing {

/// A plain-text table with right-aligned columns (first column left-aligned).
std::string text_table(const std::vector<std::string>& header,
                       const std::vector<std::vector<std::string>>& rows);

/// Fixed-point text with `decimals` places and a "+" before a positive value (deltas).
std::string signed_fixed(double v, int decimals);

}  // namespace lapwing
