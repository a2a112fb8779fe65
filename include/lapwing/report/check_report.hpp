// `lapwing check` as words: the terminal text and the JSON (check --json), both rendered from one
// CheckSummary (study/check_summary.hpp) and the inputs it was computed from. What check computes
// lives in the summary; here only its layout, rounding and words.
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/study/check_summary.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

/// An air in words: "1.2250 kg/m3 (ISO 2533 at 0 m)" or "1.1644 kg/m3 (30.0 C, 1013.2 hPa, 50 %
/// humidity at 0 m)".
std::string air_text(const Air& a);

/// The words of bad input a lap found (a LapFailure's): a caller that read the files maps it to
/// their words there (the CLI: its source maps); by default the library's own message.
using InputWords = std::function<std::string(const InvalidInput&)>;

/// The terminal text of check: the car, each config's figures and table, each track. `summary`
/// is check_summary(car, circuits, ...).
std::string check_text(const Car& car, const std::vector<Circuit>& circuits,
                       const CheckSummary& summary, const InputWords& input_words = {});

/// check --json (README, "Output files"): the same figures at full precision.
std::string check_json(const Car& car, const std::vector<Circuit>& circuits,
                       const CheckSummary& summary);

}  // namespace lapwing
