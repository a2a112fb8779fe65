// Plain-text tables for the terminal, and the signed numbers their delta columns hold.
#pragma once

#include <string>
#include <vector>

namespace lapwing {

/// Columns a text takes on a terminal: one per UTF-8 code point (bytes 10xxxxxx continue a
/// code point and take none), so that a name with accents or an ellipsis keeps a table aligned.
std::size_t display_width(const std::string& s);

/// `s` when it is at most `max` code points long, else its start and end joined by an
/// ellipsis (U+2026) to `max` code points: the end often tells similar names apart
/// ("...centerline)", "..._v2"). Cut only between code points.
std::string shorten_middle(const std::string& s, std::size_t max);

/// A plain-text table with right-aligned columns (first column left-aligned), each column as
/// wide as its widest cell (display_width).
std::string text_table(const std::vector<std::string>& header,
                       const std::vector<std::vector<std::string>>& rows);

/// Fixed-point text with `decimals` places and a "+" before a positive value (deltas).
std::string signed_fixed(double v, int decimals);

}  // namespace lapwing
