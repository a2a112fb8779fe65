// Failure types of lapwing. Bad input is a typed exception caught once in main and mapped to an
// exit code (2 for input, 3 for a car that cannot move); a broken internal assumption is an assert.
#pragma once

#include <stdexcept>
#include <string>

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

}  // namespace lapwing
