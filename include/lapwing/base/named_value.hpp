// A value given by name rather than in a file: a command-line option (--temperature) or a Python
// argument (air['temperature']). Both read it with this, so that the same bad value gets the same
// words whichever way it was given (README, "In Python").
#pragma once

#include <optional>
#include <string>

#include "lapwing/base/range.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

/// The range `r` (in SI) in the unit a reader types: the quantity's default unit (the one a
/// plain number is read in), or % for a fraction. E.g. "(0, 50] %", "[-50, 70] C".
std::string describe_in_units(Quantity q, const Range& r);

/// `text` ("31 C", "985") given as `name` read as a quantity `q` in `r`: its value in SI; or
/// nullopt and `error` set to "NAME: TEXT is out of range (RANGE UNIT)", with "; did you mean
/// 2 %?" for a plain number that is in range in another of the quantity's units, or "NAME: "
/// and the parser's sentence.
std::optional<double> parse_named_value(const std::string& text, const std::string& name,
                                        Quantity q, const Range& r, std::string& error);

}  // namespace lapwing
