// What validate() returns: the first value that breaks a rule of its type, named by its key path
// (the path the file formats use, e.g. "tyres.mu_lat"), with the value and the rule. The model
// knows no file positions: a loader maps the key path to FILE:LINE:COL (io/source_map.hpp), and
// a library caller gets the same words without one (InvalidInput, error.hpp).
#pragma once

#include <cstddef>
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

#include "lapwing/base/range.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

/// A value's text for a message, from its key path and its value in SI: a loader gives the text
/// as the file wrote it ("-640 kg"); without one, the SI value with 12 significant digits.
using ValueText = std::function<std::string(const std::string& path, double value_si)>;  // not si_value: a macro of <csignal>

struct Violation {
  enum class Kind {
    rule,   // `rule` is the sentence
    range,  // "value V is out of range: must be RULE"
    order   // "values must be strictly RULE (item I: V after P)", RULE increasing or decreasing
  };
  Kind kind = Kind::rule;
  std::string field;  // key path the message names ("mass", "powertrain.gears"); may be empty
  std::string at;     // key path of the value the error points at when not `field` (an item)
  double value = std::numeric_limits<double>::quiet_NaN();     // SI
  double previous = std::numeric_limits<double>::quiet_NaN();  // order: the item before
  std::size_t item = 0;                                        // order: the item's index
  std::string rule;
  // A data point the sentence names where it says {point}: its key path (e.g.
  // "centerline.points[11]") and how to name it without its file's lines.
  std::string point, point_text;

  /// The key path of the value the error points at: `at`, else `field`.
  const std::string& where() const { return at.empty() ? field : at; }
  /// This violation of a part, as a violation of the whole: key paths under `prefix`
  /// ("tyres" + "mu_lat" = "tyres.mu_lat"; "segments[2]" + "arc.radius" =
  /// "segments[2].arc.radius").
  Violation& under(std::string_view prefix);
  /// The sentence, without position or key path. `text` gives the values' text (default: SI
  /// with 12 significant digits); `point_name` names the data point (default: point_text).
  std::string message(const ValueText& text = {}, std::string_view point_name = {}) const;
};

/// The index a key path ends with ("x_m[12]" -> 12), or nothing.
std::optional<std::size_t> last_index(std::string_view path);

/// Joins key paths: "a" + "b" = "a.b", "a" + "[2]" = "a[2]", "" + "b" = "b".
std::string join_path(std::string_view prefix, std::string_view path);

/// "value V is out of range: must be R", with " in SI units" for a value that has units.
Violation out_of_range(std::string field, double value, const Range& r, bool si_units);
/// The same for a quantity: numbers and fractions have no units.
Violation out_of_range(std::string field, double value, const Range& r, Quantity q);
/// Item i of v is not strictly above (or below) item i - 1.
Violation out_of_order(const std::string& field, const std::vector<double>& v, std::size_t i,
                       bool increasing);
/// A rule in words.
Violation broken_rule(std::string field, std::string sentence, std::string at = {});

/// The first violation of rules checked in order (the order a file is read in, so that a
/// loader reports what it would have met first). Once one is found the rest are skipped.
class FirstViolation {
 public:
  bool found() const { return first_.has_value(); }
  /// v in r.
  FirstViolation& range(std::string_view field, double v, const Range& r, Quantity q);
  FirstViolation& range(std::string_view field, double v, const Range& r, bool si_units);
  /// Every v[i] in r, named "field[i]".
  FirstViolation& each(std::string_view field, const std::vector<double>& v, const Range& r,
                       Quantity q);
  /// Strictly increasing (or decreasing) values; the error points at the item.
  FirstViolation& order(std::string_view field, const std::vector<double>& v, bool increasing);
  /// `ok`, or the rule in words; `sentence` is a string or a function making one (called only
  /// when the rule is broken).
  template <typename Sentence>
  FirstViolation& rule(bool ok, std::string_view field, Sentence&& sentence,
                       std::string_view at = {}) {
    if (!first_ && !ok) {
      if constexpr (std::is_invocable_v<Sentence>)
        first_ = broken_rule(std::string(field), sentence(), std::string(at));
      else
        first_ = broken_rule(std::string(field), std::string(sentence), std::string(at));
    }
    return *this;
  }
  /// A part's first violation, its key paths under `prefix`; `check` is called only when none
  /// has been found yet.
  template <typename Check>
  FirstViolation& part(std::string_view prefix, Check&& check) {
    if (!first_) {
      std::optional<Violation> v = check();
      if (v) first_ = std::move(v->under(prefix));
    }
    return *this;
  }
  std::optional<Violation> result() const { return first_; }

 private:
  std::optional<Violation> first_;
};

}  // namespace lapwing
