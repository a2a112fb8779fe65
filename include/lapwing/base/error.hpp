// Failure types of lapwing. Bad input is a typed exception caught once in main and mapped to an
// exit code (2 for input, 3 for a car that cannot move); a broken internal assumption is an assert.
#pragma once

#include <optional>
#include <stdexcept>
#include <string>

#include "lapwing/base/violation.hpp"

namespace lapwing {

/// A position in an input file, 1-based; line 0 means "the file as a whole".
struct Mark {
  int line = 0;
  int col = 0;
};

/// Bad input: formats as `FILE:LINE:COL: error: WHAT (KEY.PATH)`. Exit code 2.
class InputError : public std::runtime_error {
 public:
  InputError(std::string file, Mark mark, std::string what, std::string key_path = {});
  const std::string& file() const { return file_; }
  Mark mark() const { return mark_; }
  const std::string& message() const { return message_; }
  const std::string& key_path() const { return key_path_; }

 private:
  std::string file_;
  Mark mark_;
  std::string message_;
  std::string key_path_;
};

/// Bad input found by the library, which knows no file positions: the subject (the car's or
/// track's file, or what else was given) and the first violation of a rule (key path, value,
/// rule). what() is `SUBJECT: error: MESSAGE (KEY.PATH)`, the words of the file error without
/// its position; the layer that read the file maps it to FILE:LINE:COL (io/source_map.hpp).
/// Exit code 2.
class InvalidInput : public std::runtime_error {
 public:
  InvalidInput(std::string subject, Violation violation);
  const std::string& subject() const { return subject_; }
  const Violation& violation() const { return violation_; }
  /// The sentence alone (no subject, no key path).
  std::string message() const { return violation_.message(); }

 private:
  std::string subject_;
  Violation violation_;
};

/// Throws InvalidInput(subject, *v) when there is a violation.
void require_valid(const std::optional<Violation>& v, const std::string& subject);

/// An output file or folder that cannot be written (permissions, a missing drive). Exit code 2:
/// the place was the user's choice, and nothing else was written.
class OutputError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// The car cannot complete the track (drive never exceeds resistance, a grade it cannot climb).
/// Exit code 3.
class CannotMove : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// `e` said of one lap of a study of several (compare, trade): "track NAME (FILE), config
/// CONFIG: " and its sentence, so that the lap that failed is known.
CannotMove cannot_move_in(const CannotMove& e, const std::string& track_name,
                          const std::string& track_file, const std::string& config);

}  // namespace lapwing
